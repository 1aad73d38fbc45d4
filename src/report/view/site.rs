//! One site's part of the view: coverage, QC, baseline, verdict, projection tables, crossing
//! years, chances below each level, calcification, local scenarios, methods and figures.

use serde_json::{Value, json};

use super::appendix::sample_files;
use super::thermal::{key_years, thermal_view};
use super::{crossing_text, fig, missing_cell, omega_class, pathway_label, quant_cell};
use crate::report::figures::{Figure, SiteFigures};
use crate::report::fmt;
use crate::report::model::{
    CalcUnit, CalcificationOutlook, Crossing, CrossingYear, QcLevel, ReportModel, Setting,
    SiteReport, Stat,
};
use crate::report::palette;
use crate::report::ranking::limiting_omega;

/// The view of one site (see `templates/README.md` for its fields).
pub(super) fn site_view(
    model: &ReportModel,
    site: &SiteReport,
    shared: &[&Setting],
    figs: &SiteFigures,
) -> Value {
    let coords = match (site.latitude, site.longitude) {
        (Some(lat), Some(lon)) => Some(format!(
            "{}, {}",
            fmt::coordinate(lat, 'N', 'S'),
            fmt::coordinate(lon, 'E', 'W')
        )),
        _ => None,
    };
    let calcification: Vec<Value> = site
        .calcification
        .iter()
        .enumerate()
        .map(|(k, c)| calc_view(model, c, figs.calcification.get(k)))
        .collect();
    let samples = if model.include_appendix {
        sample_files(site)
    } else {
        Vec::new()
    };
    let (shown_levels, same_levels) = crossing_levels(model, site);
    json!({
        "id": site.id,
        "name": site.name,
        "location": site.location,
        "coords": coords,
        "depth": site.depth_m.map(|d| format!("{} m", fmt::number(d, 1))),
        "habitat": site.habitat,
        "data_notice": site.data_notice,
        "limiting_season": site.limiting_season(),
        "coverage": coverage_view(site),
        "qc": site.qc.iter().map(|q| json!({
            "level": qc_level(q.level),
            "count": q.count.to_string(),
            "message": q.message,
            "location": q.location,
        })).collect::<Vec<_>>(),
        "baseline": baseline_view(site),
        "verdict": verdict_view(model, site),
        "projection": projection_rows(model, site),
        "rules": site.projection_rules.iter().map(|r| json!({
            "pathway": super::pathway_label(model, &r.pathway),
            "season": r.season,
            "year": r.year.to_string(),
            "ratio": fmt::number(r.ratio, 3),
            "additive": fmt::number(r.additive, 3),
            "source": fmt::number(r.source_offsets, 3),
            "spread": fmt::number(r.spread, 3),
        })).collect::<Vec<_>>(),
        "crossings": crossing_list(model, site),
        "crossing_table": crossing_table(model, site, &shown_levels),
        "crossing_levels": shown_levels,
        "crossing_same": same_levels,
        "probabilities": probability_rows(model, site),
        "calcification": calcification,
        "scenarios": scenario_views(model, site),
        "thermal": thermal_view(model, site, figs.heat.as_ref()),
        "exposure": super::exposure::exposure_view(model, site, figs.diel.as_ref()),
        "exposure_page1": super::exposure::page1_view(model, site),
        "key_years": key_years(model, site),
        "limits": super::limits::limits_view(model, site),
        "methods": {
            "chemistry": site.methods.chemistry.iter().map(|m| json!({
                "quantity": m.quantity, "method": m.method, "citation": m.citation,
            })).collect::<Vec<_>>(),
            // Only the settings this site does not share with every other site.
            "projection": site.methods.projection.iter().filter(|s| !shared.iter().any(|x| {
                x.name == s.name && x.value == s.value
            })).map(|s| json!({ "name": s.name, "value": s.value })).collect::<Vec<_>>(),
            "notes": site.methods.notes,
        },
        "figures": {
            "seasonal": figs.seasonal.as_ref().map(fig),
            "overview": figs.overview.as_ref().map(fig),
            "fans": figs.fans.iter().map(|(id, f)| json!({
                "pathway": pathway_label(model, id), "path": f.path(), "alt": f.alt,
            })).collect::<Vec<_>>(),
            "calcification_legend": figs.calcification_legend.as_ref().map(fig),
        },
        "sample_files": samples,
    })
}

