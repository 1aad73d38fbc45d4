//! The seasonal baseline: statistics per season and for the whole record, the site's
//! TA–salinity relationship, and diel ranges where the records resolve the time of day.

use std::collections::HashMap;

use chrono::{FixedOffset, NaiveDate};
use serde::Serialize;

use super::records::{Sample, TaModel};
use super::schema::{BaselineInputs, RecordKind, Season};

/// Count, mean, sample standard deviation, minimum and maximum of one quantity.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct Stats {
    pub n: usize,
    pub mean: Option<f64>,
    /// Sample standard deviation (n − 1); absent for n < 2.
    pub sd: Option<f64>,
    pub min: Option<f64>,
    pub max: Option<f64>,
}

/// Welford's running mean and variance.
#[derive(Clone, Copy, Debug)]
pub struct Accumulator {
    n: usize,
    mean: f64,
    m2: f64,
    min: f64,
    max: f64,
}

impl Default for Accumulator {
    fn default() -> Self {
        Accumulator {
            n: 0,
            mean: 0.0,
            m2: 0.0,
            min: f64::INFINITY,
            max: f64::NEG_INFINITY,
        }
    }
}

impl Accumulator {
    pub fn push(&mut self, v: f64) {
        if !v.is_finite() {
            return;
        }
        self.n += 1;
        let d = v - self.mean;
        self.mean += d / self.n as f64;
        self.m2 += d * (v - self.mean);
        self.min = self.min.min(v);
        self.max = self.max.max(v);
    }
    pub fn stats(&self) -> Stats {
        if self.n == 0 {
            return Stats::default();
        }
        Stats {
            n: self.n,
            mean: Some(self.mean),
            sd: (self.n > 1).then(|| (self.m2 / (self.n - 1) as f64).sqrt()),
            min: Some(self.min),
            max: Some(self.max),
        }
    }
}

/// Days with at least this many solved, time-stamped samples at one station count for the
/// diel range (common practice: about 4-hourly coverage or better).
pub const DIEL_MIN_SAMPLES_PER_DAY: usize = 6;

/// Mean over days of the daily (max − min) of pH_T and Omega_ar.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct DielRange {
    /// Station-days with at least [`DIEL_MIN_SAMPLES_PER_DAY`] samples.
    pub n_days: usize,
    pub ph_t_range_mean: f64,
    pub ph_t_range_max: f64,
    pub omega_ar_range_mean: f64,
    pub omega_ar_range_max: f64,
}

/// Statistics of one season (or of the whole record).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SeasonBaseline {
    pub name: String,
    pub months: Vec<u32>,
    /// Rows kept after QC in this season.
    pub n_rows: usize,
    /// Rows with a solved carbonate state.
    pub n_solved: usize,
    pub temp_c: Stats,
    pub salinity: Stats,
    /// TA of the solved state (measured or, for sensor rows, estimated from salinity).
    pub ta_umol_kg: Stats,
    pub dic_umol_kg: Stats,
    pub ph_t: Stats,
    pub pco2_uatm: Stats,
    pub omega_ar: Stats,
    pub omega_ca: Stats,
    /// Salinity-normalised TA, TA·35/S, of measured TA only.
    pub nta_umol_kg: Stats,
    /// Present when sub-daily samples cover at least one station-day well enough.
    pub diel: Option<DielRange>,
}

/// How TA is estimated from salinity for rows without measured TA.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TaModelKind {
    /// TA = intercept + slope·S, least squares over the bottle samples.
    Linear,
    /// TA = mean(nTA)·S/35 (constant salinity-normalised TA), used when the bottle salinities
    /// span too little for a slope or the fit explains little of the variance.
    Proportional,
}

/// The site's TA–salinity relationship from bottle samples with measured TA.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct TaSalinityFit {
    pub n: usize,
    /// Least-squares slope, µmol/kg per salinity unit.
    pub slope: f64,
    pub intercept_umol_kg: f64,
    pub r2: f64,
    pub salinity_min: f64,
    pub salinity_max: f64,
    /// Root-mean-square residual of the model used, µmol/kg.
    pub rmse_umol_kg: f64,
    /// Which model estimates TA for rows without it.
    pub model: TaModelKind,
    /// For the proportional model: mean nTA, µmol/kg.
    pub nta_mean_umol_kg: f64,
}

