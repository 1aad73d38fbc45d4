//! Daily mean temperatures in local time from timed readings, with the completeness rule and
//! the gap rule of the module documentation.

use std::collections::BTreeSet;

use chrono::{Datelike, NaiveDate, NaiveDateTime, Timelike};

use super::{
    HeatError, HeatFinding, MAX_FILLED_GAP_DAYS, MIN_DAY_SHARE, MIN_HOURS_PER_DAY, TEMP_RANGE_C,
};

/// One reading: local date and time (the record's own offset), and whether the record gave a
/// time of day (date-only rows are daily values).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TimedTemp {
    pub local: NaiveDateTime,
    pub has_time: bool,
    pub temp_c: f64,
}

/// Daily means on consecutive local dates from `first`; `None` where a day is missing.
#[derive(Clone, Debug, PartialEq)]
pub struct DailySeries {
    pub first: NaiveDate,
    pub temp_c: Vec<Option<f64>>,
}

impl DailySeries {
    /// The date of day `i`.
    pub fn date(&self, i: usize) -> NaiveDate {
        self.first + chrono::Days::new(i as u64)
    }

    /// Days with a value.
    pub fn valid_days(&self) -> usize {
        self.temp_c.iter().filter(|t| t.is_some()).count()
    }
}

/// Daily means from readings in strictly increasing time order.
///
/// Sub-daily records: the median interval between readings decides the rule: hourly or finer
/// needs readings in [`MIN_HOURS_PER_DAY`] distinct clock hours, coarser needs
/// [`MIN_DAY_SHARE`] of the readings the interval implies. Date-only records give one value a
/// day. Gaps up to [`MAX_FILLED_GAP_DAYS`] are filled linearly; longer ones stay missing.
pub fn daily_means(readings: &[TimedTemp]) -> Result<(DailySeries, Vec<HeatFinding>), HeatError> {
    let first = readings.first().ok_or(HeatError::Empty)?;
    for (i, r) in readings.iter().enumerate() {
        if !(TEMP_RANGE_C.0..=TEMP_RANGE_C.1).contains(&r.temp_c) {
            return Err(HeatError::OutOfRange {
                index: i,
                temp_c: r.temp_c,
            });
        }
        if i > 0 && readings.get(i - 1).is_some_and(|p| p.local >= r.local) {
            return Err(HeatError::NotIncreasing { index: i });
        }
    }
    let sub_daily = readings.iter().any(|r| r.has_time);
    let interval_min = median_interval_minutes(readings);
    let start = first.local.date();
    let last = readings.last().map_or(start, |r| r.local.date());
    let n_days = (last - start).num_days().max(0) as usize + 1;
    let mut sums = vec![(0.0_f64, 0_usize, BTreeSet::new()); n_days];
    for r in readings {
        let d = (r.local.date() - start).num_days() as usize;
        if let Some(slot) = sums.get_mut(d) {
            slot.0 += r.temp_c;
            slot.1 += 1;
            slot.2.insert(r.local.hour());
        }
    }
    let mut findings = Vec::new();
    let mut incomplete = 0_usize;
    let mut first_incomplete = None;
    let mut temp_c: Vec<Option<f64>> = Vec::with_capacity(n_days);
    for (d, (sum, n, hours)) in sums.into_iter().enumerate() {
        let complete = if n == 0 {
            false
        } else if !sub_daily {
            true
        } else if interval_min <= 60.0 {
            hours.len() >= MIN_HOURS_PER_DAY
        } else {
            n as f64 >= MIN_DAY_SHARE * (1440.0 / interval_min)
        };
        if n > 0 && !complete {
            incomplete += 1;
            first_incomplete.get_or_insert(start + chrono::Days::new(d as u64));
        }
        temp_c.push(complete.then(|| sum / n as f64));
    }
    if let Some(first) = first_incomplete {
        findings.push(HeatFinding::IncompleteDays {
            days: incomplete,
            first,
        });
    }
    let mut series = DailySeries {
        first: start,
        temp_c,
    };
    fill_gaps(&mut series, &mut findings);
    Ok((series, findings))
}

/// Median spacing of consecutive readings in minutes (1440 for a single reading).
fn median_interval_minutes(readings: &[TimedTemp]) -> f64 {
    let mut gaps: Vec<f64> = readings
        .windows(2)
        .filter_map(|w| match w {
            [a, b] => Some((b.local - a.local).num_seconds() as f64 / 60.0),
            _ => None,
        })
        .collect();
    if gaps.is_empty() {
        return 1440.0;
    }
    gaps.sort_by(f64::total_cmp);
    gaps.get(gaps.len() / 2).copied().unwrap_or(1440.0)
}

/// Fills interior runs of missing days up to [`MAX_FILLED_GAP_DAYS`] long by linear
/// interpolation and reports every run, filled or not. Missing days at either end stay.
fn fill_gaps(series: &mut DailySeries, findings: &mut Vec<HeatFinding>) {
    let n = series.temp_c.len();
    let mut i = 0;
    while i < n {
        if series.temp_c.get(i).is_some_and(Option::is_some) {
            i += 1;
            continue;
        }
        let start = i;
        while i < n && series.temp_c.get(i).is_some_and(Option::is_none) {
            i += 1;
        }
        let len = i - start;
        let before = start
            .checked_sub(1)
            .and_then(|b| series.temp_c.get(b).copied().flatten());
        let after = series.temp_c.get(i).copied().flatten();
        let from = series.date(start);
        match (before, after) {
            (Some(a), Some(b)) if len <= MAX_FILLED_GAP_DAYS => {
                for k in 0..len {
                    let w = (k + 1) as f64 / (len + 1) as f64;
                    if let Some(slot) = series.temp_c.get_mut(start + k) {
                        *slot = Some(a + w * (b - a));
                    }
                }
                findings.push(HeatFinding::GapFilled { from, days: len });
            }
            (Some(_), Some(_)) => findings.push(HeatFinding::GapLeftOut { from, days: len }),
            _ => {} // leading or trailing: the record simply starts or ends there
        }
    }
}

