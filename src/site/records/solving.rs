//! Solving each row's carbonate state with the chemistry module's one measured-pair solver
//! (`chem::measured`: the order of preference, the state, and the consistency misfits of
//! rows that measured more than two quantities), and turning its outcome into row findings.

use rayon::prelude::*;

use super::sample::{Measured, Pair, RowFlags, Sample};
use super::units::{FileUnits, limit_finding};
use crate::chem::measured::{self, MeasuredError, MeasuredParams, Misfit, Options, Param};
use crate::chem::{self, Conditions, Constants, MethodSet};
use crate::diag::Severity;
use crate::site::findings::{Finding, FindingKind, Value};
use crate::site::schema::PhScaleName;

/// TA estimated from salinity, used for rows without a TA measurement.
#[derive(Clone, Copy, Debug)]
pub(crate) struct TaModel {
    pub intercept: f64,
    pub slope: f64,
    pub s_min: f64,
    pub s_max: f64,
}

/// Internal-consistency tolerances, defined with their basis in `chem::measured`.
pub use crate::chem::measured::{TOL_CO2_FRACTION, TOL_PH, TOL_TA_DIC_UMOL_KG};

/// The site's pair label of a pair the measured-pair solver chose (`None` for pairs with
/// carbonate ion, which record files do not carry).
fn site_pair(p: measured::Pair) -> Option<Pair> {
    use Param::*;
    Some(match (p.0, p.1) {
        (Ta, Dic) => Pair::TaDic,
        (Ta, PhT) => Pair::TaPh,
        (Ta, Pco2) => Pair::TaPco2,
        (Ta, Fco2) => Pair::TaFco2,
        (Dic, PhT) => Pair::DicPh,
        (Dic, Pco2) => Pair::DicPco2,
        (Dic, Fco2) => Pair::DicFco2,
        (PhT, Pco2) => Pair::PhPco2,
        (PhT, Fco2) => Pair::PhFco2,
        _ => return None,
    })
}

/// The row's measured values as the solver takes them (pH already on the total scale).
fn params(m: &Measured) -> MeasuredParams {
    MeasuredParams {
        ta: m.ta(),
        dic: m.dic(),
        ph_t: m.ph_t(),
        pco2: m.pco2(),
        fco2: m.fco2(),
        co3: None,
    }
}

fn ph_scale(s: PhScaleName) -> chem::scales::PhScale {
    use chem::scales::PhScale;
    match s {
        PhScaleName::Total => PhScale::Total,
        PhScaleName::Sws => PhScale::Seawater,
        PhScaleName::Free => PhScale::Free,
        PhScaleName::Nbs => PhScale::Nbs,
    }
}

/// Converts pH to the total scale, checks the pH limit, chooses the pair, solves, and checks
/// internal consistency. Rows marked in `drop` are skipped.
pub(crate) fn solve_samples(
    samples: &mut [Sample],
    drop: &mut [bool],
    units: FileUnits,
    methods: &MethodSet,
    ta_model: Option<TaModel>,
    file_index: usize,
) -> Vec<Finding> {
    samples
        .par_iter_mut()
        .zip(drop.par_iter_mut())
        .filter_map(|(s, dropped)| {
            if *dropped {
                return None;
            }
            let found = solve_one(s, dropped, units, methods, ta_model, file_index);
            (!found.is_empty()).then_some(found)
        })
        .flatten()
        .collect()
}

