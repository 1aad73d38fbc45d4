//! The monthly climatology and its maximum monthly mean (MMM), HotSpots, Degree Heating Weeks
//! and the annual maximum DHW (definitions and sources in the module documentation).

use chrono::Datelike;

use super::daily::{DailySeries, year_month};
use super::{
    DHW_WINDOW_DAYS, HOTSPOT_MIN_C, HeatError, HeatFinding, MIN_DAYS_PER_MONTH, MIN_YEAR_SHARE,
};

/// The record's monthly climatology.
#[derive(Clone, Debug, PartialEq)]
pub struct Climatology {
    /// Mean over years of each calendar month's mean (January first), °C; `None` where no
    /// year had [`MIN_DAYS_PER_MONTH`] daily means in that month.
    pub monthly_c: [Option<f64>; 12],
    /// Years contributing to each month.
    pub years_per_month: [usize; 12],
    /// The maximum monthly mean, °C, and its month (1–12).
    pub mmm_c: f64,
    pub mmm_month: u32,
}

/// The climatology of a daily series: each (year, month) with at least
/// [`MIN_DAYS_PER_MONTH`] daily means gives a monthly mean; each calendar month's
/// climatological value is the mean of its years; the MMM is the largest of the twelve. Every
/// month must be present (an error names the missing ones).
pub fn climatology(series: &DailySeries) -> Result<Climatology, HeatError> {
    // (year, month) → (sum, days)
    let mut months: Vec<((i32, u32), f64, usize)> = Vec::new();
    for (i, t) in series.temp_c.iter().enumerate() {
        let Some(t) = t else { continue };
        let key = year_month(series, i);
        match months.last_mut() {
            Some((k, sum, n)) if *k == key => {
                *sum += t;
                *n += 1;
            }
            _ => months.push((key, *t, 1)),
        }
    }
    let mut sums = [0.0_f64; 12];
    let mut counts = [0_usize; 12];
    for ((_, m), sum, n) in months {
        if n >= MIN_DAYS_PER_MONTH {
            let k = (m as usize).saturating_sub(1).min(11);
            sums[k] += sum / n as f64;
            counts[k] += 1;
        }
    }
    let mut monthly_c = [None; 12];
    for k in 0..12 {
        if counts[k] > 0 {
            monthly_c[k] = Some(sums[k] / counts[k] as f64);
        }
    }
    let missing: Vec<u32> = (0..12)
        .filter(|&k| monthly_c[k].is_none())
        .map(|k| k as u32 + 1)
        .collect();
    if !missing.is_empty() {
        return Err(HeatError::ClimatologyIncomplete {
            months_missing: missing,
        });
    }
    let (mut mmm_c, mut mmm_month) = (f64::NEG_INFINITY, 1);
    for (k, v) in monthly_c.iter().enumerate() {
        if let Some(v) = v
            && *v > mmm_c
        {
            mmm_c = *v;
            mmm_month = k as u32 + 1;
        }
    }
    Ok(Climatology {
        monthly_c,
        years_per_month: counts,
        mmm_c,
        mmm_month,
    })
}

/// DHW on each day, °C-weeks: the sum of the HotSpots `T + shift − mmm` of at least
/// [`HOTSPOT_MIN_C`] over the day and the 83 before it, divided by 7. `None` where the window
/// reaches before the record or holds a missing day. `shift_c` adds a uniform warming.
#[derive(Clone, Debug, PartialEq)]
pub struct DhwSeries {
    pub dhw: Vec<Option<f64>>,
}

