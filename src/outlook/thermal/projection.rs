//! Projected thermal stress by the delta method: each observed year is one pattern of
//! variability; under a pathway, in year `y`, ensemble member `m` shifts that pattern by its
//! warming between the pattern's own year and `y`, and the annual maximum DHW is recomputed
//! against the fixed MMM (raised by an optional adaptation allowance).
//!
//! Shifts are rounded to 0.01 °C, far below the warming's uncertainty, so that the DHW of the
//! whole record is computed once per distinct shift and reused (a ten-year hourly record ×
//! five pathways × 1,000 members stays well under a second; `benches/projection.rs`).

use std::collections::HashMap;

use super::daily::DailySeries;
use super::dhw::{annual_maxima, dhw_series};
use super::{DHW_SEVERE, DHW_SIGNIFICANT, HeatFinding};
use crate::outlook::quantile_sorted;

/// The observed temperatures as the projection uses them.
#[derive(Clone, Debug)]
pub struct HeatInput<'a> {
    pub daily: &'a DailySeries,
    /// The maximum monthly mean, °C (stated or estimated).
    pub mmm_c: f64,
    /// Adaptation allowance: °C per decade added to the MMM after `allowance_from_year`.
    pub allowance_c_per_decade: f64,
    pub allowance_from_year: i32,
}

/// The years and members to project.
#[derive(Clone, Debug)]
pub struct HeatSettings {
    /// Pathway names, in output order.
    pub pathways: Vec<String>,
    /// Years reported in the tables (strictly increasing).
    pub horizon_years: Vec<i32>,
    /// First and last year searched for the onset of severe stress in most years.
    pub onset_span: (i32, i32),
    pub members: usize,
}

/// One horizon year under one pathway.
#[derive(Clone, Debug, PartialEq)]
pub struct HeatYear {
    pub year: i32,
    /// 5, 50 and 95 % quantiles of the annual maximum DHW over members × observed-year
    /// patterns, °C-weeks.
    pub max_dhw_q: [f64; 3],
    /// Share of member-years reaching DHW ≥ 4 and ≥ 8 °C-weeks.
    pub share_significant: f64,
    pub share_severe: f64,
}

/// One pathway's thermal outlook.
#[derive(Clone, Debug, PartialEq)]
pub struct HeatPathway {
    pub name: String,
    pub years: Vec<HeatYear>,
    /// Onset of severe stress in most years: the first year in which more than half of a
    /// member's patterns reach DHW ≥ 8; the 5, 50 and 95 % quantiles over members (nearest
    /// rank), `None` where that quantile's member has no onset within `onset_span`.
    pub onset_q: [Option<i32>; 3],
}

/// The thermal outlook of a site.
#[derive(Clone, Debug, PartialEq)]
pub struct HeatOutlook {
    /// Observed annual maximum DHW per year of record (unshifted).
    pub observed: Vec<(i32, f64)>,
    /// Years of record without enough DHW coverage for a maximum (left out of `observed`).
    pub years_left_out: Vec<HeatFinding>,
    pub pathways: Vec<HeatPathway>,
}

/// Annual maxima of the pattern years for one rounded shift, memoised.
struct Cache<'a> {
    input: &'a HeatInput<'a>,
    years: Vec<i32>,
    by_shift: HashMap<i64, Vec<f64>>,
}

impl Cache<'_> {
    fn maxima(&mut self, shift_hundredths: i64) -> &[f64] {
        let (input, years) = (self.input, &self.years);
        self.by_shift.entry(shift_hundredths).or_insert_with(|| {
            let shift = shift_hundredths as f64 / 100.0;
            let d = dhw_series(input.daily, input.mmm_c, shift);
            let all = annual_maxima(input.daily, &d, None);
            years
                .iter()
                .map(|y| {
                    all.iter()
                        .find(|(yy, _)| yy == y)
                        .map_or(f64::NAN, |(_, v)| *v)
                })
                .collect()
        })
    }
}