fn solve_one(
    s: &mut Sample,
    dropped: &mut bool,
    units: FileUnits,
    methods: &MethodSet,
    ta_model: Option<TaModel>,
    file: usize,
) -> Vec<Finding> {
    let mut found = Vec::new();
    let cond = Conditions {
        temp_c: s.temp_c,
        salinity: s.salinity,
        pressure_dbar: s.pressure_dbar,
        silicate: s.silicate,
        phosphate: s.phosphate,
    };
    let k = Constants::new(&cond, methods);
    if let Some(ph) = s.measured.ph_t() {
        let ph_t = if units.ph == PhScaleName::Total {
            ph
        } else {
            chem::scales::to_total(ph, ph_scale(units.ph), &k)
        };
        let m = s.measured;
        s.measured = Measured::new(m.ta(), m.dic(), Some(ph_t), m.pco2(), m.fco2());
        if let Err(msg) = chem::limits::check("ph_t", ph_t) {
            found.push(limit_finding(s, file, "ph", msg, units.drop_out_of_range));
            if units.drop_out_of_range {
                *dropped = true;
            }
            return found;
        }
    }
    let source = s.source_file.clone();
    let line = s.line;
    let warn = |kind: FindingKind, message: String, help: &str| {
        Finding::new(Severity::Warning, kind, file, source.clone(), line, message).with_help(help)
    };
    let ta_est = ta_model.map(|m| m.intercept + m.slope * s.salinity);
    let mp = params(&s.measured);
    let opts = Options {
        estimated_ta: ta_est,
    };
    let chosen = measured::choose_pair(&mp, &opts).and_then(|(p, e)| Some((site_pair(p)?, e)));
    let Some((pair, estimated)) = chosen else {
        let help = if s.measured.count() == 1 && s.measured.ta().is_none() {
            "a second carbonate quantity is needed; for sensor series, bottle samples with TA and salinity let the TA–salinity relationship supply TA"
        } else {
            "two of TA, DIC, pH, pCO2/fCO2 are needed (pCO2 with fCO2 is not a pair)"
        };
        found.push(warn(
            FindingKind::NoPair,
            "the row has no solvable pair of carbonate quantities; row kept for temperature and salinity only".to_string(),
            help,
        ));
        return found;
    };
    if estimated
        && let Some(m) = ta_model
        && (s.salinity < m.s_min || s.salinity > m.s_max)
    {
        s.flags.insert(RowFlags::TA_FIT_EXTRAPOLATED);
        found.push(
            warn(
                FindingKind::TaFitRange,
                format!(
                    "salinity {} is outside the range of the bottle samples used for the TA–salinity relationship ({:.2}–{:.2}); the estimated TA is an extrapolation; row kept",
                    s.salinity, m.s_min, m.s_max
                ),
                "add bottle TA samples that cover this salinity",
            )
            .with_field("salinity")
            .with_values(vec![
                Value::new("salinity", s.salinity, ""),
                Value::new("fit_salinity_min", m.s_min, ""),
                Value::new("fit_salinity_max", m.s_max, ""),
            ]),
        );
    }
    if matches!(pair, Pair::PhPco2 | Pair::PhFco2) {
        s.flags.insert(RowFlags::PH_CO2_PAIR);
    }
    for w in methods.range_warnings(&cond) {
        found.push(warn(FindingKind::MethodRange, format!("{w}; row kept"), "results outside a constant set's fitted range are less certain; consider another [chemistry] carbonic_acid set"));
    }
    match measured::solve_measured(&mp, &k, &opts) {
        Ok(sol) => {
            s.pair = Some(pair);
            s.ta_estimated = sol.ta_estimated;
            if let Some(f) = inconsistency(s, pair, &sol.misfits, file) {
                s.flags.insert(RowFlags::INCONSISTENT);
                found.push(f);
            }
            s.state = Some(sol.state);
        }
        Err(MeasuredError::Solve { error, .. }) => {
            found.push(warn(
                FindingKind::SolveFailed,
                format!("the carbonate system could not be solved from {}: {error}; row kept without a carbonate state", pair.label()),
                "check the measured values and their units",
            ));
        }
        Err(e @ MeasuredError::NoPair { .. }) => {
            // choose_pair found a pair above, so the solver does too; kept for safety.
            found.push(warn(
                FindingKind::NoPair,
                format!("{e}; row kept for temperature and salinity only"),
                "two of TA, DIC, pH, pCO2/fCO2 are needed (pCO2 with fCO2 is not a pair)",
            ));
        }
    }
    found
}

