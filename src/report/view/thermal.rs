//! The thermal-stress part of the view: the section of one site (record, MMM and its source,
//! allowance, assumptions, the table per pathway and horizon year, the figure) and the
//! chemistry-and-heat years per pathway shown on the first page and beside the ranking.

use serde_json::{Value, json};

use super::{crossing_text, fig};
use crate::report::figures::Figure;
use crate::report::fmt;
use crate::report::model::{CrossingYear, MmmSource, ReportModel, SiteReport, ThermalOutlook};
use crate::report::ranking::{KEY_OMEGA_LEVEL, chemistry_year, heat_year};

/// Shown where a site has no temperature record.
pub(super) const NO_RECORD: &str = "no temperature record";

/// The chemistry year and the heat year of a site under every pathway: `pathway`,
/// `chemistry` (the limiting season's median Ω_ar below 3.0) and `heat` (DHW ≥ 8 °C-weeks in
/// most years, median), as texts.
pub(super) fn key_years(model: &ReportModel, site: &SiteReport) -> Vec<Value> {
    model
        .pathways
        .iter()
        .map(|p| {
            json!({
                "pathway": p.label,
                "chemistry": chemistry_year(site, &p.id).map_or_else(|| fmt::MISSING.to_string(), crossing_text),
                "heat": heat_text(heat_year(site, &p.id), site.thermal.is_some()),
            })
        })
        .collect()
}

/// A heat year as text: the year, "not by 2100", or why there is none.
pub(super) fn heat_text(y: Option<CrossingYear>, has_record: bool) -> String {
    match y {
        Some(y) => crossing_text(y),
        None if has_record => fmt::MISSING.to_string(),
        None => NO_RECORD.to_string(),
    }
}

/// The key Ω_ar level as written in the headings ("3.0").
pub(super) fn key_level() -> String {
    fmt::level(KEY_OMEGA_LEVEL)
}

/// The thermal-stress section of one site (`null` when the site has no temperature record;
/// the template then says so).
pub(super) fn thermal_view(
    model: &ReportModel,
    site: &SiteReport,
    figure: Option<&Figure>,
) -> Value {
    let Some(t) = &site.thermal else {
        return Value::Null;
    };
    let [sig, severe] = t.levels.map(|l| fmt::number(l, 0));
    json!({
        "record": t.record,
        "period": format!("{} to {}", t.first_day, t.last_day),
        "mmm": format!("{} °C", fmt::mmm(t.mmm_c)),
        "mmm_origin": mmm_origin(t),
        "mmm_weak": mmm_weakness(t),
        "allowance": allowance_text(t),
        "significant": sig,
        "severe": severe,
        "observed": t.observed.iter().map(|o| json!({
            "year": o.year.to_string(), "dhw": fmt::dhw(o.max_dhw),
        })).collect::<Vec<_>>(),
        "rows": table_rows(model, t),
        "findings": t.findings,
        "figure": figure.map(fig),
    })
}

/// Where the MMM came from, in a sentence.
fn mmm_origin(t: &ThermalOutlook) -> String {
    match &t.mmm_source {
        MmmSource::Stated {
            source,
            base_period,
        } => format!(
            "stated in the site file: {source}, base period {}–{}",
            base_period.0, base_period.1
        ),
        MmmSource::Record { years } => format!(
            "estimated from this site's own record (at least {years} year{} behind each \
             monthly mean)",
            if *years == 1 { "" } else { "s" }
        ),
    }
}

