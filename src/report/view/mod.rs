//! The template's view of a report: the model with every number formatted as a string, plus the
//! derived tables (verdicts, ranking) and the figure paths. This is what the template reads as
//! `/data.json`; its shape is documented in `templates/README.md`.
//!
//! Layout: this file builds the top level and holds the cell helpers; [`site`] makes one site's
//! part, [`appendix`] the per-sample listing and [`comparison`] the ranking page of a
//! comparison. The view formats and arranges; the order of the sites comes from
//! [`super::ranking`].

mod appendix;
mod basis;
mod comparison;
mod exposure;
mod limits;
mod site;
mod thermal;

use serde_json::{Value, json};

use super::figures::{Figure, ReportFigures, SiteFigures};
use super::fmt;
use super::model::{CrossingYear, Quantiles, ReportModel, ReportTime, Setting};
use super::palette;

/// Version of the embedded typesetter, shown in the Reproducibility section.
pub const TYPESETTER: &str = "Typst 0.15.1";

/// The dates a report prints.
#[derive(Debug, Clone, Copy)]
pub struct Dates {
    /// The PDF's creation time: `SOURCE_DATE_EPOCH`, else the model's timestamp.
    pub timestamp: ReportTime,
    /// When the report was prepared, if known (`SOURCE_DATE_EPOCH` or `[report] date`).
    pub prepared: Option<ReportTime>,
}

/// Builds the template data.
pub fn build(model: &ReportModel, figures: &ReportFigures, dates: Dates) -> Value {
    let date = dates.timestamp;
    let n = model.pathways.len();
    let pathways: Vec<Value> = model
        .pathways
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let style = palette::pathway_style(k, n);
            json!({
                "id": p.id,
                "label": p.label,
                "citation": p.citation,
                "description": p.description,
                "colour": palette::hex(style.colour),
            })
        })
        .collect();
    let classes: Vec<Value> = (0..=model.thresholds.levels.len())
        .map(|k| {
            json!({
                "range": fmt::class_range_text(&model.thresholds, k),
                "label": model.thresholds.labels.get(k).cloned().unwrap_or_default(),
                "fill": palette::hex(palette::class_fill(k)),
            })
        })
        .collect();
    let shared = shared_settings(model);
    let empty = SiteFigures::default();
    let sites: Vec<Value> = model
        .sites
        .iter()
        .enumerate()
        .filter(|(i, _)| model.in_detail(*i))
        .map(|(i, s)| site::site_view(model, s, &shared, figures.sites.get(i).unwrap_or(&empty)))
        .collect();
    let comparison = if model.sites.len() > 1 {
        Some(comparison::comparison_view(model, figures))
    } else {
        None
    };
    let repro = &model.reproducibility;
    // Reproducibility lists only what Methods and the site sections do not already show.
    let shown_elsewhere = |s: &Setting| {
        model
            .sites
            .iter()
            .flat_map(|site| &site.methods.projection)
            .any(|p| p.name == s.name && p.value == s.value)
    };
    let kind = if model.sites.len() > 1 {
        "comparison"
    } else {
        "single"
    };
    json!({
        "kind": kind,
        "title": model.title,
        "subtitle": model.subtitle,
        "prepared_for": model.prepared_for,
        "prepared_by": model.prepared_by,
        "prepared": dates.prepared.map(|d| d.iso_date()),
        "data_to": last_sample_date(model),
        "tool": format!("{} {}", model.tool.name, model.tool.version),
        "typesetter": TYPESETTER,
        "thresholds": {
            "levels": model.thresholds.levels.iter().map(|l| fmt::level(*l)).collect::<Vec<_>>(),
            "classes": classes,
            "citation": model.thresholds.citation,
            "checked": model.thresholds.checked,
        },
        "horizons": model.horizons.iter().map(|y| y.to_string()).collect::<Vec<_>>(),
        "key_level": thermal::key_level(),
        "pathways": pathways,
        "projection_settings": shared.iter().map(|s| setting_view(s)).collect::<Vec<_>>(),
        "sites": sites,
        "comparison": comparison,
        "extra_limitations": model.extra_limitations,
        "appendix": model.include_appendix,
        "appendix_opening": model.include_appendix.then(|| appendix::opening(model)),
        "reproducibility": {
            "command": repro.command,
            "seed": repro.seed.to_string(),
            "members": repro.ensemble_members.to_string(),
            "inputs": repro.inputs.iter().map(|f| json!({
                "role": f.role, "path": f.path, "sha256": f.sha256, "bytes": f.bytes.to_string(),
            })).collect::<Vec<_>>(),
            "settings": repro.settings.iter().filter(|s| !shown_elsewhere(s))
                .map(setting_view).collect::<Vec<_>>(),
            "timestamp": date.iso_datetime(),
        },
    })
}

/// The last sample date over all sites (coverage dates are ISO, so their text order is their
/// date order).
fn last_sample_date(model: &ReportModel) -> Option<&str> {
    model
        .sites
        .iter()
        .map(|s| s.coverage.last_date.as_str())
        .filter(|d| !d.is_empty())
        .max()
}

/// The projection settings every site has with the same value, in the first site's order:
/// printed once under Methods rather than once per site.
fn shared_settings(model: &ReportModel) -> Vec<&Setting> {
    let Some((first, rest)) = model.sites.split_first() else {
        return Vec::new();
    };
    first
        .methods
        .projection
        .iter()
        .filter(|s| {
            rest.iter().all(|site| {
                site.methods
                    .projection
                    .iter()
                    .any(|p| p.name == s.name && p.value == s.value)
            })
        })
        .collect()
}