/// Per-season baseline statistics, formatted.
fn baseline_view(site: &SiteReport) -> Vec<Value> {
    site.baseline
        .iter()
        .map(|b| {
            json!({
                "season": b.season,
                "n": b.n.to_string(),
                "omega": stat_view(&b.omega_ar, fmt::omega),
                "ph": stat_view(&b.ph_t, fmt::ph),
                "temp": stat_view(&b.temp_c, fmt::temp),
                "salinity": b.salinity.as_ref().map(|s| stat_view(s, fmt::salinity)),
                "ta": b.ta.as_ref().map(|s| stat_view(s, fmt::micro)),
                "dic": b.dic.as_ref().map(|s| stat_view(s, fmt::micro)),
                "pco2": b.pco2.as_ref().map(|s| stat_view(s, fmt::micro)),
                "omega_ca": b.omega_ca.as_ref().map(|s| stat_view(s, fmt::omega)),
                "limiting": Some(b.season.as_str()) == site.limiting_season(),
            })
        })
        .collect()
}

/// Projected Ω_ar per pathway and season at the horizon years, seasons in baseline order first.
fn projection_rows(model: &ReportModel, site: &SiteReport) -> Vec<Value> {
    let seasons: Vec<&str> = site.baseline.iter().map(|b| b.season.as_str()).collect();
    let mut projection_rows = Vec::new();
    for p in &model.pathways {
        let Some(proj) = site.projection.iter().find(|x| x.pathway == p.id) else {
            continue;
        };
        // Seasons in baseline order first, then any others the projection has.
        let mut order: Vec<&str> = seasons.clone();
        for s in &proj.seasons {
            if !order.contains(&s.season.as_str()) {
                order.push(&s.season);
            }
        }
        for (i, season) in order.iter().enumerate() {
            let Some(series) = proj.seasons.iter().find(|s| s.season == *season) else {
                continue;
            };
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match series.at(y) {
                    Some(pt) if pt.omega_ar.p50.is_finite() => {
                        let mut c = quant_cell(&pt.omega_ar, fmt::omega);
                        c["class"] = json!(omega_class(model, pt.omega_ar.p50));
                        c["ph"] = json!(pt.ph_t.map(|q| fmt::ph(q.p50)));
                        c
                    }
                    _ => missing_cell(),
                })
                .collect();
            projection_rows.push(json!({
                "pathway": p.label,
                "first": i == 0,
                "season": season,
                "limiting": Some(*season) == site.limiting_season(),
                "cells": cells,
            }));
        }
    }
    projection_rows
}

/// Every crossing year as a flat list.
fn crossing_list(model: &ReportModel, site: &SiteReport) -> Vec<Value> {
    site.crossings
        .iter()
        .map(|c| {
            json!({
                "pathway": pathway_label(model, &c.pathway),
                "season": c.season,
                "level": fmt::level(c.threshold),
                "median": crossing_text(c.median),
                "early": crossing_text(c.early),
                "late": crossing_text(c.late),
            })
        })
        .collect()
}

/// Order of crossing years for a span: already below, then years, then "not by".
fn crossing_order(c: CrossingYear) -> (u8, i32) {
    match c {
        CrossingYear::AlreadyBelow => (0, 0),
        CrossingYear::Year(y) => (1, y),
        CrossingYear::NotBy(y) => (2, y),
    }
}

/// The crossing table's levels split in two: those shown as columns (`.0`, as printed) and,
/// for a level whose median is the same in every row, one sentence instead of a column
/// (`.1`), with the span of the members' early and late years.
fn crossing_levels(model: &ReportModel, site: &SiteReport) -> (Vec<String>, Vec<String>) {
    let mut shown = Vec::new();
    let mut same = Vec::new();
    for &level in &model.thresholds.levels {
        let cells: Vec<&Crossing> = site
            .crossings
            .iter()
            .filter(|c| c.threshold == level)
            .collect();
        let collapsed = match cells.split_first() {
            Some((first, rest))
                if !rest.is_empty() && rest.iter().all(|c| c.median == first.median) =>
            {
                let lo = cells
                    .iter()
                    .map(|c| c.early)
                    .min_by_key(|c| crossing_order(*c));
                let hi = cells
                    .iter()
                    .map(|c| c.late)
                    .max_by_key(|c| crossing_order(*c));
                let span = match (lo, hi) {
                    (Some(lo), Some(hi)) if lo == hi && lo == first.median => {
                        "and so do 5 % and 95 % of the members".to_string()
                    }
                    (Some(lo), Some(hi)) => format!(
                        "the years by which 5 % and 95 % of the members have crossed span {} to {}",
                        crossing_text(lo),
                        crossing_text(hi)
                    ),
                    _ => String::new(),
                };
                Some(format!(
                    "Ω_ar below {}: the median is \u{201c}{}\u{201d} in every pathway and season; {span}.",
                    fmt::level(level),
                    crossing_text(first.median)
                ))
            }
            _ => None,
        };
        match collapsed {
            Some(sentence) => same.push(sentence),
            None => shown.push(fmt::level(level)),
        }
    }
    (shown, same)
}

