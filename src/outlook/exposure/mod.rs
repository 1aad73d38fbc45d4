//! Exposure metrics of a sub-daily series (a sensor at one station): the mean diel cycle by
//! local hour, the daily minimum, the hours per day below a level and the time-weighted share
//! of time below it. They answer "how much of the time is the water below a level", the
//! variability question, as opposed to the uncertainty of a seasonal mean.
//!
//! Between two readings the value is taken to change linearly, so the time below a level is
//! found from the crossing points (exact for a series that is linear between its readings).
//! Intervals longer than [`MAX_STEP_FACTOR`] times the series' median interval are gaps and
//! count towards nothing. An interval belongs to the local day in which it starts. Only days
//! with readings in at least [`MIN_HOURS_PER_DAY`] distinct clock hours enter the daily
//! figures (the same completeness rule as the thermal outlook's daily means).
//!
//! Files: this one holds the metrics of one series ([`Clock`]: the timing worked out once,
//! then evaluated for the readings as sampled and for each projection of them); [`result`]
//! the typed exposure of a site (per state, season and station) that
//! `ensemble::exposure` fills from the records each projected on its own; [`output`] its
//! CSV and JSON views.

use std::collections::BTreeMap;

use chrono::{NaiveDate, NaiveDateTime, Timelike};

pub use super::thermal::MIN_HOURS_PER_DAY;

/// An interval longer than this many median intervals is a gap in the record.
pub const MAX_STEP_FACTOR: f64 = 3.0;

/// One reading at local time.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Reading {
    pub local: NaiveDateTime,
    pub value: f64,
}

/// The exposure of one series to one level.
#[derive(Clone, Debug, PartialEq)]
pub struct Exposure {
    /// Mean hours per complete day below the level.
    pub hours_per_day_below: f64,
    /// Time-weighted share of the covered time below the level (0–1).
    pub share_below: f64,
    /// Complete days the daily figure is averaged over.
    pub days: usize,
}

/// Why a series cannot give exposure metrics.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ExposureError {
    /// Fewer than two readings, or readings only once a day or less often: the metrics need
    /// sub-daily data.
    NotSubDaily,
    /// No day has readings in [`MIN_HOURS_PER_DAY`] clock hours.
    NoCompleteDay,
}

impl std::fmt::Display for ExposureError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ExposureError::NotSubDaily => f.write_str(
                "hours below a level need sub-daily data (a sensor series); bottle samples cannot give them",
            ),
            ExposureError::NoCompleteDay => write!(
                f,
                "no day has readings in {MIN_HOURS_PER_DAY} or more clock hours"
            ),
        }
    }
}

impl std::error::Error for ExposureError {}

pub mod output;
pub mod result;

pub use result::{
    DielCycle, ExposureGap, ExposureOutlook, ExposureRow, ExposureState, LevelExposure,
};

/// Median spacing of consecutive times, hours.
fn median_step_hours(t: &[NaiveDateTime]) -> Option<f64> {
    let mut steps: Vec<f64> = t
        .windows(2)
        .filter_map(|w| match w {
            [a, b] => Some((*b - *a).num_seconds() as f64 / 3600.0),
            _ => None,
        })
        .filter(|s| *s > 0.0)
        .collect();
    steps.sort_by(f64::total_cmp);
    steps.get(steps.len() / 2).copied()
}

/// Hours below `level` within one linear interval of `dt` hours from `a` to `b`.
fn below_in_interval(a: f64, b: f64, dt: f64, level: f64) -> f64 {
    match (a < level, b < level) {
        (true, true) => dt,
        (false, false) => 0.0,
        _ => {
            // The crossing lies at fraction f of the interval.
            let f = (level - a) / (b - a);
            if a < level { f * dt } else { (1.0 - f) * dt }
        }
    }
}

/// The timing of one series, worked out once: its intervals that are not gaps and its local
/// days with their completeness. Every set of values at these times (the readings as
/// sampled, or each projection of them) is then evaluated on it.
#[derive(Clone, Debug)]
pub struct Clock {
    /// Local clock hour (0–23) of each reading.
    hour: Vec<usize>,
    /// Index into `days` of each reading.
    day_of: Vec<usize>,
    /// (first reading of the interval, its length in hours) for every interval that is not a
    /// gap; the second reading is the next one.
    intervals: Vec<(usize, f64)>,
    /// The local days of the series, ascending, and whether each is complete.
    days: Vec<(NaiveDate, bool)>,
}