/// Calendar year and month of day `i` (helper for the climatology).
pub(crate) fn year_month(series: &DailySeries, i: usize) -> (i32, u32) {
    let d = series.date(i);
    (d.year(), d.month())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(y: i32, m: u32, d: u32, h: u32) -> NaiveDateTime {
        NaiveDate::from_ymd_opt(y, m, d)
            .and_then(|d| d.and_hms_opt(h, 0, 0))
            .expect("valid test date")
    }

    fn hourly(day: u32, hours: &[u32], t: f64) -> Vec<TimedTemp> {
        hours
            .iter()
            .map(|&h| TimedTemp {
                local: at(2023, 1, day, h),
                has_time: true,
                temp_c: t,
            })
            .collect()
    }

    #[test]
    fn hourly_days_need_twenty_hours() {
        // Day 1: 24 hours at 28 °C; day 2: 19 hours (incomplete); day 3: 20 hours at 29 °C.
        let mut r = hourly(1, &(0..24).collect::<Vec<_>>(), 28.0);
        r.extend(hourly(2, &(0..19).collect::<Vec<_>>(), 30.0));
        r.extend(hourly(3, &(4..24).collect::<Vec<_>>(), 29.0));
        let (s, findings) = daily_means(&r).expect("valid");
        assert_eq!(s.temp_c.len(), 3);
        assert_eq!(s.temp_c[0], Some(28.0));
        // Day 2 is incomplete, then filled from its neighbours: (28 + 29) / 2.
        assert_eq!(s.temp_c[1], Some(28.5));
        assert_eq!(s.temp_c[2], Some(29.0));
        assert!(findings.contains(&HeatFinding::IncompleteDays {
            days: 1,
            first: NaiveDate::from_ymd_opt(2023, 1, 2).expect("date")
        }));
    }

    #[test]
    fn mean_of_a_day_is_the_arithmetic_mean() {
        // Worked: 24 readings alternating 27 and 29 °C average 28 °C.
        let r: Vec<TimedTemp> = (0..24)
            .map(|h| TimedTemp {
                local: at(2023, 3, 1, h),
                has_time: true,
                temp_c: if h % 2 == 0 { 27.0 } else { 29.0 },
            })
            .collect();
        let (s, _) = daily_means(&r).expect("valid");
        assert_eq!(s.temp_c, vec![Some(28.0)]);
    }

    #[test]
    fn short_gaps_fill_long_gaps_stay() {
        let day = |d: u32, t: f64| TimedTemp {
            local: at(2023, 5, d, 0),
            has_time: false,
            temp_c: t,
        };
        // 1 May 26 °C, gap of 3 days, 5 May 30 °C: filled 27, 28, 29.
        // 5 May to 10 May: a 4-day gap stays missing.
        let r = vec![day(1, 26.0), day(5, 30.0), day(10, 30.0)];
        let (s, f) = daily_means(&r).expect("valid");
        assert_eq!(
            &s.temp_c[..5],
            &[Some(26.0), Some(27.0), Some(28.0), Some(29.0), Some(30.0)]
        );
        assert!(s.temp_c[5..9].iter().all(Option::is_none));
        assert!(
            f.iter()
                .any(|x| matches!(x, HeatFinding::GapFilled { days: 3, .. }))
        );
        assert!(
            f.iter()
                .any(|x| matches!(x, HeatFinding::GapLeftOut { days: 4, .. }))
        );
    }

    #[test]
    fn out_of_order_and_out_of_range_are_refused() {
        let a = TimedTemp {
            local: at(2023, 1, 2, 0),
            has_time: true,
            temp_c: 28.0,
        };
        let b = TimedTemp {
            local: at(2023, 1, 1, 0),
            ..a
        };
        assert_eq!(
            daily_means(&[a, b]),
            Err(HeatError::NotIncreasing { index: 1 })
        );
        assert_eq!(
            daily_means(&[a, a]),
            Err(HeatError::NotIncreasing { index: 1 })
        );
        let hot = TimedTemp { temp_c: 41.0, ..a };
        let msg = daily_means(&[hot]).expect_err("41 °C refused").to_string();
        assert!(
            msg.contains("41") && msg.contains("outside -2–40 °C"),
            "{msg}"
        );
    }

    #[test]
    fn three_hourly_loggers_need_twenty_of_twentyfour_hours_share() {
        // Every 3 h implies 8 readings a day; 7 readings (87.5 %) pass, 6 (75 %) do not.
        let mk = |d: u32, hs: &[u32]| -> Vec<TimedTemp> {
            hs.iter()
                .map(|&h| TimedTemp {
                    local: at(2023, 2, d, h),
                    has_time: true,
                    temp_c: 28.0,
                })
                .collect()
        };
        let mut r = mk(1, &[0, 3, 6, 9, 12, 15, 18, 21]);
        r.extend(mk(2, &[0, 3, 6, 9, 12, 15, 18]));
        r.extend(mk(3, &[0, 3, 6, 9, 12, 15]));
        r.extend(mk(10, &[0, 3, 6, 9, 12, 15, 18, 21]));
        let (s, _) = daily_means(&r).expect("valid");
        assert!(s.temp_c[0].is_some() && s.temp_c[1].is_some());
        assert!(s.temp_c[2].is_none(), "75 % of the day is too little");
    }
}