/// `shown`: the levels shown as columns, as printed ([`crossing_levels`]).
fn crossing_table(model: &ReportModel, site: &SiteReport, shown: &[String]) -> Vec<Value> {
    let seasons: Vec<&str> = site.baseline.iter().map(|b| b.season.as_str()).collect();
    // The same crossings as a table: one row per pathway and season, one cell per level
    // (median year, with the early and late estimates), so that a site with twelve seasons
    // gets 36 rows rather than 108.
    let mut crossing_rows = Vec::new();
    for p in &model.pathways {
        let mut first = true;
        for season in &seasons {
            let cells: Vec<Value> = model
                .thresholds
                .levels
                .iter()
                .filter(|level| shown.contains(&fmt::level(**level)))
                .map(|level| {
                    site.crossings
                        .iter()
                        .find(|c| c.pathway == p.id && c.season == *season && c.threshold == *level)
                        .map_or_else(
                            || json!({ "median": fmt::MISSING, "early": "", "late": "" }),
                            |c| {
                                json!({
                                    "median": crossing_text(c.median),
                                    "early": crossing_text(c.early),
                                    "late": crossing_text(c.late),
                                })
                            },
                        )
                })
                .collect();
            if cells.iter().all(|c| c["median"] == fmt::MISSING) {
                continue;
            }
            crossing_rows.push(json!({
                "pathway": p.label,
                "first": first,
                "season": season,
                "limiting": Some(*season) == site.limiting_season(),
                "cells": cells,
            }));
            first = false;
        }
    }
    crossing_rows
}

fn probability_rows(model: &ReportModel, site: &SiteReport) -> Vec<Value> {
    // Chance below each level: rows pathway × horizon (limiting season), columns levels.
    let season = site.limiting_season().unwrap_or_default();
    let mut probability_rows = Vec::new();
    for p in &model.pathways {
        for &y in &model.horizons {
            let cells: Vec<String> = model
                .thresholds
                .levels
                .iter()
                .map(|level| {
                    site.probabilities
                        .iter()
                        .find(|b| {
                            b.pathway == p.id
                                && b.year == y
                                && b.season == season
                                && b.threshold == *level
                        })
                        .map_or_else(
                            || fmt::MISSING.to_string(),
                            |b| format!("{} %", fmt::number(b.percent, 0)),
                        )
                })
                .collect();
            if cells.iter().any(|c| c != fmt::MISSING) {
                probability_rows.push(json!({
                    "pathway": p.label, "year": y.to_string(), "cells": cells,
                }));
            }
        }
    }
    probability_rows
}

/// Local scenarios beside the base case.
fn scenario_views(model: &ReportModel, site: &SiteReport) -> Vec<Value> {
    site
        .local_scenarios
        .iter()
        .map(|s| {
            json!({
                "name": s.name,
                "description": s.description,
                "rows": s.rows.iter().map(|r| {
                    let delta = r.reference_median.map(|m| fmt::signed(r.omega_ar.p50 - m, 2));
                    json!({
                        "pathway": pathway_label(model, &r.pathway),
                        "year": r.year.to_string(),
                        "season": r.season,
                        "median": fmt::omega(r.omega_ar.p50),
                        "range": fmt::range(&fmt::omega(r.omega_ar.p05), &fmt::omega(r.omega_ar.p95)),
                        "reference": r.reference_median.map(fmt::omega),
                        "delta": delta,
                    })
                }).collect::<Vec<_>>(),
            })
        })
        .collect()
}

fn stat_view(s: &Stat, f: fn(f64) -> String) -> Value {
    let mean_sd = if s.sd.is_finite() {
        format!("{} ± {}", f(s.mean), f(s.sd))
    } else {
        f(s.mean)
    };
    json!({
        "mean": f(s.mean),
        "sd": f(s.sd),
        "min": f(s.min),
        "max": f(s.max),
        "mean_sd": mean_sd,
        "range": fmt::range(&f(s.min), &f(s.max)),
    })
}

fn qc_level(level: QcLevel) -> &'static str {
    match level {
        QcLevel::Note => "note",
        QcLevel::Warning => "warning",
        QcLevel::Excluded => "excluded",
    }
}