impl Clock {
    /// The clock of readings at local times `t` (increasing order).
    pub fn new(t: &[NaiveDateTime]) -> Result<Clock, ExposureError> {
        let step = median_step_hours(t).ok_or(ExposureError::NotSubDaily)?;
        if step >= 24.0 {
            return Err(ExposureError::NotSubDaily);
        }
        let mut masks: BTreeMap<NaiveDate, u32> = BTreeMap::new();
        for x in t {
            *masks.entry(x.date()).or_insert(0) |= 1 << x.hour();
        }
        let days: Vec<(NaiveDate, bool)> = masks
            .into_iter()
            .map(|(d, m)| (d, m.count_ones() as usize >= MIN_HOURS_PER_DAY))
            .collect();
        if !days.iter().any(|(_, ok)| *ok) {
            return Err(ExposureError::NoCompleteDay);
        }
        let day_of = t
            .iter()
            .map(|x| days.partition_point(|(d, _)| *d < x.date()))
            .collect();
        let intervals = t
            .windows(2)
            .enumerate()
            .filter_map(|(i, w)| {
                let [a, b] = w else { return None };
                let dt = (*b - *a).num_seconds() as f64 / 3600.0;
                (dt > 0.0 && dt <= MAX_STEP_FACTOR * step).then_some((i, dt))
            })
            .collect();
        Ok(Clock {
            hour: t.iter().map(|x| x.hour() as usize).collect(),
            day_of,
            intervals,
            days,
        })
    }

    /// Complete days of the series.
    pub fn complete_days(&self) -> usize {
        self.days.iter().filter(|(_, ok)| *ok).count()
    }

    /// Hours per day below each of `levels` and the share of time below it, for `values`
    /// at the clock's times. An interval with a value that is not finite counts for nothing.
    pub fn exposure(&self, values: &[f64], levels: &[f64]) -> Vec<Exposure> {
        let nd = self.days.len();
        let mut per_day = vec![0.0; nd * levels.len()];
        let mut below = vec![0.0; levels.len()];
        let mut covered = 0.0;
        for &(i, dt) in &self.intervals {
            let (Some(&a), Some(&b), Some(&d)) =
                (values.get(i), values.get(i + 1), self.day_of.get(i))
            else {
                continue;
            };
            if !(a.is_finite() && b.is_finite()) {
                continue;
            }
            covered += dt;
            for (l, &level) in levels.iter().enumerate() {
                let h = below_in_interval(a, b, dt, level);
                below[l] += h;
                if let Some(x) = per_day.get_mut(l * nd + d) {
                    *x += h;
                }
            }
        }
        let days = self.complete_days();
        levels
            .iter()
            .enumerate()
            .map(|(l, _)| {
                let sum: f64 = self
                    .days
                    .iter()
                    .enumerate()
                    .filter(|(_, (_, ok))| *ok)
                    .map(|(d, _)| per_day.get(l * nd + d).copied().unwrap_or(0.0))
                    .sum();
                Exposure {
                    hours_per_day_below: sum / days.max(1) as f64,
                    share_below: if covered > 0.0 {
                        below.get(l).copied().unwrap_or(0.0) / covered
                    } else {
                        f64::NAN
                    },
                    days,
                }
            })
            .collect()
    }

    /// The mean of the finite values in each local clock hour (0–23); `None` for an hour
    /// without any.
    pub fn diel_cycle(&self, values: &[f64]) -> [Option<f64>; 24] {
        mean_by_hour(
            self.hour
                .iter()
                .copied()
                .zip(values.iter().copied())
                .filter(|(_, v)| v.is_finite()),
        )
    }

    /// The lowest finite value of each complete day.
    pub fn daily_minima(&self, values: &[f64]) -> Vec<(NaiveDate, f64)> {
        let mut min = vec![f64::INFINITY; self.days.len()];
        for (&d, &v) in self.day_of.iter().zip(values) {
            if let Some(m) = min.get_mut(d)
                && v.is_finite()
            {
                *m = m.min(v);
            }
        }
        self.days
            .iter()
            .zip(min)
            .filter(|((_, ok), m)| *ok && m.is_finite())
            .map(|((d, _), m)| (*d, m))
            .collect()
    }
}

fn split(r: &[Reading]) -> (Vec<NaiveDateTime>, Vec<f64>) {
    r.iter().map(|x| (x.local, x.value)).unzip()
}

/// Hours per day below `level` and the share of time below it, for readings in increasing
/// time order.
pub fn exposure(r: &[Reading], level: f64) -> Result<Exposure, ExposureError> {
    let (t, v) = split(r);
    Clock::new(&t)?
        .exposure(&v, &[level])
        .into_iter()
        .next()
        .ok_or(ExposureError::NoCompleteDay)
}

/// The mean of the readings in each local clock hour (0–23); `None` for an hour without any.
pub fn diel_cycle(r: &[Reading]) -> [Option<f64>; 24] {
    mean_by_hour(r.iter().map(|x| (x.local.hour() as usize, x.value)))
}