/// Fewest bottle TA samples for a TA–salinity relationship (common practice).
pub const MIN_TA_FIT_SAMPLES: usize = 3;
/// Smallest salinity span for a linear fit; below it the slope is mostly noise and the
/// proportional model is used (common practice).
pub const MIN_TA_FIT_SALINITY_SPAN: f64 = 1.0;
/// Smallest r² for the linear model to be used for estimates (common practice).
pub const MIN_TA_FIT_R2: f64 = 0.5;

impl TaSalinityFit {
    /// Fits over `(salinity, ta)` pairs; `None` with fewer than [`MIN_TA_FIT_SAMPLES`].
    pub fn fit(points: &[(f64, f64)]) -> Option<TaSalinityFit> {
        let pts: Vec<(f64, f64)> = points
            .iter()
            .copied()
            .filter(|(s, t)| s.is_finite() && t.is_finite() && *s > 0.0)
            .collect();
        let n = pts.len();
        if n < MIN_TA_FIT_SAMPLES {
            return None;
        }
        let nf = n as f64;
        let ms = pts.iter().map(|p| p.0).sum::<f64>() / nf;
        let mt = pts.iter().map(|p| p.1).sum::<f64>() / nf;
        let sxx: f64 = pts.iter().map(|p| (p.0 - ms).powi(2)).sum();
        let sxy: f64 = pts.iter().map(|p| (p.0 - ms) * (p.1 - mt)).sum();
        let syy: f64 = pts.iter().map(|p| (p.1 - mt).powi(2)).sum();
        let (slope, intercept, r2) = if sxx > 0.0 {
            let b = sxy / sxx;
            let r2 = if syy > 0.0 {
                (sxy * sxy) / (sxx * syy)
            } else {
                1.0
            };
            (b, mt - b * ms, r2)
        } else {
            (0.0, mt, 0.0)
        };
        let s_min = pts.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
        let s_max = pts.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
        let nta_mean = pts.iter().map(|p| p.1 * 35.0 / p.0).sum::<f64>() / nf;
        let model = if s_max - s_min >= MIN_TA_FIT_SALINITY_SPAN && r2 >= MIN_TA_FIT_R2 {
            TaModelKind::Linear
        } else {
            TaModelKind::Proportional
        };
        let fit = TaSalinityFit {
            n,
            slope,
            intercept_umol_kg: intercept,
            r2,
            salinity_min: s_min,
            salinity_max: s_max,
            rmse_umol_kg: 0.0,
            model,
            nta_mean_umol_kg: nta_mean,
        };
        let rmse = (pts
            .iter()
            .map(|&(s, t)| (t - fit.estimate(s)).powi(2))
            .sum::<f64>()
            / nf)
            .sqrt();
        Some(TaSalinityFit {
            rmse_umol_kg: rmse,
            ..fit
        })
    }

    /// The model used for rows without measured TA, in words with its numbers, e.g. for
    /// notes and reports: the linear fit, or the proportional (constant nTA) model.
    pub fn describe_model(&self) -> String {
        match self.model {
            TaModelKind::Linear => format!(
                "TA = {:.1} + {:.2}·S (r² {:.2}, n {}, S {:.2}–{:.2}, rms residual {:.1} µmol/kg)",
                self.intercept_umol_kg,
                self.slope,
                self.r2,
                self.n,
                self.salinity_min,
                self.salinity_max,
                self.rmse_umol_kg
            ),
            TaModelKind::Proportional => format!(
                "TA = {:.1}·S/35, the mean salinity-normalised TA of {} bottle samples (S {:.2}–{:.2} spans too little for a slope; rms residual {:.1} µmol/kg)",
                self.nta_mean_umol_kg,
                self.n,
                self.salinity_min,
                self.salinity_max,
                self.rmse_umol_kg
            ),
        }
    }

    /// TA (µmol/kg) estimated at salinity `s` with the chosen model.
    pub fn estimate(&self, s: f64) -> f64 {
        match self.model {
            TaModelKind::Linear => self.intercept_umol_kg + self.slope * s,
            TaModelKind::Proportional => self.nta_mean_umol_kg * s / 35.0,
        }
    }

