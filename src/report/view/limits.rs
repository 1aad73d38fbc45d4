//! The first page's two answers about the limiting season, kept apart:
//! - **uncertainty**: the year its mean Ω_ar falls below each class limit, per pathway, as the
//!   median year and the range within which 90 % of the ensemble members cross;
//! - **variability**: the share of time the water is below the key level, as sampled and at
//!   the horizon years (each record projected on its own).

use serde_json::{Value, json};

use super::crossing_text;
use crate::report::fmt;
use crate::report::model::{CrossingYear, ReportModel, SiteReport};
use crate::report::ranking::KEY_OMEGA_LEVEL;

/// A crossing as "median (early–late)", the range left out when it says nothing more.
fn crossing_with_range(median: CrossingYear, early: CrossingYear, late: CrossingYear) -> String {
    let m = crossing_text(median);
    if early == median && late == median {
        return m;
    }
    let range = match (early, late) {
        (CrossingYear::Year(a), CrossingYear::Year(b)) => {
            fmt::range(&a.to_string(), &b.to_string())
        }
        (CrossingYear::AlreadyBelow, CrossingYear::Year(b)) => format!("now–{b}"),
        (CrossingYear::Year(a), CrossingYear::NotBy(b)) => format!("{a}–after {b}"),
        (CrossingYear::AlreadyBelow, CrossingYear::NotBy(b)) => format!("now–after {b}"),
        _ => return m,
    };
    format!("{m} ({range})")
}

/// Per class limit (high to low), per pathway: the year the limiting season's mean falls
/// below it.
fn crossing_rows(model: &ReportModel, site: &SiteReport, season: &str) -> Vec<Value> {
    model
        .thresholds
        .levels
        .iter()
        .map(|&level| {
            let cells: Vec<String> = model
                .pathways
                .iter()
                .map(|p| {
                    site.crossing(&p.id, season, level).map_or_else(
                        || fmt::MISSING.to_string(),
                        |c| crossing_with_range(c.median, c.early, c.late),
                    )
                })
                .collect();
            json!({ "level": fmt::level(level), "cells": cells })
        })
        .collect()
}

/// The share of time below `level` in `season`: as sampled, then per pathway at each
/// horizon year.
fn time_rows(model: &ReportModel, site: &SiteReport, season: &str, level: f64) -> Value {
    let pct = |pathway: Option<&str>, year: Option<i32>| {
        site.time_below
            .iter()
            .find(|t| {
                t.pathway.as_deref() == pathway
                    && t.year == year
                    && t.season == season
                    && t.threshold == level
            })
            .map_or_else(
                || fmt::MISSING.to_string(),
                |t| format!("{} %", fmt::number(t.percent, 0)),
            )
    };
    json!({
        "now": pct(None, None),
        "rows": model.pathways.iter().map(|p| json!({
            "pathway": p.label,
            "cells": model.horizons.iter().map(|&y| pct(Some(&p.id), Some(y))).collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
    })
}

/// The page-1 block of one site (`null` without a limiting season).
pub(super) fn limits_view(model: &ReportModel, site: &SiteReport) -> Value {
    let Some(season) = site.limiting_season() else {
        return Value::Null;
    };
    json!({
        "season": season,
        "pathways": model.pathways.iter().map(|p| p.label.clone()).collect::<Vec<_>>(),
        "crossings": crossing_rows(model, site, season),
        "key_level": fmt::level(KEY_OMEGA_LEVEL),
        "time_below": time_rows(model, site, season, KEY_OMEGA_LEVEL),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Worked cases of the wording: a range only where it adds something.
    #[test]
    fn crossing_ranges_read_plainly() {
        use CrossingYear::*;
        assert_eq!(
            crossing_with_range(Year(2057), Year(2049), Year(2068)),
            "2057 (2049–2068)"
        );
        assert_eq!(
            crossing_with_range(NotBy(2100), NotBy(2100), NotBy(2100)),
            "not by 2100"
        );
        assert_eq!(
            crossing_with_range(Year(2090), Year(2071), NotBy(2100)),
            "2090 (2071–after 2100)"
        );
        assert_eq!(
            crossing_with_range(AlreadyBelow, AlreadyBelow, Year(2031)),
            "already below (now–2031)"
        );
    }
}