/// One warning for a row whose further measured quantities disagree with its state beyond
/// the solver's tolerances, with the measured and calculated values as typed values.
fn inconsistency(s: &Sample, pair: Pair, misfits: &[Misfit], file: usize) -> Option<Finding> {
    let mut texts = Vec::new();
    let mut values = Vec::new();
    for m in misfits.iter().filter(|m| m.exceeds()) {
        let (name, unit, measured_name, calculated_name, text) = match m.param {
            Param::Ta => ("TA", "µmol/kg", "ta_measured", "ta_calculated", None),
            Param::Dic => ("DIC", "µmol/kg", "dic_measured", "dic_calculated", None),
            Param::PhT => ("pH_T", "", "ph_t_measured", "ph_t_calculated", None),
            Param::Pco2 => ("pCO2", "µatm", "pco2_measured", "pco2_calculated", Some(())),
            Param::Fco2 => ("fCO2", "µatm", "fco2_measured", "fco2_calculated", Some(())),
            Param::Co3 => ("CO3", "µmol/kg", "co3_measured", "co3_calculated", Some(())),
        };
        values.push(Value::new(measured_name, m.measured, unit));
        values.push(Value::new(calculated_name, m.calculated, unit));
        let (v, c) = (m.measured, m.calculated);
        texts.push(match (m.param, text) {
            (Param::PhT, _) => {
                format!("{name} measured {v:.3} vs calculated {c:.3} (tolerance {TOL_PH})")
            }
            (_, Some(())) => format!(
                "{name} measured {v:.1} vs calculated {c:.1} {unit} (tolerance {:.0} %)",
                m.tolerance.limit * 100.0
            ),
            _ => format!(
                "{name} measured {v:.1} vs calculated {c:.1} {unit} (tolerance {TOL_TA_DIC_UMOL_KG})"
            ),
        });
    }
    if texts.is_empty() {
        return None;
    }
    Some(
        Finding::new(
            Severity::Warning,
            FindingKind::Inconsistent,
            file,
            s.source_file.clone(),
            s.line,
            format!(
                "measured and calculated values disagree (solved from {}): {}; row kept",
                pair.label(),
                texts.join("; ")
            ),
        )
        .with_values(values)
        .with_help(
            "check calibration, units and pH scale of this row; the state uses the preferred pair",
        ),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::site::records::test_util::{sample, units};
    use crate::site::schema::{Co2Kind, ConcUnit};

    /// The site's pair labels follow the measured-pair solver's documented order of
    /// preference (chem::measured), including TA estimated from salinity ahead of the poorly
    /// conditioned pH + pCO2 pair.
    #[test]
    fn pair_labels_follow_the_solvers_order() {
        let chosen = |m: &Measured, ta: Option<f64>| {
            let opts = Options { estimated_ta: ta };
            measured::choose_pair(&params(m), &opts).and_then(|(p, e)| Some((site_pair(p)?, e)))
        };
        let m = Measured::new(Some(2300.0), Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(chosen(&m, None), Some((Pair::TaDic, false)));
        let m = Measured::new(None, Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(chosen(&m, Some(2300.0)), Some((Pair::DicPh, false)));
        let m = Measured::new(None, None, Some(8.0), Some(400.0), None);
        assert_eq!(chosen(&m, Some(2300.0)), Some((Pair::TaPh, true)));
        assert_eq!(chosen(&m, None), Some((Pair::PhPco2, false)));
        let m = Measured::new(None, None, None, Some(400.0), Some(398.0));
        assert_eq!(chosen(&m, None), None);
        assert_eq!(m.count(), 1);
    }

    /// pH on the seawater scale, converted and solved with TA, reproduces the state solved
    /// from the total-scale pH directly; a third measured quantity off by more than the
    /// tolerance is reported (TA 2300, DIC 2000, 25 °C, S 35: pH_T 8.040225, fact sheet §7g, C).
    #[test]
    fn scale_conversion_and_consistency_check() {
        let methods = MethodSet::default();
        let cond = Conditions {
            temp_c: 25.0,
            salinity: 35.0,
            pressure_dbar: 0.0,
            silicate: 0.0,
            phosphate: 0.0,
        };
        let k = Constants::new(&cond, &methods);
        let ph_sws = chem::scales::from_total(8.040225, chem::scales::PhScale::Seawater, &k);
        let mut s = vec![sample(
            25.0,
            35.0,
            0.0,
            Measured::new(Some(2300.0), None, Some(ph_sws), None, None),
        )];
        let mut drop = vec![false];
        let f = solve_samples(
            &mut s,
            &mut drop,
            units(ConcUnit::UmolPerKg, Co2Kind::Pco2Uatm, PhScaleName::Sws),
            &methods,
            None,
            0,
        );
        assert!(f.is_empty(), "{f:?}");
        let st = s[0].state.unwrap_or_else(|| panic!("not solved"));
        assert!((st.dic - 2000.0).abs() < 0.05, "{st:?}");
        assert!((s[0].measured.ph_t().unwrap_or(0.0) - 8.040225).abs() < 1e-9);

        // Third quantity consistent: no finding. Off by 30 µmol/kg: one warning, row kept.
        for (dic, n) in [(2001.0, 0), (2030.0, 1)] {
            let mut s = vec![sample(
                25.0,
                35.0,
                0.0,
                Measured::new(Some(2300.0), Some(dic), Some(8.040225), None, None),
            )];
            let mut drop = vec![false];
            let f = solve_samples(
                &mut s,
                &mut drop,
                units(ConcUnit::UmolPerKg, Co2Kind::Pco2Uatm, PhScaleName::Total),
                &methods,
                None,
                0,
            );
            assert_eq!(
                f.iter()
                    .filter(|x| x.kind == FindingKind::Inconsistent)
                    .count(),
                n,
                "{f:?}"
            );
            assert!(s[0].state.is_some() && !drop[0]);
        }
    }
}