    pub(crate) fn as_model(&self) -> TaModel {
        let (intercept, slope) = match self.model {
            TaModelKind::Linear => (self.intercept_umol_kg, self.slope),
            TaModelKind::Proportional => (0.0, self.nta_mean_umol_kg / 35.0),
        };
        TaModel {
            intercept,
            slope,
            s_min: self.salinity_min,
            s_max: self.salinity_max,
        }
    }
}

/// The calcification rate used as the site's present rate.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CalcificationBaseline {
    pub net_calcification_kg_m2_yr: f64,
    pub source: String,
    pub coral_cover_fraction: Option<f64>,
}

/// Everything `check` reports about the present state of the site.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Baseline {
    pub seasons: Vec<SeasonBaseline>,
    pub whole_record: SeasonBaseline,
    pub ta_salinity: Option<TaSalinityFit>,
    pub calcification: CalcificationBaseline,
}

#[derive(Default)]
struct SeasonAcc {
    n_rows: usize,
    n_solved: usize,
    t: Accumulator,
    s: Accumulator,
    ta: Accumulator,
    dic: Accumulator,
    ph: Accumulator,
    pco2: Accumulator,
    oa: Accumulator,
    oc: Accumulator,
    nta: Accumulator,
    days: Vec<DayAcc>,
    day_index: HashMap<(std::sync::Arc<str>, NaiveDate), usize>,
    /// The last station-day seen (series are usually in time order).
    last_day: Option<(std::sync::Arc<str>, NaiveDate, usize)>,
}

#[derive(Clone, Copy)]
struct DayAcc {
    n: usize,
    ph: (f64, f64),
    oa: (f64, f64),
}

impl SeasonAcc {
    fn push(&mut self, s: &Sample, offset: FixedOffset) {
        self.n_rows += 1;
        self.t.push(s.temp_c);
        self.s.push(s.salinity);
        if let Some(ta) = s.measured.ta()
            && s.salinity > 0.0
        {
            self.nta.push(ta * 35.0 / s.salinity);
        }
        let Some(st) = &s.state else { return };
        self.n_solved += 1;
        self.ta.push(st.ta);
        self.dic.push(st.dic);
        self.ph.push(st.ph_t);
        self.pco2.push(st.pco2);
        self.oa.push(st.omega_ar);
        self.oc.push(st.omega_ca);
        if s.has_time {
            let day = s.time.with_timezone(&offset).date_naive();
            let i = match &self.last_day {
                Some((st, d, i)) if *d == day && std::sync::Arc::ptr_eq(st, &s.station) => *i,
                _ => {
                    let next = self.days.len();
                    let i = *self
                        .day_index
                        .entry((s.station.clone(), day))
                        .or_insert(next);
                    if i == next {
                        self.days.push(DayAcc {
                            n: 0,
                            ph: (f64::INFINITY, f64::NEG_INFINITY),
                            oa: (f64::INFINITY, f64::NEG_INFINITY),
                        });
                    }
                    self.last_day = Some((s.station.clone(), day, i));
                    i
                }
            };
            let Some(e) = self.days.get_mut(i) else {
                return;
            };
            e.n += 1;
            e.ph = (e.ph.0.min(st.ph_t), e.ph.1.max(st.ph_t));
            e.oa = (e.oa.0.min(st.omega_ar), e.oa.1.max(st.omega_ar));
        }
    }

    fn finish(self, name: String, months: Vec<u32>) -> SeasonBaseline {
        let mut ph_r = Accumulator::default();
        let mut oa_r = Accumulator::default();
        for d in self.days.iter().filter(|d| d.n >= DIEL_MIN_SAMPLES_PER_DAY) {
            ph_r.push(d.ph.1 - d.ph.0);
            oa_r.push(d.oa.1 - d.oa.0);
        }
        let (p, o) = (ph_r.stats(), oa_r.stats());
        let diel = match (p.mean, p.max, o.mean, o.max) {
            (Some(pm), Some(px), Some(om), Some(ox)) => Some(DielRange {
                n_days: p.n,
                ph_t_range_mean: pm,
                ph_t_range_max: px,
                omega_ar_range_mean: om,
                omega_ar_range_max: ox,
            }),
            _ => None,
        };
        SeasonBaseline {
            name,
            months,
            n_rows: self.n_rows,
            n_solved: self.n_solved,
            temp_c: self.t.stats(),
            salinity: self.s.stats(),
            ta_umol_kg: self.ta.stats(),
            dic_umol_kg: self.dic.stats(),
            ph_t: self.ph.stats(),
            pco2_uatm: self.pco2.stats(),
            omega_ar: self.oa.stats(),
            omega_ca: self.oc.stats(),
            nta_umol_kg: self.nta.stats(),
            diel,
        }
    }
}