fn verdict_view(model: &ReportModel, site: &SiteReport) -> Value {
    let rows: Vec<Value> = model
        .pathways
        .iter()
        .map(|p| {
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match limiting_omega(site, &p.id, y) {
                    Some(q) => {
                        let class = omega_class(model, q.p50);
                        let mut c = quant_cell(&q, fmt::omega);
                        c["class"] = json!(class);
                        c["class_label"] =
                            json!(class.and_then(|k| model.thresholds.labels.get(k)).cloned());
                        c["fill"] = json!(class.map(|k| palette::hex(palette::class_fill(k))));
                        c
                    }
                    None => missing_cell(),
                })
                .collect();
            json!({ "pathway": p.label, "cells": cells })
        })
        .collect();
    json!({
        "season": site.limiting_season(),
        "rows": rows,
        "sentence": super::basis::verdict_sentence(model, site),
    })
}

fn coverage_view(site: &SiteReport) -> Value {
    let c = &site.coverage;
    json!({
        "files": c.record_files,
        "records": c.n_records.to_string(),
        "used": c.n_used.to_string(),
        "first": c.first_date,
        "last": c.last_date,
        "stations": c.stations.join(", "),
        "n_stations": c.stations.len().to_string(),
        // Seasons named after single months need no months column.
        "months_column": c.seasons.iter().any(|s| s.months != s.season),
        "seasons": c.seasons.iter().map(|s| json!({
            "season": s.season,
            "months": s.months,
            "records": s.n_records.to_string(),
            "used": s.n_used.to_string(),
            "years": s.n_years.to_string(),
            "first": s.first_date.clone().unwrap_or_else(|| fmt::MISSING.to_string()),
            "last": s.last_date.clone().unwrap_or_else(|| fmt::MISSING.to_string()),
            "thin": s.n_used < 3,
        })).collect::<Vec<_>>(),
    })
}

fn calc_view(model: &ReportModel, c: &CalcificationOutlook, figure: Option<&Figure>) -> Value {
    let f = move |x: f64| fmt::calc(x, c.unit);
    let unit = match c.unit {
        CalcUnit::PercentChange => "% change from present",
        CalcUnit::KgCaco3PerM2Year => "kg CaCO₃ m⁻² yr⁻¹",
        CalcUnit::MmolCaco3PerM2Day => "reef NEC in mmol CaCO₃ m⁻² d⁻¹",
    };
    let mut any_extrapolated = false;
    let rows: Vec<Value> = model
        .pathways
        .iter()
        .filter_map(|p| {
            let s = c.series.iter().find(|s| s.pathway == p.id)?;
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match s.points.iter().find(|pt| pt.year == y) {
                    Some(pt) if pt.value.p50.is_finite() => {
                        any_extrapolated |= pt.extrapolated;
                        json!({
                            "median": f(pt.value.p50),
                            "range": fmt::range(&f(pt.value.p05), &f(pt.value.p95)),
                            "extrapolated": pt.extrapolated,
                        })
                    }
                    _ => json!({ "median": fmt::MISSING, "range": "", "extrapolated": false }),
                })
                .collect();
            Some(json!({ "pathway": p.label, "cells": cells }))
        })
        .collect();
    json!({
        "relationship": c.relationship,
        "citation": c.citation,
        "unit": unit,
        "valid_range": c.valid_range,
        "baseline": c.baseline.map(f),
        "note": c.note,
        "rows": rows,
        "any_extrapolated": any_extrapolated,
        "figure": figure.map(fig),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    fn crossing(
        season: &str,
        threshold: f64,
        m: CrossingYear,
        e: CrossingYear,
        l: CrossingYear,
    ) -> Crossing {
        Crossing {
            pathway: "p".into(),
            season: season.into(),
            threshold,
            median: m,
            early: e,
            late: l,
        }
    }

    #[test]
    fn a_level_with_one_median_everywhere_becomes_a_sentence() {
        use CrossingYear::{AlreadyBelow as A, NotBy, Year};
        let mut model = example_model(1);
        model.thresholds.levels = vec![4.0, 3.0];
        let site = &mut model.sites[0];
        // Level 4.0: the median is "already below" in both rows, the late years 2037 and 2041;
        // level 3.0: medians 2050 and "not by 2100" differ, so it stays a column.
        site.crossings = vec![
            crossing("wet", 4.0, A, A, Year(2037)),
            crossing("dry", 4.0, A, A, Year(2041)),
            crossing("wet", 3.0, Year(2050), Year(2040), NotBy(2100)),
            crossing("dry", 3.0, NotBy(2100), Year(2060), NotBy(2100)),
        ];
        let (shown, same) = crossing_levels(&model, &model.sites[0]);
        assert_eq!(shown, vec![fmt::level(3.0)]);
        assert_eq!(same.len(), 1);
        assert!(
            same[0].starts_with(&format!("Ω_ar below {}", fmt::level(4.0))),
            "{}",
            same[0]
        );
        assert!(
            same[0].contains("span already below to 2041"),
            "{}",
            same[0]
        );
    }
}