fn setting_view(s: &Setting) -> Value {
    json!({ "name": s.name, "value": s.value })
}

fn pathway_label<'a>(model: &'a ReportModel, id: &'a str) -> &'a str {
    model
        .pathways
        .iter()
        .find(|p| p.id == id)
        .map_or(id, |p| p.label.as_str())
}

fn fig(f: &Figure) -> Value {
    json!({ "path": f.path(), "alt": f.alt })
}

/// The class that shades and labels an Ω_ar value: the class of the value as printed
/// ([`fmt::omega`]), so that a number printed twice never has two classes; none when the class
/// limits were not checked against their source.
fn omega_class(model: &ReportModel, omega: f64) -> Option<usize> {
    let printed: f64 = fmt::omega(omega).replace('\u{2212}', "-").parse().ok()?;
    model.thresholds.shade(printed)
}

fn quant_cell(q: &Quantiles, f: fn(f64) -> String) -> Value {
    json!({
        "median": f(q.p50),
        "range": fmt::range(&f(q.p05), &f(q.p95)),
        "iqr": fmt::range(&f(q.p25), &f(q.p75)),
    })
}

fn missing_cell() -> Value {
    json!({ "median": fmt::MISSING, "range": "", "iqr": "", "class": Value::Null })
}

/// A crossing year in words: a year, "already below" or "not by" the last year.
pub(crate) fn crossing_text(c: CrossingYear) -> String {
    match c {
        CrossingYear::AlreadyBelow => "already below".to_string(),
        CrossingYear::Year(y) => y.to_string(),
        CrossingYear::NotBy(y) => format!("not by {y}"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;
    use crate::report::figures::build_all;

    fn undated(model: &ReportModel) -> Dates {
        Dates {
            timestamp: model.timestamp,
            prepared: None,
        }
    }

    #[test]
    fn every_number_in_the_view_is_a_string() {
        fn walk(v: &Value, path: &str) {
            match v {
                Value::Number(_) => {
                    // Only class indices (used for colouring) may be numbers.
                    assert!(path.ends_with("class"), "number at {path}");
                }
                Value::Array(a) => a
                    .iter()
                    .enumerate()
                    .for_each(|(i, x)| walk(x, &format!("{path}[{i}]"))),
                Value::Object(o) => o.iter().for_each(|(k, x)| walk(x, &format!("{path}.{k}"))),
                _ => {}
            }
        }
        let model = example_model(3);
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, undated(&model));
        walk(&v, "");
    }

    #[test]
    fn verdict_uses_limiting_season_and_exact_horizon_values() {
        let model = example_model(1);
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, undated(&model));
        let site = &model.sites[0];
        let season = site.limiting_season().unwrap();
        let verdict = &v["sites"][0]["verdict"];
        assert_eq!(verdict["season"], season);
        let p = &model.pathways[0];
        let y = model.horizons[0];
        let q = site.series(&p.id, season).unwrap().at(y).unwrap().omega_ar;
        assert_eq!(verdict["rows"][0]["cells"][0]["median"], fmt::omega(q.p50));
        assert_eq!(
            verdict["rows"][0]["cells"][0]["class"],
            json!(omega_class(&model, q.p50))
        );
    }

    #[test]
    fn one_printed_value_has_one_class() {
        // 3.4951 and 3.5049 lie on either side of the 3.5 limit and both print as "3.50": the
        // class is that of the printed 3.50 (lower bounds inclusive: adequate, index 1) for
        // both, as a reader comparing the two printed numbers expects.
        let model = example_model(1);
        let (below, above) = (3.4951, 3.5049);
        assert_eq!(fmt::omega(below), "3.50");
        assert_eq!(fmt::omega(above), "3.50");
        assert_eq!(
            model.thresholds.classify(below),
            Some(2),
            "unrounded: marginal"
        );
        assert_eq!(omega_class(&model, below), Some(1));
        assert_eq!(omega_class(&model, above), Some(1));
        // Printed 3.49 stays marginal.
        assert_eq!(omega_class(&model, 3.494), Some(2));
        // Limits not checked against their source shade and label nothing.
        let mut unchecked = model.clone();
        unchecked.thresholds.checked = false;
        assert_eq!(omega_class(&unchecked, above), None);
    }

    #[test]
    fn missing_horizon_year_shows_a_dash_not_a_guess() {
        let mut model = example_model(1);
        model.horizons.push(2093); // not on the example's 5-year grid
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, undated(&model));
        let cells = v["sites"][0]["verdict"]["rows"][0]["cells"]
            .as_array()
            .unwrap();
        assert_eq!(cells.last().unwrap()["median"], fmt::MISSING);
    }

    #[test]
    fn data_date_and_preparation_date_are_apart() {
        let mut model = example_model(2);
        model.sites[1].coverage.last_date = "2025-02-03".to_string();
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, undated(&model));
        // The example's first site ends on 2024-11-28, the second now on 2025-02-03: the later.
        assert_eq!(v["data_to"], "2025-02-03");
        assert_eq!(v["prepared"], Value::Null);
        let prepared = ReportTime::from_ymd(2025, 6, 1).unwrap();
        let dates = Dates {
            timestamp: prepared,
            prepared: Some(prepared),
        };
        let v = build(&model, &figs, dates);
        assert_eq!(v["prepared"], "2025-06-01");
        assert_eq!(v["reproducibility"]["timestamp"], "2025-06-01T00:00:00Z");
    }
}
