//! The seasonal baseline: statistics per season and for the whole record, the site's
//! TA–salinity relationship, and diel ranges where the records resolve the time of day.

use std::collections::HashMap;

use chrono::{FixedOffset, NaiveDate};
use serde::Serialize;

use super::records::{RowFlags, Sample, TaModel};
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
    /// Salinity-normalised TA of measured TA at salinity ≥ [`NTA_MIN_SALINITY`] (the form
    /// is given by [`Baseline::nta`]); values outside the physical range are left out.
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
    /// Least-squares intercept, µmol/kg: TA at S = 0, the freshwater end-member TA_S0 of a
    /// mixing line.
    pub intercept_umol_kg: f64,
    pub r2: f64,
    pub salinity_min: f64,
    pub salinity_max: f64,
    /// Mean salinity of the fitted points.
    pub salinity_mean: f64,
    /// Σ(S − mean S)² of the fitted points (for the leverage term).
    pub salinity_sxx: f64,
    /// Root-mean-square residual of the model used, µmol/kg.
    pub rmse_umol_kg: f64,
    /// Residual standard error of the linear fit, √(Σ residual² / (n − 2)), µmol/kg.
    pub residual_se_umol_kg: f64,
    /// Standard error of a new TA predicted by the linear fit at the mean salinity,
    /// s·√(1 + 1/n), µmol/kg (see [`TaSalinityFit::prediction_se_at`] for other salinities).
    pub prediction_se_umol_kg: f64,
    /// Which model estimates TA for rows without it.
    pub model: TaModelKind,
    /// For the proportional model: mean nTA, µmol/kg.
    pub nta_mean_umol_kg: f64,
}