/// The mean of the values of each clock hour (0–23); `None` for an hour without any.
fn mean_by_hour(pairs: impl Iterator<Item = (usize, f64)>) -> [Option<f64>; 24] {
    let mut sum = [0.0_f64; 24];
    let mut n = [0_usize; 24];
    for (h, v) in pairs {
        if let (Some(s), Some(c)) = (sum.get_mut(h), n.get_mut(h)) {
            *s += v;
            *c += 1;
        }
    }
    std::array::from_fn(|h| (n[h] > 0).then(|| sum[h] / n[h] as f64))
}

/// The lowest reading of each complete day (none when the series is not sub-daily).
pub fn daily_minima(r: &[Reading]) -> Vec<(NaiveDate, f64)> {
    let (t, v) = split(r);
    Clock::new(&t).map_or_else(|_| Vec::new(), |c| c.daily_minima(&v))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn series(days: i64, step_min: i64, f: impl Fn(f64) -> f64) -> Vec<Reading> {
        let start = NaiveDate::from_ymd_opt(2024, 3, 1)
            .and_then(|d| d.and_hms_opt(0, 0, 0))
            .expect("date");
        (0..days * 24 * 60 / step_min)
            .map(|k| {
                let local = start + chrono::Duration::minutes(k * step_min);
                let hours = (k * step_min) as f64 / 60.0;
                Reading {
                    local,
                    value: f(hours),
                }
            })
            .collect()
    }

    /// Worked: Ω(t) = 3.2 + 0.4 sin(2πt/24 h) is below 3.0 when sin < −1/2, i.e. for a third
    /// of each cycle (7π/6 to 11π/6): 8 hours a day and a share of 1/3. Sampled every
    /// 10 minutes, the linear interpolation between readings is within 0.01 h of that.
    #[test]
    fn sinusoid_gives_the_analytic_hours_below() {
        let r = series(10, 10, |h| {
            3.2 + 0.4 * (2.0 * std::f64::consts::PI * h / 24.0).sin()
        });
        let e = exposure(&r, 3.0).expect("sub-daily");
        assert!((e.hours_per_day_below - 8.0).abs() < 0.01, "{e:?}");
        assert!((e.share_below - 1.0 / 3.0).abs() < 0.001, "{e:?}");
        // The last day's final interval is not in the series: 10 complete days.
        assert_eq!(e.days, 10);
        // Below 2.8 (the minimum) never; below 3.6 (the maximum) always.
        assert_eq!(exposure(&r, 2.79).expect("ok").hours_per_day_below, 0.0);
        assert!((exposure(&r, 3.61).expect("ok").share_below - 1.0).abs() < 1e-12);
    }

    /// Worked: for a level at a fraction p of a linear rise from a to b, the time below is p of
    /// the interval.
    #[test]
    fn crossing_inside_an_interval() {
        assert!((below_in_interval(3.0, 4.0, 2.0, 3.25) - 0.5).abs() < 1e-12);
        assert!((below_in_interval(4.0, 3.0, 2.0, 3.25) - 0.5).abs() < 1e-12);
        assert_eq!(below_in_interval(2.0, 2.5, 1.0, 3.0), 1.0);
        assert_eq!(below_in_interval(3.5, 3.9, 1.0, 3.0), 0.0);
    }

    #[test]
    fn diel_cycle_and_daily_minimum() {
        // Hourly readings equal to the hour of day: the cycle is 0..23 and each minimum 0.
        let r = series(3, 60, |h| h % 24.0);
        let c = diel_cycle(&r);
        assert_eq!(c[0], Some(0.0));
        assert_eq!(c[23], Some(23.0));
        let m = daily_minima(&r);
        assert_eq!(m.len(), 3);
        assert!(m.iter().all(|(_, v)| *v == 0.0));
    }

    #[test]
    fn bottles_are_not_sub_daily() {
        let r = series(30, 24 * 60, |_| 3.5);
        assert_eq!(exposure(&r, 3.0), Err(ExposureError::NotSubDaily));
        assert_eq!(exposure(&r[..1], 3.0), Err(ExposureError::NotSubDaily));
        assert!(
            ExposureError::NotSubDaily
                .to_string()
                .contains("need sub-daily data")
        );
    }

    #[test]
    fn gaps_count_for_nothing() {
        // Two days of 10-minute data below the level with a 12-hour hole in the middle of day 1.
        let mut r = series(2, 10, |_| 2.5);
        r.retain(|x| {
            !(x.local.date().to_string() == "2024-03-01" && (6..18).contains(&x.local.hour()))
        });
        let e = exposure(&r, 3.0).expect("ok");
        // Day 1 has only 12 clock hours: incomplete, so only day 2 counts, fully below.
        assert_eq!(e.days, 1);
        assert!(
            (e.hours_per_day_below - (24.0 - 1.0 / 6.0)).abs() < 1e-9,
            "{e:?}"
        );
        assert!((e.share_below - 1.0).abs() < 1e-12);
    }
}