/// Computes [`DhwSeries`] in one pass with a running window sum.
pub fn dhw_series(series: &DailySeries, mmm_c: f64, shift_c: f64) -> DhwSeries {
    let hs: Vec<Option<f64>> = series
        .temp_c
        .iter()
        .map(|t| {
            t.map(|t| {
                let h = t + shift_c - mmm_c;
                if h >= HOTSPOT_MIN_C { h } else { 0.0 }
            })
        })
        .collect();
    let mut dhw = Vec::with_capacity(hs.len());
    let (mut sum, mut missing) = (0.0_f64, 0_usize);
    for i in 0..hs.len() {
        match hs.get(i).copied().flatten() {
            Some(h) => sum += h,
            None => missing += 1,
        }
        if i >= DHW_WINDOW_DAYS {
            match hs.get(i - DHW_WINDOW_DAYS).copied().flatten() {
                Some(h) => sum -= h,
                None => missing -= 1,
            }
        }
        let full = i + 1 >= DHW_WINDOW_DAYS;
        // Recompute the sum exactly once in a while so rounding cannot drift over long records.
        if full && i % 4096 == 0 {
            sum = hs
                .get(i + 1 - DHW_WINDOW_DAYS..=i)
                .unwrap_or(&[])
                .iter()
                .map(|h| h.unwrap_or(0.0))
                .sum();
        }
        dhw.push((full && missing == 0).then(|| (sum / 7.0).max(0.0)));
    }
    DhwSeries { dhw }
}

/// The largest DHW of each calendar year whose DHW is defined on at least
/// [`MIN_YEAR_SHARE`] of its days: (year, maximum). Years with less coverage are left out and
/// listed in `left_out` as findings.
pub fn annual_maxima(
    series: &DailySeries,
    dhw: &DhwSeries,
    left_out: Option<&mut Vec<HeatFinding>>,
) -> Vec<(i32, f64)> {
    let mut per_year: Vec<(i32, f64, usize, usize)> = Vec::new(); // year, max, defined, days
    for (i, v) in dhw.dhw.iter().enumerate() {
        let y = series.date(i).year();
        if per_year.last().is_none_or(|p| p.0 != y) {
            per_year.push((y, f64::NEG_INFINITY, 0, days_in_year(y)));
        }
        if let (Some(last), Some(v)) = (per_year.last_mut(), v) {
            last.1 = last.1.max(*v);
            last.2 += 1;
        }
    }
    let mut out = Vec::new();
    let mut findings = Vec::new();
    for (year, max, defined, days) in per_year {
        if defined as f64 >= MIN_YEAR_SHARE * days as f64 {
            out.push((year, max));
        } else {
            findings.push(HeatFinding::YearLeftOut {
                year,
                covered_days: defined,
            });
        }
    }
    if let Some(f) = left_out {
        f.extend(findings);
    }
    out
}

