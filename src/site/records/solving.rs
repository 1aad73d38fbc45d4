//! Choosing each row's pair and solving its carbonate state, with the consistency check of
//! rows that measured more than two quantities.

use rayon::prelude::*;

use super::sample::{Measured, Pair, RowFlags, Sample};
use super::units::{FileUnits, limit_finding};
use crate::chem::{self, CarbonateState, Conditions, Constants, Input, MethodSet};
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

/// Chooses the pair to solve from, in the documented order of preference.
pub(crate) fn choose_pair(m: &Measured, ta_est: Option<f64>) -> Option<(Pair, Input, Input, bool)> {
    use Input as I;
    let (ta, dic, ph, pco2, fco2) = (m.ta(), m.dic(), m.ph_t(), m.pco2(), m.fco2());
    let measured = [
        (Pair::TaDic, ta.map(I::Ta), dic.map(I::Dic)),
        (Pair::TaPh, ta.map(I::Ta), ph.map(I::PhT)),
        (Pair::TaPco2, ta.map(I::Ta), pco2.map(I::Pco2)),
        (Pair::TaFco2, ta.map(I::Ta), fco2.map(I::Fco2)),
        (Pair::DicPh, dic.map(I::Dic), ph.map(I::PhT)),
        (Pair::DicPco2, dic.map(I::Dic), pco2.map(I::Pco2)),
        (Pair::DicFco2, dic.map(I::Dic), fco2.map(I::Fco2)),
    ];
    for (p, a, b) in measured {
        if let (Some(a), Some(b)) = (a, b) {
            return Some((p, a, b, false));
        }
    }
    if ta.is_none()
        && let Some(t) = ta_est
    {
        for (p, b) in [
            (Pair::TaPh, ph.map(I::PhT)),
            (Pair::TaPco2, pco2.map(I::Pco2)),
            (Pair::TaFco2, fco2.map(I::Fco2)),
        ] {
            if let Some(b) = b {
                return Some((p, I::Ta(t), b, true));
            }
        }
    }
    for (p, a, b) in [
        (Pair::PhPco2, ph.map(I::PhT), pco2.map(I::Pco2)),
        (Pair::PhFco2, ph.map(I::PhT), fco2.map(I::Fco2)),
    ] {
        if let (Some(a), Some(b)) = (a, b) {
            return Some((p, a, b, false));
        }
    }
    None
}

/// Internal-consistency tolerances (measured − calculated) for rows with three or more
/// measured carbonate quantities. Common practice; the pH and TA/DIC values equal the
/// GOA-ON "weather" quality goals (Newton et al. 2015, from memory; fact sheet §2c), the
/// pCO2 tolerance is twice that goal to allow for equilibrator and constant errors.
pub const TOL_PH: f64 = 0.02;
pub const TOL_TA_DIC_UMOL_KG: f64 = 10.0;
pub const TOL_CO2_FRACTION: f64 = 0.05;

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
    let Some((pair, a, b, estimated)) = choose_pair(&s.measured, ta_est) else {
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
    match chem::solve_pair(a, b, &k) {
        Ok(st) => {
            s.pair = Some(pair);
            s.ta_estimated = estimated;
            if s.measured.count() >= 3 {
                consistency(s, &st, pair, &mut found, file);
            }
            s.state = Some(st);
        }
        Err(e) => {
            found.push(warn(
                FindingKind::SolveFailed,
                format!("the carbonate system could not be solved from {}: {e}; row kept without a carbonate state", pair.label()),
                "check the measured values and their units",
            ));
        }
    }
    found
}