/// Projects the annual maximum DHW. `warming(pathway, year, member)` is the SST change, °C,
/// relative to any fixed reference (only differences are used), for the member's draw of the
/// warming range; members must be paired across pathways by the caller.
pub fn project_heat(
    input: &HeatInput<'_>,
    settings: &HeatSettings,
    warming: &dyn Fn(usize, i32, usize) -> f64,
) -> HeatOutlook {
    let mut years_left_out = Vec::new();
    let observed = annual_maxima(
        input.daily,
        &dhw_series(input.daily, input.mmm_c, 0.0),
        Some(&mut years_left_out),
    );
    let patterns: Vec<i32> = observed.iter().map(|(y, _)| *y).collect();
    let mut cache = Cache {
        input,
        years: patterns.clone(),
        by_shift: HashMap::new(),
    };
    let allowance = |y: i32| {
        input.allowance_c_per_decade * f64::from((y - input.allowance_from_year).max(0)) / 10.0
    };
    let mut pathways = Vec::with_capacity(settings.pathways.len());
    for (p, name) in settings.pathways.iter().enumerate() {
        // Pattern maxima of one member in one year.
        let member_year = |cache: &mut Cache<'_>, y: i32, m: usize, out: &mut Vec<f64>| {
            out.clear();
            let w_y = warming(p, y, m) - allowance(y);
            for (j, &py) in patterns.iter().enumerate() {
                let shift = w_y - warming(p, py, m);
                let k = (shift * 100.0).round() as i64;
                if let Some(v) = cache.maxima(k).get(j) {
                    out.push(*v);
                }
            }
        };
        let mut buf = Vec::new();
        let mut years = Vec::with_capacity(settings.horizon_years.len());
        for &y in &settings.horizon_years {
            let mut all = Vec::with_capacity(settings.members * patterns.len());
            for m in 0..settings.members {
                member_year(&mut cache, y, m, &mut buf);
                all.extend(buf.iter().copied().filter(|v| v.is_finite()));
            }
            years.push(summarise(y, all));
        }
        let mut onsets: Vec<i32> = Vec::with_capacity(settings.members);
        for m in 0..settings.members {
            let mut onset = i32::MAX;
            for y in settings.onset_span.0..=settings.onset_span.1 {
                member_year(&mut cache, y, m, &mut buf);
                let severe = buf.iter().filter(|v| **v >= DHW_SEVERE).count();
                if !buf.is_empty() && 2 * severe > buf.len() {
                    onset = y;
                    break;
                }
            }
            onsets.push(onset);
        }
        onsets.sort_unstable();
        let onset_q =
            [0.05, 0.5, 0.95].map(|p| nearest_rank(&onsets, p).filter(|y| *y != i32::MAX));
        pathways.push(HeatPathway {
            name: name.clone(),
            years,
            onset_q,
        });
    }
    HeatOutlook {
        observed,
        years_left_out,
        pathways,
    }
}

fn summarise(year: i32, mut all: Vec<f64>) -> HeatYear {
    all.sort_by(f64::total_cmp);
    let n = all.len().max(1) as f64;
    HeatYear {
        year,
        max_dhw_q: [0.05, 0.5, 0.95].map(|p| quantile_sorted(&all, p)),
        share_significant: all.iter().filter(|v| **v >= DHW_SIGNIFICANT).count() as f64 / n,
        share_severe: all.iter().filter(|v| **v >= DHW_SEVERE).count() as f64 / n,
    }
}