fn days_in_year(y: i32) -> usize {
    if chrono::NaiveDate::from_ymd_opt(y, 2, 29).is_some() {
        366
    } else {
        365
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::NaiveDate;

    fn series(first: (i32, u32, u32), temps: Vec<f64>) -> DailySeries {
        DailySeries {
            first: NaiveDate::from_ymd_opt(first.0, first.1, first.2).expect("date"),
            temp_c: temps.into_iter().map(Some).collect(),
        }
    }

    /// The check case of the thermal-stress issue, worked by hand: MMM 29.0 °C and twelve
    /// weeks (84 days) at 30.5 °C give HotSpots of 1.5 °C on 84 days, so
    /// DHW = 84 × 1.5 / 7 = 18 °C-weeks.
    #[test]
    fn twelve_weeks_at_one_and_a_half_degrees_give_eighteen() {
        let s = series((2023, 1, 1), vec![30.5; 84]);
        let d = dhw_series(&s, 29.0, 0.0);
        assert!(d.dhw[..83].iter().all(Option::is_none), "window not full");
        let last = d.dhw[83].expect("full window");
        assert!((last - 18.0).abs() < 1e-12, "{last}");
    }

    /// HotSpots under 1 °C do not count (Skirving et al. 2020: a 0.8 °C HotSpot is excluded).
    #[test]
    fn hotspots_of_point_eight_give_zero() {
        let s = series((2023, 1, 1), vec![29.8; 120]);
        let d = dhw_series(&s, 29.0, 0.0);
        assert!(d.dhw[83..].iter().all(|v| *v == Some(0.0)));
        // The same days shifted by +0.2 °C reach exactly 1 °C and count: 84 × 1 / 7 = 12.
        let d = dhw_series(&s, 29.0, 0.2);
        assert!((d.dhw[119].expect("defined") - 12.0).abs() < 1e-9);
    }

    /// The window boundary: one hot day (HotSpot 7 °C, i.e. 1 °C-week) stays in the DHW for
    /// exactly 84 days, then drops out.
    #[test]
    fn one_hot_day_counts_for_eighty_four_days() {
        let mut t = vec![28.0; 300];
        t[100] = 36.0; // 36 − 29 = 7 °C → 7 / 7 = 1 °C-week
        let d = dhw_series(&series((2023, 1, 1), t), 29.0, 0.0);
        assert_eq!(d.dhw[99], Some(0.0));
        assert!((d.dhw[100].expect("defined") - 1.0).abs() < 1e-12);
        assert!(
            (d.dhw[183].expect("defined") - 1.0).abs() < 1e-12,
            "day 100 + 83"
        );
        assert_eq!(d.dhw[184], Some(0.0), "day 100 + 84 has left the window");
    }

    /// A missing day blanks every window holding it.
    #[test]
    fn a_missing_day_blanks_its_windows() {
        let mut s = series((2023, 1, 1), vec![28.0; 200]);
        s.temp_c[120] = None;
        let d = dhw_series(&s, 29.0, 0.0);
        assert_eq!(d.dhw[119], Some(0.0));
        assert!(d.dhw[120..=199].iter().all(Option::is_none));
    }

    /// Leap years: 2024 has 366 days, so a record of 2023-10-01..2024-12-31 covers 2024 fully
    /// (DHW defined from 2023-12-23 on), and its maximum is found on 29 February too.
    #[test]
    fn leap_year_is_counted_in_full() {
        let first = NaiveDate::from_ymd_opt(2023, 10, 1).expect("date");
        let last = NaiveDate::from_ymd_opt(2024, 12, 31).expect("date");
        let n = (last - first).num_days() as usize + 1;
        let mut t = vec![28.0; n];
        let feb29 = (NaiveDate::from_ymd_opt(2024, 2, 29).expect("leap day") - first).num_days();
        t[feb29 as usize] = 43.0; // 43 − 29 = 14 °C → 2 °C-weeks
        let s = series((2023, 10, 1), t);
        let d = dhw_series(&s, 29.0, 0.0);
        let mut f = Vec::new();
        let maxima = annual_maxima(&s, &d, Some(&mut f));
        // 2023 has DHW on only 9 of its days (23–31 December): left out.
        assert_eq!(maxima.len(), 1);
        assert_eq!(maxima[0].0, 2024);
        assert!((maxima[0].1 - 2.0).abs() < 1e-12);
        assert!(f.contains(&HeatFinding::YearLeftOut {
            year: 2023,
            covered_days: 9
        }));
        assert_eq!(days_in_year(2024), 366);
        assert_eq!(days_in_year(2023), 365);
    }

    /// The MMM is the warmest calendar month's mean over years (worked: two years whose
    /// February means are 29 and 30 °C give a February climatology of 29.5 °C).
    #[test]
    fn mmm_is_the_warmest_monthly_mean() {
        let first = NaiveDate::from_ymd_opt(2022, 1, 1).expect("date");
        let n = 730;
        let t: Vec<f64> = (0..n)
            .map(|i| {
                let d = first + chrono::Days::new(i as u64);
                match (d.year(), d.month()) {
                    (2022, 2) => 29.0,
                    (2023, 2) => 30.0,
                    (_, m) => 25.0 + f64::from(m) * 0.1,
                }
            })
            .collect();
        let c = climatology(&series((2022, 1, 1), t)).expect("complete");
        assert_eq!(c.mmm_month, 2);
        assert!((c.mmm_c - 29.5).abs() < 1e-12);
        assert_eq!(c.years_per_month[1], 2);
        assert!((c.monthly_c[11].expect("December") - 26.2).abs() < 1e-12);
    }

    #[test]
    fn short_record_names_the_missing_months() {
        let c = climatology(&series((2023, 1, 1), vec![28.0; 100]));
        // 100 days from 1 January: January to March in full (90 days), then 10 days of April,
        // fewer than the 20 a month needs.
        let e = c.expect_err("only January to March");
        assert_eq!(
            e,
            HeatError::ClimatologyIncomplete {
                months_missing: vec![4, 5, 6, 7, 8, 9, 10, 11, 12]
            }
        );
        assert!(e.to_string().contains("state the MMM"));
    }
}
