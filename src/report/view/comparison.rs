//! The comparison page: the ranking table, its criteria and the first year below each level
//! per site, in the order [`rank_sites`] gives.

use serde_json::{Value, json};

use super::basis::{like_for_like, limiting_months, months_span, plan_row, season_years};
use super::thermal::{heat_text, key_level, key_years};
use super::{crossing_text, fig, missing_cell, quant_cell};
use crate::report::figures::ReportFigures;
use crate::report::fmt;
use crate::report::model::{CalcUnit, CrossingYear, ReportModel, SiteReport};
use crate::report::palette;
use crate::report::ranking::{
    RankEntry, Z_95, chance_below, limiting_omega, rank_sites, ranking_pathway,
};

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
    // The end year: the plans' (one heading when every site shares it), then the long
    // horizons after it (the last two).
    let end_years: Vec<Option<i32>> = ranked.iter().map(|e| e.end_year).collect();
    let shared_end = end_years.first().copied().flatten().filter(|y| {
        end_years.iter().all(|e| *e == Some(*y))
            && ranked
                .iter()
                .all(|e| model.sites[e.site].plan.end_year == Some(*y))
    });
    let latest_end = end_years.iter().flatten().max().copied();
    let mut late: Vec<i32> = model
        .horizons
        .iter()
        .copied()
        .filter(|y| latest_end.is_none_or(|end| *y > end))
        .rev()
        .take(2)
        .collect();
    late.reverse();
    let rows: Vec<Value> = ranked
        .iter()
        .map(|e| ranking_row(model, e, pathway_id, &late, first_calc_name.as_deref()))
        .collect();
    let (crossing_rows, crossing_groups) = crossing_tables(model, &ranked);
    let level = key_level();
    let z = fmt::number(Z_95, 3);
    let criteria = vec![
        format!(
            "Order under {pathway_name}: a site whose first limit (the earlier of the year the \
             median Ω_ar of its limiting season falls below {level} and the year DHW ≥ 8 \
             °C-weeks is reached in most years, median) comes by its project's end year ranks \
             after the others; then the median Ω_ar of the limiting season at the end year, \
             higher first. Chemistry and heat count alike: whichever limits a site first decides."
        ),
        format!(
            "Ties (“=1”): two sites share a rank when their end-year medians differ by less than \
             their uncertainty supports: by less than {z} × √(s₁² + s₂²), s = (95 % value − 5 % \
             value) / {} for each site, i.e. the 90 % range of the difference includes zero (the \
             sites' uncertainties taken as independent). Tied sites are listed by the later \
             first limit, then the median in {last}.",
            fmt::number(2.0 * Z_95, 2)
        ),
        format!(
            "A site missing either year (no temperature record, or no crossing of that level \
             computed) ranks after the sites with both: missing information never lifts a site. \
             Shown for context, not used for the order: the later horizon years and {}.",
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
        "end_header": shared_end.map_or_else(
            || ["at plan".to_string(), "end".to_string()],
            |y| [y.to_string(), "(plan end)".to_string()],
        ),
        "end_year": shared_end.map(|y| y.to_string()),
        "late_horizons": late.iter().map(|y| y.to_string()).collect::<Vec<_>>(),
        "plans": ranked.iter().map(|e| plan_row(&model.sites[e.site])).collect::<Vec<_>>(),
        "basis_sentence": like_for_like(model, &ranked),
        "rule_summary": format!(
            "Under {pathway_name}, a site whose first limit (Ω_ar of its limiting season below \
             {level}, or DHW ≥ 8 °C-weeks in most years) comes by its project's end year ranks \
             after the others; then the higher median Ω_ar at the end year ranks first. “=1”: \
             end-year medians closer than their uncertainty supports share a rank. The full rule \
             is under Site comparison."
        ),
        "figures": figures.comparison.iter().map(fig).collect::<Vec<_>>(),
        "key_figure": figures.comparison_key.as_ref().map(fig),
    })
}

/// One row of the ranking table: shared rank, site, present-day minimum with its years, the
/// end-year cell and the chance below the key level there, the later horizon cells under the
/// ranking pathway, the first limit and the calcification change of the first relationship in
/// the last year.
fn ranking_row(
    model: &ReportModel,
    e: &RankEntry,
    pathway_id: &str,
    late: &[i32],
    calc_name: Option<&str>,
) -> Value {
    let site = &model.sites[e.site];
    let cell = |y: i32| match limiting_omega(site, pathway_id, y) {
        Some(q) => {
            let mut c = quant_cell(&q, fmt::omega);
            let class = super::omega_class(model, q.p50);
            c["class"] = json!(class);
            c["fill"] = json!(class.map(|k| palette::hex(palette::class_fill(k))));
            c
        }
        None => missing_cell(),
    };
    let mut end = e.end_year.map_or_else(missing_cell, cell);
    // A site whose end year differs from the heading's says which year it is.
    if site.plan.end_year != e.end_year || e.end_year.is_none() {
        end["year"] = json!(e.end_year.map(|y| y.to_string()));
    }
    let chance = e
        .end_year
        .and_then(|y| chance_below(site, pathway_id, y))
        .map_or_else(
            || fmt::MISSING.to_string(),
            |p| format!("{} %", fmt::number(p, 0)),
        );
    let first = first_limit_text(e.chemistry, e.heat, site.thermal.is_some());
    json!({
        "rank": if e.tied { format!("={}", e.rank) } else { e.rank.to_string() },
        "site": site.name,
        "season": site.limiting_season(),
        "months": months_span(&limiting_months(site)),
        "now": e.now_min.map_or_else(|| fmt::MISSING.to_string(), fmt::omega),
        "now_years": season_years(site),
        "end": end,
        "chance": chance,
        "horizons": late.iter().map(|&y| cell(y)).collect::<Vec<_>>(),
        "first_limit": first,
        "in_project": e.limited_in_project,
        "calc": calc_text(model, site, pathway_id, calc_name),
        "chemistry": e.chemistry.map_or_else(|| fmt::MISSING.to_string(), crossing_text),
        "heat": heat_text(e.heat, site.thermal.is_some()),
    })
}

/// The first limit under the ranking pathway in words: "2025 (Ω_ar)", "2056 (heat)", "not by
/// 2100", with what is missing when a year is.
pub(super) fn first_limit_text(
    chemistry: Option<CrossingYear>,
    heat: Option<CrossingYear>,
    has_record: bool,
) -> String {
    let (Some(chem), Some(heat)) = (chemistry, heat) else {
        return match chemistry {
            None => "no Ω_ar crossing computed".to_string(),
            Some(_) => heat_text(None, has_record),
        };
    };
    let order = |c: CrossingYear| match c {
        CrossingYear::AlreadyBelow => (0, 0),
        CrossingYear::Year(y) => (1, y),
        CrossingYear::NotBy(_) => (2, 0),
    };
    let (year, what) = if order(chem) <= order(heat) {
        (chem, "Ω_ar")
    } else {
        (heat, "heat")
    };
    match year {
        CrossingYear::NotBy(_) => crossing_text(year),
        _ => format!("{} ({what})", crossing_text(year)),
    }
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