/// The nearest-rank quantile (Hyndman & Fan 1996 type 1) of sorted values: the smallest value
/// with at least a share `p` of the values at or below it.
fn nearest_rank(sorted: &[i32], p: f64) -> Option<i32> {
    if sorted.is_empty() {
        return None;
    }
    let rank = (p * sorted.len() as f64).ceil().max(1.0) as usize;
    sorted.get(rank - 1).copied()
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::NaiveDate;

    /// Three invented years of a smooth seasonal cycle peaking at 29 °C on day 60 of each year,
    /// with the MMM at 29 °C: no observed stress, and stress that grows with the shift.
    fn record() -> DailySeries {
        let first = NaiveDate::from_ymd_opt(2020, 10, 1).expect("date");
        let last = NaiveDate::from_ymd_opt(2023, 12, 31).expect("date");
        let n = (last - first).num_days() as usize + 1;
        let temp_c = (0..n)
            .map(|i| {
                let d = first + chrono::Days::new(i as u64);
                let doy = f64::from(chrono::Datelike::ordinal(&d));
                let phase = 2.0 * std::f64::consts::PI * (doy - 60.0) / 365.25;
                Some(27.0 + 2.0 * phase.cos())
            })
            .collect();
        DailySeries { first, temp_c }
    }

    fn settings(pathways: &[&str]) -> HeatSettings {
        HeatSettings {
            pathways: pathways.iter().map(|s| s.to_string()).collect(),
            horizon_years: vec![2030, 2050, 2100],
            onset_span: (2024, 2100),
            members: 50,
        }
    }

    #[test]
    fn stress_rises_with_warming_and_with_the_pathway() {
        let daily = record();
        let input = HeatInput {
            daily: &daily,
            mmm_c: 29.0,
            allowance_c_per_decade: 0.0,
            allowance_from_year: 2023,
        };
        // Invented linear warming: 0.01 and 0.03 °C per year from 2020, members spread ±20 %.
        let rate = [0.01, 0.03];
        let warming = |p: usize, y: i32, m: usize| {
            rate[p] * (1.0 + 0.4 * (m as f64 / 49.0 - 0.5)) * f64::from(y - 2020)
        };
        let out = project_heat(&input, &settings(&["low", "high"]), &warming);
        assert_eq!(out.observed.len(), 3, "2021, 2022, 2023 are covered");
        assert!(out.observed.iter().all(|(_, v)| *v == 0.0));
        for p in &out.pathways {
            let med: Vec<f64> = p.years.iter().map(|y| y.max_dhw_q[1]).collect();
            assert!(med.windows(2).all(|w| w[1] >= w[0]), "{med:?}");
        }
        let (low, high) = (&out.pathways[0], &out.pathways[1]);
        for (a, b) in low.years.iter().zip(&high.years) {
            assert!(b.max_dhw_q[1] >= a.max_dhw_q[1]);
            assert!(b.share_severe >= a.share_severe);
        }
        // The high pathway reaches severe stress in most years before 2100; the onset of the
        // low one comes later or not at all.
        let hi = high.onset_q[1].expect("onset within the horizon");
        assert!(low.onset_q[1].is_none_or(|lo| lo >= hi));
    }

    /// Worked: with no variability between years and a uniform shift s, the annual maximum
    /// DHW is that of the cosine cycle shifted by s. At s = +1.2 °C the peak is 30.2 °C and the
    /// HotSpots ≥ 1 °C are the days with 27 + 2 cos φ + 1.2 − 29 ≥ 1, i.e. cos φ ≥ 0.9: a spell
    /// of 2 · acos(0.9) / (2π) · 365.25 ≈ 52 days, inside one 84-day window, so the maximum is
    /// the whole spell's sum / 7, summed directly here.
    #[test]
    fn constant_shift_matches_the_direct_computation() {
        let daily = record();
        let input = HeatInput {
            daily: &daily,
            mmm_c: 29.0,
            allowance_c_per_decade: 0.0,
            allowance_from_year: 2023,
        };
        let warming = |_: usize, y: i32, _: usize| if y >= 2050 { 1.2 } else { 0.0 };
        let s = HeatSettings {
            horizon_years: vec![2050],
            members: 1,
            ..settings(&["step"])
        };
        let out = project_heat(&input, &s, &warming);
        let mut direct = 0.0;
        for doy in 1..=365 {
            let phase = 2.0 * std::f64::consts::PI * (f64::from(doy) - 60.0) / 365.25;
            let hs = 27.0 + 2.0 * phase.cos() + 1.2 - 29.0;
            if hs >= 1.0 {
                direct += hs;
            }
        }
        direct /= 7.0;
        let got = out.pathways[0].years[0].max_dhw_q[1];
        assert!(direct > 1.0, "the spell is hot enough to count: {direct}");
        assert!((got - direct).abs() < 1e-9, "{got} vs {direct}");
    }

    /// An adaptation allowance of 0.5 °C per decade cancels a warming of 0.05 °C per year.
    #[test]
    fn allowance_offsets_warming() {
        let daily = record();
        let input = HeatInput {
            daily: &daily,
            mmm_c: 29.0,
            allowance_c_per_decade: 0.5,
            allowance_from_year: 2023,
        };
        let warming = |_: usize, y: i32, _: usize| 0.05 * f64::from(y.max(2023) - 2023);
        let out = project_heat(&input, &settings(&["x"]), &warming);
        for y in &out.pathways[0].years {
            assert_eq!(y.max_dhw_q, [0.0; 3], "{}", y.year);
        }
        assert_eq!(out.pathways[0].onset_q, [None; 3]);
    }

    #[test]
    fn nearest_rank_is_type_one() {
        // Worked: of 1..=20, the 5 % value is the 1st, the median the 10th, 95 % the 19th.
        let v: Vec<i32> = (1..=20).collect();
        assert_eq!(nearest_rank(&v, 0.05), Some(1));
        assert_eq!(nearest_rank(&v, 0.5), Some(10));
        assert_eq!(nearest_rank(&v, 0.95), Some(19));
        assert_eq!(nearest_rank(&[], 0.5), None);
    }
}