/// The TA–salinity fit over bottle samples with measured TA.
pub fn fit_ta_salinity(samples: &[Sample]) -> Option<TaSalinityFit> {
    let pts: Vec<(f64, f64)> = samples
        .iter()
        .filter(|s| s.kind == RecordKind::Bottle)
        .filter_map(|s| s.measured.ta().map(|ta| (s.salinity, ta)))
        .collect();
    TaSalinityFit::fit(&pts)
}

/// Computes the baseline from QC'd, solved samples. `offset` is the site's UTC offset (days
/// for diel ranges are local days).
pub fn compute(
    samples: &[Sample],
    seasons: &[Season],
    offset: FixedOffset,
    ta_salinity: Option<TaSalinityFit>,
    inputs: &BaselineInputs,
) -> Baseline {
    let mut accs: Vec<SeasonAcc> = seasons.iter().map(|_| SeasonAcc::default()).collect();
    let mut all = SeasonAcc::default();
    for s in samples {
        if let Some(a) = accs.get_mut(s.season) {
            a.push(s, offset);
        }
        all.push(s, offset);
    }
    let seasons_out = accs
        .into_iter()
        .zip(seasons)
        .map(|(a, s)| a.finish(s.name.clone(), s.months.clone()))
        .collect();
    let (rate, source) = inputs.net_calcification();
    Baseline {
        seasons: seasons_out,
        whole_record: all.finish("whole record".to_string(), (1..=12).collect()),
        ta_salinity,
        calcification: CalcificationBaseline {
            net_calcification_kg_m2_yr: rate,
            source,
            coral_cover_fraction: inputs.coral_cover_fraction,
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn welford_matches_two_pass() {
        let xs = [2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0];
        let mut a = Accumulator::default();
        xs.iter().for_each(|&x| a.push(x));
        let s = a.stats();
        assert_eq!(s.n, 8);
        assert!((s.mean.unwrap_or(0.0) - 5.0).abs() < 1e-12);
        // Sample variance of this textbook set: 32/7.
        assert!((s.sd.unwrap_or(0.0) - (32.0f64 / 7.0).sqrt()).abs() < 1e-12);
        assert_eq!((s.min, s.max), (Some(2.0), Some(9.0)));
        let mut one = Accumulator::default();
        one.push(1.0);
        assert_eq!(one.stats().sd, None);
        assert_eq!(Accumulator::default().stats().n, 0);
    }

    #[test]
    fn ta_fit_recovers_a_line_and_falls_back_when_salinity_barely_varies() {
        let pts: Vec<(f64, f64)> = (0..10)
            .map(|i| {
                let s = 33.0 + 0.4 * f64::from(i);
                (s, 600.0 + 48.0 * s + if i % 2 == 0 { 1.0 } else { -1.0 })
            })
            .collect();
        let f = TaSalinityFit::fit(&pts).unwrap_or_else(|| panic!("no fit"));
        assert_eq!(f.model, TaModelKind::Linear);
        assert!((f.slope - 48.0).abs() < 1.0, "{f:?}");
        assert!(f.r2 > 0.99);
        assert!((f.estimate(35.0) - 2280.0).abs() < 2.0);

        let flat: Vec<(f64, f64)> = (0..5)
            .map(|i| {
                let s = 35.0 + 0.05 * f64::from(i);
                (s, 2300.0 * s / 35.0 + f64::from(i % 2))
            })
            .collect();
        let g = TaSalinityFit::fit(&flat).unwrap_or_else(|| panic!("no fit"));
        assert_eq!(g.model, TaModelKind::Proportional);
        assert!((g.estimate(35.0) - 2300.4).abs() < 0.01, "{g:?}");
        assert!(TaSalinityFit::fit(&flat[..2]).is_none());
    }
}
