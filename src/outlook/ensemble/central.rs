//! Every record projected on its own, with central constants, no measurement error and the
//! pathway's central warming, at each computed year: the base of the season means (each
//! member re-weights these by its bootstrap draw) and of the share of time below a level.

use rayon::prelude::*;

use crate::chem::{CarbonateState, Conditions, Constants, ConstantsMemo, Input};

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
    /// Omega_ar by each other rule compared, `(rule, [record * horizons + h])` (base case,
    /// central values; NaN where not solved); empty without the comparison.
    pub rule_omega: Vec<(Disequilibrium, Vec<f64>)>,
    /// Horizon years in `rule_omega`.
    pub horizons: usize,
}

impl Central {
    pub fn get(&self, variant: usize, record: usize, k: usize) -> Option<&Values> {
        self.at.get(variant)?.get(record * self.knots + k)
    }

    /// Omega_ar of `record` by rule `m` at horizon `h` (`None`: not compared).
    pub fn rule_omega(&self, m: Disequilibrium, record: usize, h: usize) -> Option<f64> {
        let (_, v) = self.rule_omega.iter().find(|(x, _)| *x == m)?;
        v.get(record * self.horizons + h).copied()
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
        .par_iter()
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
        .collect::<Vec<_>>()
        // The first record's error in file order, whatever the thread timing.
        .into_iter()
        .collect()
}

/// Projects every record under pathway `p` at every knot year and variant, by rule `mode`;
/// and at the horizon years, for the base case only, by each rule in `rules` too (the
/// comparison of the rules, [`super::rules`]), from the same year conditions.
pub(super) fn project_all(
    prep: &Prepared<'_>,
    p: usize,
    mode: Disequilibrium,
    rules: &[Disequilibrium],
) -> Central {
    let knots = &prep.knots;
    let nk = knots.len();
    let nv = prep.variants.len().max(1);
    let nh = prep.horizon_knot.len();
    let ctx = Context {
        prep,
        p,
        mode,
        rules,
        xco2: prep.s.pathways.get(p).map_or_else(Vec::new, |spec| {
            knots
                .iter()
                .map(|&y| {
                    spec.pathway
                        .xco2_ppm(&prep.site.observed, y)
                        .map_err(|e| OutlookError::Pathway(e).to_string())
                })
                .collect()
        }),
    };
    let per_record: Vec<RecordOut> = prep
        .site
        .records
        .par_iter()
        .enumerate()
        .map_init(
            || ConstantsMemo::new(&prep.site.methods),
            |memo, (ri, rec)| ctx.project_one(ri, rec, memo),
        )
        .collect();
    let mut at = vec![Vec::with_capacity(prep.site.records.len() * nk); nv];
    let mut rule_omega: Vec<(Disequilibrium, Vec<f64>)> = rules
        .iter()
        .map(|&m| (m, Vec::with_capacity(prep.site.records.len() * nh)))
        .collect();
    let mut failures = 0;
    let mut first_failure = None;
    for r in per_record {
        // r.values is [knot][variant]
        for k in 0..nk {
            for (v, out) in at.iter_mut().enumerate() {
                out.push(r.values.get(k * nv + v).copied().unwrap_or([f64::NAN; NQ]));
            }
        }
        // r.rules is [rule][horizon]
        for (j, (_, out)) in rule_omega.iter_mut().enumerate() {
            for h in 0..nh {
                out.push(r.rules.get(j * nh + h).copied().unwrap_or(f64::NAN));
            }
        }
        failures += r.failures;
        if first_failure.is_none() {
            first_failure = r.first_failure;
        }
    }
    Central {
        at,
        knots: nk,
        failures,
        first_failure,
        rule_omega,
        horizons: nh,
    }
}

/// What [`project_all`] works with, the same for every record.
struct Context<'a, 'p> {
    prep: &'a Prepared<'p>,
    p: usize,
    mode: Disequilibrium,
    rules: &'a [Disequilibrium],
    /// The pathway's CO2 at each knot year, ppm, or the message.
    xco2: Vec<Result<f64, String>>,
}

/// One record's projections.
struct RecordOut {
    /// `[knot][variant]` flattened.
    values: Vec<Values>,
    /// Omega_ar by each other rule, `[rule][horizon]` flattened (base case).
    rules: Vec<f64>,
    failures: usize,
    first_failure: Option<String>,
}

impl Context<'_, '_> {
    /// One record under the pathway; `memo` caches the source water's constants.
    fn project_one(
        &self,
        ri: usize,
        rec: &ProjectionRecord,
        memo: &mut ConstantsMemo,
    ) -> RecordOut {
        let (prep, mode) = (self.prep, self.mode);
        let (site, s) = (prep.site, prep.s);
        let (nk, nv) = (prep.knots.len(), prep.variants.len().max(1));
        let nh = prep.horizon_knot.len();
        let mut out = RecordOut {
            values: Vec::with_capacity(nk * nv),
            rules: vec![f64::NAN; self.rules.len() * nh],
            failures: 0,
            first_failure: None,
        };
        let (Some(spec), Some(anchor)) = (
            s.pathways.get(self.p),
            prep.anchors.get(self.p).and_then(|a| a.get(ri)),
        ) else {
            return out;
        };
        let fail = |out: &mut RecordOut, msg: String, year: i32| {
            out.failures += 1;
            if out.first_failure.is_none() {
                out.first_failure = Some(format!(
                    "{}: {} {year}: {msg}",
                    rec.label, spec.pathway.name
                ));
            }
        };
        // The year conditions carry the source water's when any rule run here uses it.
        let yc_mode = if self.rules.contains(&Disequilibrium::SourceOffsets) {
            Disequilibrium::SourceOffsets
        } else {
            mode
        };
        let start = Start::central(rec).holding_offsets(rec, anchor, yc_mode, None);
        for (k, (&year, xco2)) in prep.knots.iter().zip(&self.xco2).enumerate() {
            let xco2 = match xco2 {
                Ok(x) => *x,
                Err(e) => {
                    fail(&mut out, e.clone(), year);
                    out.values.extend(std::iter::repeat_n([f64::NAN; NQ], nv));
                    continue;
                }
            };
            let change = if s.warming {
                spec.warming.change_between(rec.sample_year, year)
            } else {
                0.0
            };
            let yc = YearConditions::at(
                rec,
                xco2,
                change,
                &site.methods,
                year,
                yc_mode,
                &mut |c: &Conditions| memo.get(c),
            );
            for v in prep.variants.iter().take(nv) {
                let offsets = v.offsets_for(rec.season, year);
                match project_state(rec, anchor, &start, &yc, None, mode, offsets) {
                    Ok(st) => out.values.push(values_of(&st, yc.temp_c)),
                    Err(msg) => {
                        fail(&mut out, msg, year);
                        out.values.push([f64::NAN; NQ]);
                    }
                }
            }
            // The other rules at the horizon years: the year conditions are the same (the
            // ratio and additive rules do not use the source water's).
            let offsets = prep
                .variants
                .first()
                .and_then(|v| v.offsets_for(rec.season, year));
            for (h, _) in prep
                .horizon_knot
                .iter()
                .enumerate()
                .filter(|(_, hk)| **hk == k)
            {
                for (j, &m) in self.rules.iter().enumerate() {
                    if let (Ok(st), Some(slot)) = (
                        project_state(rec, anchor, &start, &yc, None, m, offsets),
                        out.rules.get_mut(j * nh + h),
                    ) {
                        *slot = st.omega_ar;
                    }
                }
            }
        }
        out
    }
}
