//! The exposure part of the view: the section of one site (the diel-cycle figure and the
//! hours per day below the key level per season, or one plain sentence when the site has no
//! sub-daily data) and the first page's line (hours per day below the key level in the
//! limiting season, as sampled and at the horizon years). Variability, not uncertainty.

use serde_json::{Value, json};

use super::fig;
use crate::report::figures::{Figure, diel_pick};
use crate::report::fmt;
use crate::report::model::{ExposureSeries, ExposureUnavailable, ReportModel, SiteReport};
use crate::report::ranking::KEY_OMEGA_LEVEL;

/// Hours per day below the key level, as printed ("2.4"; a dash when missing).
fn hours_number(s: Option<&ExposureSeries>) -> String {
    s.and_then(|s| s.hours(KEY_OMEGA_LEVEL))
        .filter(|h| h.is_finite())
        .map_or_else(|| fmt::MISSING.to_string(), |h| fmt::number(h, 1))
}

/// Hours per day below the key level with the unit ("2.4 h"; a dash when missing).
fn hours_text(s: Option<&ExposureSeries>) -> String {
    let n = hours_number(s);
    if n == fmt::MISSING {
        n
    } else {
        format!("{n} h")
    }
}

/// Why a site has no exposure metrics, as one plain sentence.
fn unavailable_text(u: ExposureUnavailable) -> &'static str {
    match u {
        ExposureUnavailable::NeedsSubDaily => {
            "The hours per day below a level and the diel cycle need sub-daily data from a \
             sensor series; this site has bottle samples only, so they are not given."
        }
        ExposureUnavailable::NoCompleteDay => {
            "The hours per day below a level and the diel cycle need sub-daily data; no day of \
             this site's sensor series has readings in 18 or more clock hours, so they are not \
             given."
        }
    }
}

/// The exposure section of one site (`null` when no exposure was evaluated).
pub(super) fn exposure_view(
    model: &ReportModel,
    site: &SiteReport,
    figure: Option<&Figure>,
) -> Value {
    let e = &site.exposure;
    if let Some(u) = e.unavailable {
        return json!({ "unavailable": unavailable_text(u) });
    }
    if e.series.is_empty() {
        return Value::Null;
    }
    let mut rows = Vec::new();
    for p in &model.pathways {
        let mut first = true;
        for station in &e.stations {
            for b in &site.baseline {
                let season = b.season.as_str();
                let Some(now) = e.find(None, None, season, station) else {
                    continue;
                };
                rows.push(json!({
                    "pathway": p.label,
                    "first": first,
                    "station": station,
                    "season": season,
                    "limiting": Some(season) == site.limiting_season(),
                    "now": hours_text(Some(now)),
                    "days": now.days.to_string(),
                    "cells": model.horizons.iter().map(|&y| {
                        hours_text(e.find(Some(&p.id), Some(y), season, station))
                    }).collect::<Vec<_>>(),
                }));
                first = false;
            }
        }
    }
    let pick = diel_pick(model, site).map(|k| {
        json!({
            "season": k.season,
            "station": k.station,
            "pathway": k.pathway.label,
            "years": k.years.iter().map(i32::to_string).collect::<Vec<_>>().join(" and "),
        })
    });
    json!({
        "unavailable": null,
        "key_level": fmt::level(KEY_OMEGA_LEVEL),
        "stations": e.stations.join(", "),
        "rows": rows,
        "pick": pick,
        "figure": figure.map(fig),
    })
}

/// The first page's line: hours per day below the key level in the limiting season at the
/// first station with a sensor series in it, as sampled and at every table year under the
/// pathway of the diel figure (the ranking pathway; every pathway is in the section's table).
/// One line, so that the first page keeps its caution box; `null` for a site without a
/// sensor series.
pub(super) fn page1_view(model: &ReportModel, site: &SiteReport) -> Value {
    let Some(pick) = diel_pick(model, site) else {
        return Value::Null;
    };
    let e = &site.exposure;
    let find = |p: Option<&str>, y: Option<i32>| e.find(p, y, pick.season, pick.station);
    let cells: Vec<String> = model
        .horizons
        .iter()
        .map(|&y| {
            format!(
                "{y} {}",
                hours_number(find(Some(&pick.pathway.id), Some(y)))
            )
        })
        .collect();
    json!({
        "season": pick.season,
        "station": pick.station,
        "pathway": pick.pathway.label,
        "key_level": fmt::level(KEY_OMEGA_LEVEL),
        "now": hours_number(find(None, None)),
        "cells": cells.join(", "),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    /// The example's first site has a sensor series: a line with every table year. A site
    /// with bottle samples only gets the plain sentence and no line.
    #[test]
    fn page_line_and_bottle_sentence() {
        let model = example_model(2);
        let v = page1_view(&model, &model.sites[0]);
        assert_ne!(v, Value::Null);
        // One "year hours" pair per table year (2030, 2050, 2100 in the example).
        let cells = v["cells"].as_str().unwrap();
        assert_eq!(cells.split(", ").count(), model.horizons.len(), "{cells}");
        assert!(cells.starts_with("2030 "), "{cells}");
        let s = exposure_view(&model, &model.sites[1], None);
        assert!(
            s["unavailable"]
                .as_str()
                .is_some_and(|t| t.contains("need sub-daily data")),
            "{s}"
        );
        assert_eq!(page1_view(&model, &model.sites[1]), Value::Null);
    }
}
