//! The thermal-stress part of the report model, read from the outlook stage's typed
//! [`SiteHeat`]: no number is computed here that `project --table heat` does not also give.

use chrono::Datelike;

use super::super::model::{HeatPoint, HeatSeries, MmmSource, ObservedDhw, ThermalOutlook};
use crate::outlook::Outlook;
use crate::outlook::thermal::output::{finding_text, source_text};
use crate::outlook::thermal::site::{MmmOrigin, SiteHeat};
use crate::outlook::thermal::{DHW_SEVERE, DHW_SIGNIFICANT};

/// The site's thermal outlook, when it has a temperature record.
pub(super) fn thermal(outlook: &Outlook) -> Option<ThermalOutlook> {
    outlook
        .heat
        .as_ref()
        .map(|h| from_heat(h, &outlook.settings.horizon_years))
}

fn from_heat(h: &SiteHeat, horizon_years: &[i32]) -> ThermalOutlook {
    // The onset is searched from the year after the record to the last horizon year (at
    // least that next year), as `thermal::site::site_heat` does.
    let searched_to = horizon_years
        .last()
        .copied()
        .unwrap_or(2100)
        .max(h.last_day.year() + 1);
    ThermalOutlook {
        record: source_text(&h.source),
        first_day: h.first_day.to_string(),
        last_day: h.last_day.to_string(),
        mmm_c: h.mmm_c,
        mmm_source: match &h.mmm_origin {
            MmmOrigin::Stated {
                source,
                base_period,
            } => MmmSource::Stated {
                source: source.clone(),
                base_period: *base_period,
            },
            MmmOrigin::Record { years } => MmmSource::Record { years: *years },
        },
        allowance_c_per_decade: h.allowance_c_per_decade,
        levels: [DHW_SIGNIFICANT, DHW_SEVERE],
        observed: h
            .outlook
            .observed
            .iter()
            .map(|(year, v)| ObservedDhw {
                year: *year,
                max_dhw: *v,
            })
            .collect(),
        pathways: h
            .outlook
            .pathways
            .iter()
            .map(|p| HeatSeries {
                pathway: p.name.clone(),
                points: p
                    .years
                    .iter()
                    .map(|y| HeatPoint {
                        year: y.year,
                        max_dhw: y.max_dhw_q,
                        significant_pct: 100.0 * y.share_significant,
                        severe_pct: 100.0 * y.share_severe,
                    })
                    .collect(),
                severe_most_years: p.onset_q,
                searched_to,
            })
            .collect(),
        findings: h.findings.iter().map(finding_text).collect(),
    }
}