fn consistency(
    s: &mut Sample,
    st: &CarbonateState,
    pair: Pair,
    found: &mut Vec<Finding>,
    file: usize,
) {
    let m = s.measured;
    let in_pair = |q: &str| match pair {
        Pair::TaDic => q == "ta" || q == "dic",
        Pair::TaPh => q == "ta" || q == "ph",
        Pair::TaPco2 | Pair::TaFco2 => q == "ta" || q == "co2",
        Pair::DicPh => q == "dic" || q == "ph",
        Pair::DicPco2 | Pair::DicFco2 => q == "dic" || q == "co2",
        Pair::PhPco2 | Pair::PhFco2 => q == "ph" || q == "co2",
    };
    let mut misfits = Vec::new();
    let mut values = Vec::new();
    if let (Some(v), false) = (m.ta(), in_pair("ta"))
        && (v - st.ta).abs() > TOL_TA_DIC_UMOL_KG
    {
        values.push(Value::new("ta_measured", v, "µmol/kg"));
        values.push(Value::new("ta_calculated", st.ta, "µmol/kg"));
        misfits.push(format!(
            "TA measured {v:.1} vs calculated {:.1} µmol/kg (tolerance {TOL_TA_DIC_UMOL_KG})",
            st.ta
        ));
    }
    if let (Some(v), false) = (m.dic(), in_pair("dic"))
        && (v - st.dic).abs() > TOL_TA_DIC_UMOL_KG
    {
        values.push(Value::new("dic_measured", v, "µmol/kg"));
        values.push(Value::new("dic_calculated", st.dic, "µmol/kg"));
        misfits.push(format!(
            "DIC measured {v:.1} vs calculated {:.1} µmol/kg (tolerance {TOL_TA_DIC_UMOL_KG})",
            st.dic
        ));
    }
    if let (Some(v), false) = (m.ph_t(), in_pair("ph"))
        && (v - st.ph_t).abs() > TOL_PH
    {
        values.push(Value::new("ph_t_measured", v, ""));
        values.push(Value::new("ph_t_calculated", st.ph_t, ""));
        misfits.push(format!(
            "pH_T measured {v:.3} vs calculated {:.3} (tolerance {TOL_PH})",
            st.ph_t
        ));
    }
    for (name, v, c) in [("pCO2", m.pco2(), st.pco2), ("fCO2", m.fco2(), st.fco2)] {
        let Some(v) = v else { continue };
        let used = match pair {
            Pair::TaPco2 | Pair::DicPco2 | Pair::PhPco2 => name == "pCO2",
            Pair::TaFco2 | Pair::DicFco2 | Pair::PhFco2 => name == "fCO2",
            _ => false,
        };
        if !used && c > 0.0 && ((v - c) / c).abs() > TOL_CO2_FRACTION {
            let (m_name, c_name) = if name == "pCO2" {
                ("pco2_measured", "pco2_calculated")
            } else {
                ("fco2_measured", "fco2_calculated")
            };
            values.push(Value::new(m_name, v, "µatm"));
            values.push(Value::new(c_name, c, "µatm"));
            misfits.push(format!(
                "{name} measured {v:.1} vs calculated {c:.1} µatm (tolerance {:.0} %)",
                TOL_CO2_FRACTION * 100.0
            ));
        }
    }
    if !misfits.is_empty() {
        s.flags.insert(RowFlags::INCONSISTENT);
        found.push(
            Finding::new(
                Severity::Warning,
                FindingKind::Inconsistent,
                file,
                s.source_file.clone(),
                s.line,
                format!(
                    "measured and calculated values disagree (solved from {}): {}; row kept",
                    pair.label(),
                    misfits.join("; ")
                ),
            )
            .with_values(values)
            .with_help("check calibration, units and pH scale of this row; the state uses the preferred pair"),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::site::records::test_util::{sample, units};
    use crate::site::schema::{Co2Kind, ConcUnit};

    /// The documented order of preference, including TA estimated from salinity ahead of the
    /// poorly conditioned pH + pCO2 pair.
    #[test]
    fn pair_preference() {
        let m = Measured::new(Some(2300.0), Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(choose_pair(&m, None).map(|p| p.0), Some(Pair::TaDic));
        let m = Measured::new(None, Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(
            choose_pair(&m, Some(2300.0)).map(|p| (p.0, p.3)),
            Some((Pair::DicPh, false))
        );
        let m = Measured::new(None, None, Some(8.0), Some(400.0), None);
        assert_eq!(
            choose_pair(&m, Some(2300.0)).map(|p| (p.0, p.3)),
            Some((Pair::TaPh, true))
        );
        assert_eq!(choose_pair(&m, None).map(|p| p.0), Some(Pair::PhPco2));
        let m = Measured::new(None, None, None, Some(400.0), Some(398.0));
        assert!(choose_pair(&m, None).is_none());
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
