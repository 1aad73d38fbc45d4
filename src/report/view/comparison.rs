//! The comparison page: the ranking table, its criteria and the first year below each level
//! per site, in the order [`rank_sites`] gives.

use serde_json::{Value, json};

use super::thermal::{heat_text, key_level, key_years};
use super::{crossing_text, fig, missing_cell, quant_cell};
use crate::report::figures::ReportFigures;
use crate::report::fmt;
use crate::report::model::{CalcUnit, ReportModel, SiteReport};
use crate::report::palette;
use crate::report::ranking::{RankEntry, limiting_omega, rank_sites, ranking_pathway};

/// The comparison part of the view (`null` for a one-site report is decided by the caller).
pub(super) fn comparison_view(model: &ReportModel, figures: &ReportFigures) -> Value {
    let pathway = ranking_pathway(model);
    let pathway_id = pathway.map(|p| p.id.as_str()).unwrap_or_default();
    let pathway_name = pathway.map(|p| p.label.as_str()).unwrap_or_default();
    let last = model
        .horizons
        .last()
        .map(|y| y.to_string())
        .unwrap_or_default();
    let ranked = rank_sites(model);
    let first_calc_name = model
        .sites
        .iter()
        .find_map(|s| s.calcification.first().map(|c| c.relationship.clone()));
    let rows: Vec<Value> = ranked
        .iter()
        .enumerate()
        .map(|(rank, e)| ranking_row(model, rank, e, pathway_id, first_calc_name.as_deref()))
        .collect();
    let (crossing_rows, crossing_groups) = crossing_tables(model, &ranked);
    let level = key_level();
    let criteria = vec![
        format!(
            "Order: each site's first limit under {pathway_name}, the earlier of two years: the \
             year the median Ω_ar of its limiting season (the season with the lowest present-day \
             mean) falls below {level}, and the year DHW ≥ 8 °C-weeks is reached in most years \
             (median); the later the first limit, the higher the rank. Chemistry and heat count \
             alike: whichever limits a site first decides."
        ),
        format!(
            "Ties: the later of the two years, then the median Ω_ar of the limiting season in \
             {last} under {pathway_name} (higher first), then the present-day seasonal minimum \
             of the mean Ω_ar."
        ),
        "A site missing either year (no temperature record, or no crossing of that level \
         computed) ranks after the sites with both: missing information never lifts a site."
            .to_string(),
        format!(
            "Shown for context, not used for the order: the medians at the other horizon years \
             and {}.",
            match &first_calc_name {
                Some(n) => format!("the change in calcification from {n} in {last}"),
                None => "(no calcification relationship given)".to_string(),
            }
        ),
    ];
    // A comparison of more sites than it shows in full says so where the site names would be.
    let detail_note = (!model.summary_only.is_empty()).then(|| {
        format!(
            "{} candidate sites, all ranked below; full sections for the {} ranked highest",
            model.sites.len(),
            model.sites.len().saturating_sub(model.summary_only.len())
        )
    });
    json!({
        "detail_note": detail_note,
        "pathway": pathway_name,
        "last_horizon": last,
        "criteria": criteria,
        "calc_relationship": first_calc_name,
        "rows": rows,
        "crossings": crossing_rows,
        "key_years": ranked.iter().map(|e| {
            let site = &model.sites[e.site];
            json!({ "site": site.name, "cells": key_years(model, site) })
        }).collect::<Vec<_>>(),
        "crossing_groups": crossing_groups,
        "figures": figures.comparison.iter().map(fig).collect::<Vec<_>>(),
        "key_figure": figures.comparison_key.as_ref().map(fig),
    })
}

/// One row of the ranking table: rank, site, present-day minimum, the horizon cells under the
/// ranking pathway and the calcification change of the first relationship in the last year.
fn ranking_row(
    model: &ReportModel,
    rank: usize,
    e: &RankEntry,
    pathway_id: &str,
    calc_name: Option<&str>,
) -> Value {
    let site = &model.sites[e.site];
    let horizon_cells: Vec<Value> = model
        .horizons
        .iter()
        .map(|&y| match limiting_omega(site, pathway_id, y) {
            Some(q) => {
                let mut c = quant_cell(&q, fmt::omega);
                let class = super::omega_class(model, q.p50);
                c["class"] = json!(class);
                c["fill"] = json!(class.map(|k| palette::hex(palette::class_fill(k))));
                c
            }
            None => missing_cell(),
        })
        .collect();
    json!({
        "rank": (rank + 1).to_string(),
        "site": site.name,
        "season": site.limiting_season(),
        "now": e.now_min.map_or_else(|| fmt::MISSING.to_string(), fmt::omega),
        "horizons": horizon_cells,
        "calc": calc_text(model, site, pathway_id, calc_name),
        "chemistry": e.chemistry.map_or_else(|| fmt::MISSING.to_string(), crossing_text),
        "heat": heat_text(e.heat, site.thermal.is_some()),
    })
}

/// A site's calcification change in the last horizon year under the ranking pathway, from the
/// relationship shown in the ranking table: "−12 %", with † when extrapolated.
fn calc_text(
    model: &ReportModel,
    site: &SiteReport,
    pathway_id: &str,
    calc_name: Option<&str>,
) -> String {
    let calc = site
        .calcification
        .iter()
        .find(|c| Some(c.relationship.as_str()) == calc_name);
    calc.and_then(|c| {
        let s = c.series.iter().find(|s| s.pathway == pathway_id)?;
        let y = *model.horizons.last()?;
        let pt = s.points.iter().find(|p| p.year == y)?;
        let mut t = fmt::calc(pt.value.p50, c.unit);
        if c.unit == CalcUnit::PercentChange {
            t.push_str(" %");
        }
        if pt.extrapolated {
            t.push_str(" †");
        }
        Some(t)
    })
    .unwrap_or_else(|| fmt::MISSING.to_string())
}

/// First year below each level, per site and pathway (limiting season, median): one row per
/// site and level, and the same grouped per site (`crossing_groups`: one row per site whose
/// cells hold one line per level, so that a site's rows never split over pages).
fn crossing_tables(model: &ReportModel, ranked: &[RankEntry]) -> (Vec<Value>, Vec<Value>) {
    let mut crossing_rows = Vec::new();
    let mut crossing_groups = Vec::new();
    for e in ranked {
        let site = &model.sites[e.site];
        let season = site.limiting_season().unwrap_or_default();
        let mut per_pathway: Vec<Vec<String>> = vec![Vec::new(); model.pathways.len()];
        for (li, level) in model.thresholds.levels.iter().enumerate() {
            let cells: Vec<String> = model
                .pathways
                .iter()
                .map(|p| {
                    site.crossing(&p.id, season, *level)
                        .map_or_else(|| fmt::MISSING.to_string(), |c| crossing_text(c.median))
                })
                .collect();
            for (k, c) in cells.iter().enumerate() {
                if let Some(col) = per_pathway.get_mut(k) {
                    col.push(c.clone());
                }
            }
            crossing_rows.push(json!({
                "site": site.name,
                "first": li == 0,
                "level": fmt::level(*level),
                "cells": cells,
            }));
        }
        crossing_groups.push(json!({
            "site": site.name,
            "season": season,
            "levels": model.thresholds.levels.iter().map(|l| fmt::level(*l)).collect::<Vec<_>>(),
            "cells": per_pathway,
        }));
    }
    (crossing_rows, crossing_groups)
}
