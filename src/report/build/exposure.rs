//! The exposure part of the report model, read from the outlook stage's typed exposure
//! result (base case only): no number is computed here that `project --table exposure` and
//! `--table diel` do not also give.

use super::super::model::{ExposureSeries, ExposureUnavailable, HoursBelow, SiteExposure};
use crate::outlook::exposure::{ExposureError, ExposureState};
use crate::outlook::{GroupId, Outlook, ScenarioId};

/// The site's exposure metrics, or why it has none.
pub(super) fn exposure(outlook: &Outlook) -> SiteExposure {
    let e = &outlook.exposure;
    SiteExposure {
        unavailable: e.unavailable.as_ref().map(|r| match r {
            ExposureError::NotSubDaily => ExposureUnavailable::NeedsSubDaily,
            ExposureError::NoCompleteDay => ExposureUnavailable::NoCompleteDay,
        }),
        stations: e.stations.clone(),
        series: e
            .rows
            .iter()
            .filter_map(|r| {
                let (pathway, year) = match r.state {
                    ExposureState::AsSampled => (None, None),
                    ExposureState::Projected {
                        pathway,
                        scenario: ScenarioId::Base,
                        year,
                    } => (Some(outlook.pathway(pathway)?.name.clone()), Some(year)),
                    ExposureState::Projected { .. } => return None,
                };
                let GroupId::Season(_) = r.group else {
                    return None;
                };
                Some(ExposureSeries {
                    pathway,
                    year,
                    season: outlook.group_label(r.group).to_string(),
                    station: e.station_name(r.station).to_string(),
                    days: r.days,
                    diel_omega_ar: r.diel.omega_ar.to_vec(),
                    daily_min_omega_ar: r.daily_min_omega_ar_mean,
                    hours_below: r
                        .below
                        .iter()
                        .map(|l| HoursBelow {
                            threshold: l.threshold_omega_ar,
                            hours_per_day: l.hours_per_day_below,
                        })
                        .collect(),
                })
            })
            .collect(),
    }
}