/// How weak an MMM estimated from the record is (`null` for a stated MMM).
fn mmm_weakness(t: &ThermalOutlook) -> Option<String> {
    let MmmSource::Record { years } = t.mmm_source else {
        return None;
    };
    let mut s = format!(
        "This MMM is weak: it rests on {years} year{} of record where a climatology takes \
         decades; it is warm-biased if those years were hot, which understates DHW; and an \
         in-situ logger reads differently from the satellite sea-surface temperature the DHW \
         levels were set on.",
        if years == 1 { "" } else { "s" }
    );
    if let Some(hot) = t
        .observed
        .iter()
        .filter(|o| o.max_dhw >= t.levels[0])
        .max_by(|a, b| a.max_dhw.total_cmp(&b.max_dhw))
    {
        s.push_str(&format!(
            " The record holds such a year: {} reached {} °C-weeks even against this MMM.",
            hot.year,
            fmt::dhw(hot.max_dhw)
        ));
    }
    s.push_str(" A stated MMM from a long satellite climatology is the better basis.");
    Some(s)
}

fn allowance_text(t: &ThermalOutlook) -> String {
    if t.allowance_c_per_decade == 0.0 {
        "none: the MMM stays fixed over the projection".to_string()
    } else {
        format!(
            "{} °C per decade added to the MMM after the record (corals assumed to acclimatise \
             or adapt at that rate)",
            fmt::signed(t.allowance_c_per_decade, 2)
        )
    }
}

/// One row per pathway and table horizon year; the pathway's first row carries its onset of
/// severe stress in most years (`onset`, with `onset_range` from the 5 and 95 % members).
fn table_rows(model: &ReportModel, t: &ThermalOutlook) -> Vec<Value> {
    let mut rows = Vec::new();
    for p in &model.pathways {
        let Some(s) = t.series(&p.id) else { continue };
        let onset = |y: Option<i32>| {
            y.map_or_else(|| format!("not by {}", s.searched_to), |y| y.to_string())
        };
        let [early, median, late] = s.severe_most_years.map(onset);
        let points: Vec<_> = model
            .horizons
            .iter()
            .filter_map(|y| s.points.iter().find(|pt| pt.year == *y))
            .collect();
        for (i, pt) in points.iter().enumerate() {
            rows.push(json!({
                "pathway": p.label,
                "first": i == 0,
                "span": points.len().to_string(),
                "year": pt.year.to_string(),
                "median": fmt::dhw(pt.max_dhw[1]),
                "range": fmt::range(&fmt::dhw(pt.max_dhw[0]), &fmt::dhw(pt.max_dhw[2])),
                "significant": format!("{} %", fmt::number(pt.significant_pct, 0)),
                "severe": format!("{} %", fmt::number(pt.severe_pct, 0)),
                "onset": median,
                "onset_range": format!("{early} / {late}"),
            }));
        }
    }
    rows
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    #[test]
    fn an_mmm_from_the_record_is_called_weak_and_names_its_hot_year() {
        // The example's second site estimates its MMM from 3 years of record, one of which
        // (2022) reached 6.3 °C-weeks, above the 4 °C-weeks level.
        let model = example_model(2);
        let v = thermal_view(&model, &model.sites[1], None);
        assert!(v["mmm_origin"].as_str().unwrap().contains("3 years"));
        let weak = v["mmm_weak"].as_str().expect("weakness stated");
        assert!(weak.contains("3 years of record"), "{weak}");
        assert!(weak.contains("warm-biased"), "{weak}");
        assert!(weak.contains("2022 reached 6.3 °C-weeks"), "{weak}");
        // The first site states its MMM: source and base period, no weakness paragraph.
        let v = thermal_view(&model, &model.sites[0], None);
        assert_eq!(v["mmm_weak"], Value::Null);
        assert!(
            v["mmm_origin"]
                .as_str()
                .unwrap()
                .contains("base period 1985–2012")
        );
    }

    #[test]
    fn a_site_without_a_record_says_so_instead_of_a_year() {
        let mut model = example_model(1);
        model.sites[0].thermal = None;
        let rows = key_years(&model, &model.sites[0]);
        assert_eq!(rows.len(), model.pathways.len());
        assert!(rows.iter().all(|r| r["heat"] == NO_RECORD));
        assert_eq!(thermal_view(&model, &model.sites[0], None), Value::Null);
    }
}
