//! The exposure metrics of the site's sensor series ([`crate::outlook::exposure`]), as
//! sampled and with every reading projected on its own: the readings' values come from the
//! same per-record projections ([`super::central`]) that the seasonal means and the shares of
//! time below are built from, at each horizon year, under every pathway and scenario.

use std::collections::BTreeMap;

use chrono::{NaiveDate, NaiveDateTime};

use super::super::exposure::{
    Clock, DielCycle, ExposureError, ExposureGap, ExposureOutlook, ExposureRow, ExposureState,
    LevelExposure,
};
use super::super::projection::SamplingUnit;
use super::super::result::{GroupId, PathwayId, ScenarioId};
use super::central::{Central, OMEGA_AR, PCO2, PH_T, Values};
use super::prepare::Prepared;

/// One station's sensor series in one season: its clock and its records in time order.
struct Series {
    group: GroupId,
    /// Index into the outlook's station list.
    station: usize,
    clock: Clock,
    /// Indices into `site.records`, in time order.
    records: Vec<usize>,
}

/// Local date and time of a record's sampling unit (`None`: not a valid day).
fn local_time(u: &SamplingUnit) -> Option<NaiveDateTime> {
    let minute = u32::from(u.minute.unwrap_or(0));
    NaiveDate::from_num_days_from_ce_opt(u.day)?.and_hms_opt(minute / 60, minute % 60, 0)
}

/// The exposure metrics of every sensor series of the site.
pub(super) fn site_exposure(prep: &Prepared<'_>, centrals: &[Central]) -> ExposureOutlook {
    let site = prep.site;
    // Sensor records by (season, station number), with their local times.
    let mut by_series: BTreeMap<(usize, u32), Vec<(NaiveDateTime, usize)>> = BTreeMap::new();
    for (ri, r) in site.records.iter().enumerate() {
        let Some(u) = r.unit.as_ref().filter(|u| u.continuous) else {
            continue;
        };
        if let Some(t) = local_time(u) {
            by_series
                .entry((r.season, u.station))
                .or_default()
                .push((t, ri));
        }
    }
    let mut out = ExposureOutlook::default();
    let mut series = Vec::new();
    let mut numbers: Vec<u32> = Vec::new();
    for ((season, number), mut recs) in by_series {
        let group = GroupId::Season(season);
        if !prep.groups.iter().any(|g| g.id == group) {
            continue;
        }
        recs.sort_unstable();
        let station = match numbers.iter().position(|n| *n == number) {
            Some(i) => i,
            None => {
                numbers.push(number);
                out.stations.push(
                    site.stations
                        .get(number as usize)
                        .cloned()
                        .unwrap_or_else(|| format!("station {}", number + 1)),
                );
                numbers.len() - 1
            }
        };
        let times: Vec<NaiveDateTime> = recs.iter().map(|x| x.0).collect();
        match Clock::new(&times) {
            Ok(clock) => series.push(Series {
                group,
                station,
                clock,
                records: recs.iter().map(|x| x.1).collect(),
            }),
            Err(reason) => out.gaps.push(ExposureGap {
                group,
                station,
                reason,
            }),
        }
    }
    if series.is_empty() {
        out.unavailable = Some(
            out.gaps
                .first()
                .map_or(ExposureError::NotSubDaily, |g| g.reason.clone()),
        );
        return out;
    }
    let levels = prep.s.classes.thresholds();
    for s in &series {
        out.rows
            .push(row(ExposureState::AsSampled, s, &levels, |r| {
                prep.present.get(r)
            }));
    }
    for (p, central) in centrals.iter().enumerate() {
        for vi in 0..prep.variants.len() {
            let scenario = match vi.checked_sub(1) {
                None => ScenarioId::Base,
                Some(i) => ScenarioId::Local(i),
            };
            for (&year, &k) in prep.s.years.iter().zip(&prep.horizon_knot) {
                let state = ExposureState::Projected {
                    pathway: PathwayId(p),
                    scenario,
                    year,
                };
                for s in &series {
                    out.rows
                        .push(row(state, s, &levels, |r| central.get(vi, r, k)));
                }
            }
        }
    }
    out
}

/// The metrics of one series in one state, from each record's values.
fn row<'v>(
    state: ExposureState,
    s: &Series,
    levels: &[(String, f64)],
    values: impl Fn(usize) -> Option<&'v Values>,
) -> ExposureRow {
    let column = |i: usize| -> Vec<f64> {
        s.records
            .iter()
            .map(|&r| values(r).map_or(f64::NAN, |v| v[i]))
            .collect()
    };
    let (omega, ph, pco2) = (column(OMEGA_AR), column(PH_T), column(PCO2));
    let diel = |v: &[f64]| s.clock.diel_cycle(v).map(|x| x.unwrap_or(f64::NAN));
    let thresholds: Vec<f64> = levels.iter().map(|(_, t)| *t).collect();
    let below = levels
        .iter()
        .zip(s.clock.exposure(&omega, &thresholds))
        .map(|((class, t), e)| LevelExposure {
            class_left: class.clone(),
            threshold_omega_ar: *t,
            hours_per_day_below: e.hours_per_day_below,
            pct_time_below: 100.0 * e.share_below,
        })
        .collect();
    let minima = s.clock.daily_minima(&omega);
    let (sum, lowest) = minima
        .iter()
        .fold((0.0, f64::INFINITY), |(a, m), (_, v)| (a + v, m.min(*v)));
    ExposureRow {
        state,
        group: s.group,
        station: s.station,
        days: s.clock.complete_days(),
        diel: DielCycle {
            omega_ar: diel(&omega),
            ph_t: diel(&ph),
            pco2_uatm: diel(&pco2),
        },
        daily_min_omega_ar_mean: if minima.is_empty() {
            f64::NAN
        } else {
            sum / minima.len() as f64
        },
        daily_min_omega_ar_lowest: if minima.is_empty() { f64::NAN } else { lowest },
        below,
    }
}
