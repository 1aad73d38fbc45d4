//! Every record projected on its own, with central constants, no measurement error and the
//! pathway's central warming, at each computed year: the base of the season means (each
//! member re-weights these by its bootstrap draw) and of the share of time below a level.

use rayon::prelude::*;

use crate::chem::{CarbonateState, Constants, Input};

use super::super::projection::{
    Disequilibrium, RecordAnchor, Start, YearConditions, project_state,
};
use super::super::{OutlookError, ProjectionRecord, SiteInput};
use super::prepare::Prepared;
use super::settings::input_err;

/// Number of carbonate-state quantities carried per record (the order of
/// `Quantity::STATE`: Omega_ar, Omega_ca, pH_T, pCO2, DIC, TA, CO3, temperature).
pub(super) const NQ: usize = 8;

/// The state quantities of one record or one mean, in `Quantity::STATE` order.
pub(super) type Values = [f64; NQ];

/// Values of a solved state at temperature `temp_c`.
pub(super) fn values_of(st: &CarbonateState, temp_c: f64) -> Values {
    [
        st.omega_ar,
        st.omega_ca,
        st.ph_t,
        st.pco2,
        st.dic,
        st.ta,
        st.co3,
        temp_c,
    ]
}

/// Position of Omega_ar in [`Values`].
pub(super) const OMEGA_AR: usize = 0;
/// Position of pH_T in [`Values`].
pub(super) const PH_T: usize = 2;
/// Position of pCO2 in [`Values`].
pub(super) const PCO2: usize = 3;
/// Position of the temperature in [`Values`].
pub(super) const TEMP: usize = 7;

/// All records of a site under one pathway.
pub(super) struct Central {
    /// `at[variant][record * knots + k]`; NaN where the record could not be solved.
    pub at: Vec<Vec<Values>>,
    pub knots: usize,
    /// Record-years that could not be solved, and the first message.
    pub failures: usize,
    pub first_failure: Option<String>,
}

impl Central {
    pub fn get(&self, variant: usize, record: usize, k: usize) -> Option<&Values> {
        self.at.get(variant)?.get(record * self.knots + k)
    }
}

/// Each record at its sampling conditions (central constants): its present-day values.
/// The seawater pCO2 goes through the same disequilibrium arithmetic as any projected year
/// (with the sampling year's atmosphere), so that a year with the sampling year's
/// atmosphere and temperature reproduces these values bit for bit.
pub(super) fn present_values(
    site: &SiteInput,
    anchors: &[RecordAnchor],
    mode: Disequilibrium,
) -> Result<Vec<Values>, OutlookError> {
    site.records
        .iter()
        .zip(anchors)
        .map(|(r, a)| {
            let k = Constants::new(&r.conditions_at(r.temp_c), &site.methods);
            let pco2 = a.project_pco2(r.pco2, a.pco2_air_sample, mode);
            crate::chem::solve_pair(Input::Ta(r.ta), Input::Pco2(pco2), &k)
                .map(|st| values_of(&st, r.temp_c))
                .map_err(|e| {
                    input_err(format!(
                        "{}: the record's state at sampling cannot be solved from TA {} \
                         umol/kg and pCO2 {} uatm: {e}",
                        r.label, r.ta, r.pco2
                    ))
                })
        })
        .collect()
}

/// Projects every record under pathway `p` at every knot year and variant, by rule `mode`
/// (the settings' rule, or another for the comparison of the rules).
pub(super) fn project_all(prep: &Prepared<'_>, p: usize, mode: Disequilibrium) -> Central {
    project_at(prep, p, mode, &prep.knots, prep.variants.len())
}

/// Every record under pathway `p` by rule `mode` at the years `knots` only, for the first
/// `nv` variants (1: the base case only). `Central::get`'s `k` then indexes `knots`.
pub(super) fn project_at(
    prep: &Prepared<'_>,
    p: usize,
    mode: Disequilibrium,
    knots: &[i32],
    nv: usize,
) -> Central {
    let nk = knots.len();
    let nv = nv.clamp(1, prep.variants.len().max(1));
    let per_record: Vec<(Vec<Values>, usize, Option<String>)> = prep
        .site
        .records
        .par_iter()
        .enumerate()
        .map(|(ri, rec)| project_one(prep, p, mode, ri, rec, knots, nv))
        .collect();
    let mut at = vec![Vec::with_capacity(prep.site.records.len() * nk); nv];
    let mut failures = 0;
    let mut first_failure = None;
    for (vals, fails, first) in per_record {
        // vals is [knot][variant]
        for k in 0..nk {
            for (v, out) in at.iter_mut().enumerate() {
                out.push(vals.get(k * nv + v).copied().unwrap_or([f64::NAN; NQ]));
            }
        }
        failures += fails;
        if first_failure.is_none() {
            first_failure = first;
        }
    }
    Central {
        at,
        knots: nk,
        failures,
        first_failure,
    }
}

/// One record under pathway `p`: `[knot][variant]` flattened, failures, first message.
fn project_one(
    prep: &Prepared<'_>,
    p: usize,
    mode: Disequilibrium,
    ri: usize,
    rec: &ProjectionRecord,
    knots: &[i32],
    nv: usize,
) -> (Vec<Values>, usize, Option<String>) {
    let (site, s) = (prep.site, prep.s);
    let mut out = Vec::with_capacity(knots.len() * nv);
    let mut failures = 0;
    let mut first = None;
    let (Some(spec), Some(anchor)) = (
        s.pathways.get(p),
        prep.anchors.get(p).and_then(|a| a.get(ri)),
    ) else {
        return (out, 0, None);
    };
    let warming = s.warming.then_some(&spec.warming);
    let mut fail = |msg: String, year: i32| {
        failures += 1;
        if first.is_none() {
            first = Some(format!(
                "{}: {} {year}: {msg}",
                rec.label, spec.pathway.name
            ));
        }
    };
    for &year in knots {
        let yc = match YearConditions::new(
            rec,
            &spec.pathway,
            &site.observed,
            warming,
            &site.methods,
            year,
            mode,
        ) {
            Ok(c) => c,
            Err(e) => {
                fail(e.to_string(), year);
                out.extend(std::iter::repeat_n([f64::NAN; NQ], nv));
                continue;
            }
        };
        let start = Start::central(rec);
        for v in prep.variants.iter().take(nv) {
            let offsets = v.offsets_for(rec.season, year);
            match project_state(rec, anchor, &start, &yc, None, mode, offsets) {
                Ok(st) => out.push(values_of(&st, yc.temp_c)),
                Err(msg) => {
                    fail(msg, year);
                    out.push([f64::NAN; NQ]);
                }
            }
        }
    }
    (out, failures, first)
}