/// Fewest bottle TA samples for a TA–salinity relationship: 5, so that the residual standard
/// error has at least 3 degrees of freedom (n − 2) and no single sample decides the slope
/// (common practice).
pub const MIN_TA_FIT_SAMPLES: usize = 5;
/// Smallest salinity span for a linear fit; below it the slope is mostly noise and the
/// proportional model is used (common practice).
pub const MIN_TA_FIT_SALINITY_SPAN: f64 = 1.0;
/// The linear fit is poor, and not used, when r² is below this ... (common practice).
pub const MIN_TA_FIT_R2: f64 = 0.5;
/// ... or when its residual standard error exceeds this, µmol/kg: ten times the ±2 µmol/kg
/// of CRM-referenced TA measurements (Orr et al. 2018, the `[uncertainty]` default), beyond
/// which the scatter is not measurement error but water of other origins (common practice).
pub const MAX_TA_FIT_RESIDUAL_SE_UMOL_KG: f64 = 20.0;
/// A linear fit spanning at least this many salinity units is taken as a mixing line
/// between fresh and sea water, and TA is normalised with its freshwater end-member (Friis,
/// Körtzinger & Wallace 2003) instead of TA·35/S (common practice).
pub const MIXING_MIN_SALINITY_SPAN: f64 = 5.0;
/// Salinity-normalised TA is given only for samples at or above this salinity: below it,
/// normalising to S 35 multiplies every error of TA and of TA_S0 by more than 35/20
/// (common practice).
pub const NTA_MIN_SALINITY: f64 = 20.0;
/// Reference salinity of the normalisation.
pub const NTA_REFERENCE_SALINITY: f64 = 35.0;
/// Physical range of a normalised TA, µmol/kg (the chemistry module's TA limits): a value
/// outside it is an artefact of the normalisation and is never shown.
pub const NTA_PHYSICAL_RANGE: (f64, f64) = (0.0, 5000.0);

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
        let ssr: f64 = pts
            .iter()
            .map(|&(s, t)| (t - intercept - slope * s).powi(2))
            .sum();
        let residual_se = (ssr / (nf - 2.0)).sqrt();
        let s_min = pts.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
        let s_max = pts.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
        let nta_mean = pts.iter().map(|p| p.1 * 35.0 / p.0).sum::<f64>() / nf;
        let poor = r2 < MIN_TA_FIT_R2 || residual_se > MAX_TA_FIT_RESIDUAL_SE_UMOL_KG;
        let model = if s_max - s_min >= MIN_TA_FIT_SALINITY_SPAN && !poor {
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
            salinity_mean: ms,
            salinity_sxx: sxx,
            rmse_umol_kg: 0.0,
            residual_se_umol_kg: residual_se,
            prediction_se_umol_kg: residual_se * (1.0 + 1.0 / nf).sqrt(),
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

    /// Standard error of a new TA predicted by the linear fit at salinity `s`, µmol/kg:
    /// s_e·√(1 + 1/n + (S − mean S)²/Sxx), with s_e on n − 2 degrees of freedom (the usual
    /// prediction interval of simple linear regression, e.g. Draper & Smith, Applied
    /// Regression Analysis, ch. 1; from memory).
    pub fn prediction_se_at(&self, s: f64) -> f64 {
        let nf = self.n as f64;
        let lever = if self.salinity_sxx > 0.0 {
            (s - self.salinity_mean).powi(2) / self.salinity_sxx
        } else {
            0.0
        };
        self.residual_se_umol_kg * (1.0 + 1.0 / nf + lever).sqrt()
    }

    /// True when the linear fit is poor (r² < [`MIN_TA_FIT_R2`] or residual standard error
    /// above [`MAX_TA_FIT_RESIDUAL_SE_UMOL_KG`]) and therefore not used.
    pub fn is_poor(&self) -> bool {
        self.r2 < MIN_TA_FIT_R2 || self.residual_se_umol_kg > MAX_TA_FIT_RESIDUAL_SE_UMOL_KG
    }

    /// True when the bottles span a mixing gradient ([`MIXING_MIN_SALINITY_SPAN`]) and the
    /// linear fit is used: nTA then takes the fit's intercept as freshwater end-member.
    pub fn is_mixing_line(&self) -> bool {
        self.model == TaModelKind::Linear
            && self.salinity_max - self.salinity_min >= MIXING_MIN_SALINITY_SPAN
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
                "TA = {:.1}·S/35, the mean salinity-normalised TA of {} bottle samples ({}; rms residual {:.1} µmol/kg)",
                self.nta_mean_umol_kg,
                self.n,
                if self.is_poor() {
                    format!(
                        "the linear fit is poor, r² {:.2}, residual standard error {:.1} µmol/kg, and is not used",
                        self.r2, self.residual_se_umol_kg
                    )
                } else {
                    format!(
                        "S {:.2}–{:.2} spans too little for a slope",
                        self.salinity_min, self.salinity_max
                    )
                },
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

/// How TA is normalised to salinity 35.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "form", rename_all = "snake_case")]
pub enum NtaForm {
    /// nTA = TA·35/S (no freshwater alkalinity).
    Proportional,
    /// nTA = (TA − TA_S0)/S·35 + TA_S0 with TA_S0 the intercept of the site's TA–salinity
    /// fit (Friis, Körtzinger & Wallace 2003, "The salinity normalization of marine inorganic
    /// carbon chemistry data", Geophys. Res. Lett. 30(2):1085, doi:10.1029/2002GL015898;
    /// title and DOI checked, volume and article number from memory).
    FreshwaterEndMember { ta_s0_umol_kg: f64 },
}

/// The normalisation used for the baseline's nTA and what it left out.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct NtaRule {
    #[serde(flatten)]
    pub form: NtaForm,
    /// Samples below this salinity get no nTA ([`NTA_MIN_SALINITY`]).
    pub min_salinity: f64,
    /// Measured-TA samples below `min_salinity`.
    pub below_min_salinity: usize,
    /// Normalised values outside [`NTA_PHYSICAL_RANGE`], left out.
    pub outside_physical_range: usize,
}

impl NtaRule {
    /// The rule for a site: the freshwater end-member form on a mixing line, else TA·35/S.
    pub fn for_fit(fit: Option<&TaSalinityFit>) -> NtaRule {
        let form = match fit {
            Some(f) if f.is_mixing_line() => NtaForm::FreshwaterEndMember {
                ta_s0_umol_kg: f.intercept_umol_kg,
            },
            _ => NtaForm::Proportional,
        };
        NtaRule {
            form,
            min_salinity: NTA_MIN_SALINITY,
            below_min_salinity: 0,
            outside_physical_range: 0,
        }
    }

    /// nTA of one sample, or why there is none.
    pub fn normalise(&self, ta: f64, s: f64) -> Result<f64, NtaSkip> {
        if s.is_nan() || s < self.min_salinity {
            return Err(NtaSkip::BelowMinSalinity);
        }
        let r = NTA_REFERENCE_SALINITY;
        let v = match self.form {
            NtaForm::Proportional => ta * r / s,
            NtaForm::FreshwaterEndMember { ta_s0_umol_kg: t0 } => (ta - t0) / s * r + t0,
        };
        let (lo, hi) = NTA_PHYSICAL_RANGE;
        if v.is_finite() && v > lo && v <= hi {
            Ok(v)
        } else {
            Err(NtaSkip::OutsidePhysicalRange)
        }
    }
}

/// Why a sample has no normalised TA.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NtaSkip {
    BelowMinSalinity,
    OutsidePhysicalRange,
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
    /// How the nTA statistics were normalised and what was left out.
    pub nta: NtaRule,
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
    fn push(&mut self, s: &Sample, offset: FixedOffset, nta: &NtaRule) {
        self.n_rows += 1;
        self.t.push(s.temp_c);
        self.s.push(s.salinity);
        if let Some(ta) = s.measured.ta()
            && let Ok(v) = nta.normalise(ta, s.salinity)
        {
            self.nta.push(v);
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
    let mut nta = NtaRule::for_fit(ta_salinity.as_ref());
    // Rows below the site's salinity floor stay in the samples (the per-sample appendix)
    // but not in the baseline.
    for s in samples
        .iter()
        .filter(|s| !s.flags.contains(RowFlags::BELOW_SALINITY_FLOOR))
    {
        if let Some(a) = accs.get_mut(s.season) {
            a.push(s, offset, &nta);
        }
        all.push(s, offset, &nta);
        if let Some(ta) = s.measured.ta() {
            match nta.normalise(ta, s.salinity) {
                Ok(_) => {}
                Err(NtaSkip::BelowMinSalinity) => nta.below_min_salinity += 1,
                Err(NtaSkip::OutsidePhysicalRange) => nta.outside_physical_range += 1,
            }
        }
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
        nta,
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
        assert!(TaSalinityFit::fit(&flat[..4]).is_none());
    }

    /// Prediction standard error by hand for five points on TA = 500 + 50·S with residuals
    /// +2, −2, 0, −2, +2 at S = 30…34 (worked arithmetic): the fitted line is unchanged by
    /// these symmetric residuals, SSR = 16, s_e = √(16/3); Sxx = 10, mean S 32, so at S 32 the
    /// prediction SE is s_e·√(1 + 1/5) and at S 36 it is s_e·√(1 + 1/5 + 16/10).
    #[test]
    fn prediction_standard_error_by_hand() {
        let res = [2.0, -2.0, 0.0, -2.0, 2.0];
        let pts: Vec<(f64, f64)> = (0..5)
            .map(|i| {
                let s = 30.0 + f64::from(i);
                (s, 500.0 + 50.0 * s + res[i as usize])
            })
            .collect();
        let f = TaSalinityFit::fit(&pts).unwrap_or_else(|| panic!("no fit"));
        assert!((f.slope - 50.0).abs() < 1e-9 && (f.intercept_umol_kg - 500.0).abs() < 1e-6);
        let se = (16.0f64 / 3.0).sqrt();
        assert!((f.residual_se_umol_kg - se).abs() < 1e-9, "{f:?}");
        assert!((f.prediction_se_umol_kg - se * 1.2f64.sqrt()).abs() < 1e-9);
        assert!((f.prediction_se_at(36.0) - se * 2.8f64.sqrt()).abs() < 1e-9);
    }

    /// The freshwater end-member form of Friis, Körtzinger & Wallace (2003): on a mixing line
    /// TA = 600 + 50·S, every sample normalises to 600 + 50·35 = 2350 (worked arithmetic),
    /// whereas TA·35/S gives 2350 only at S 35 (at S 21: 1650·35/21 = 2750).
    #[test]
    fn freshwater_end_member_normalisation() {
        let pts: Vec<(f64, f64)> = (0..8)
            .map(|i| {
                let s = 5.0 + 4.0 * f64::from(i);
                (s, 600.0 + 50.0 * s)
            })
            .collect();
        let f = TaSalinityFit::fit(&pts).unwrap_or_else(|| panic!("no fit"));
        assert!(f.is_mixing_line(), "{f:?}");
        let rule = NtaRule::for_fit(Some(&f));
        for s in [21.0, 29.0] {
            let v = rule.normalise(600.0 + 50.0 * s, s).unwrap_or(0.0);
            assert!((v - 2350.0).abs() < 1e-6, "S {s}: {v}");
        }
        // Below the floor: none.
        assert_eq!(
            rule.normalise(600.0 + 50.0 * 9.0, 9.0),
            Err(NtaSkip::BelowMinSalinity)
        );
        let plain = NtaRule::for_fit(None);
        assert!((plain.normalise(1650.0, 21.0).unwrap_or(0.0) - 2750.0).abs() < 1e-9);
        // An absurd value is never given: TA 9000 at S 20 would be 15750.
        assert_eq!(
            plain.normalise(9000.0, 20.0),
            Err(NtaSkip::OutsidePhysicalRange)
        );
    }
}
