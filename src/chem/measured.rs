//! One sample's measured carbonate parameters → the preferred pair, the state, and how well
//! every further measured parameter agrees with it. Both the `solve` command and the site
//! record reader use this, so a sample is judged alike everywhere.
//!
//! # API
//!
//! ```
//! use calcisite::chem::measured::{self, MeasuredParams, Options, Param};
//! use calcisite::chem::{Conditions, Constants, MethodSet};
//!
//! let k = Constants::new(&Conditions::surface(25.0, 35.0), &MethodSet::default());
//! let m = MeasuredParams {
//!     ta: Some(2300.0),
//!     dic: Some(2000.0),
//!     pco2: Some(500.0),
//!     ..Default::default()
//! };
//! let sol = measured::solve_measured(&m, &k, &Options::default()).unwrap();
//! assert_eq!(sol.pair.to_string(), "ta+dic");
//! let pco2 = &sol.misfits[0];
//! assert_eq!(pco2.param, Param::Pco2);
//! assert!(pco2.exceeds()); // 500 µatm measured, about 403 calculated
//! ```
//!
//! * [`MeasuredParams`]: TA, DIC (µmol/kg), pH on the **total** scale (convert first with
//!   [`super::scales::to_total`]), pCO2, fCO2 (µatm, in-situ temperature, one atmosphere)
//!   and CO3²⁻ (µmol/kg); `None` for not measured.
//! * [`solve_measured`]`(&MeasuredParams, &Constants, &Options) -> Result<Solution,
//!   MeasuredError>`. [`Options::estimated_ta`] supplies a TA estimate (e.g. from a
//!   TA–salinity relationship) for samples without measured TA; it is used only where the
//!   order below says so, and [`Solution::ta_estimated`] tells.
//! * [`Solution`]: the [`Pair`] used (`Display` gives `ta+dic`), the [`CarbonateState`], and
//!   one [`Misfit`] per measured parameter outside the pair, in [`Param::ALL`] order, with
//!   measured and calculated value, the difference and the tolerance;
//!   [`Misfit::exceeds`] says whether it is beyond the tolerance.
//! * [`MeasuredError::NoPair`] (fewer than two distinct quantities; pCO2 with fCO2 is one
//!   quantity) or [`MeasuredError::Solve`] (the chosen pair has no solution; the
//!   [`ChemError`] names the parameter and limit).
//! * [`choose_pair`] alone, without solving, for callers that report the pair first.
//!
//! # Order of preference
//!
//! The first pair in this list whose two parameters are both measured is solved
//! ([`PREFERENCE`]); TA + DIC is the usual choice and the pH + CO2 pairs are the worst
//! conditioned (Dickson, Sabine & Christian 2007, *Guide to Best Practices for Ocean CO2
//! Measurements*, chapter 1; small errors in pH or CO2 give large errors in TA and DIC):
//!
//! 1. TA + DIC, TA + pH, TA + pCO2, TA + fCO2, DIC + pH, DIC + pCO2, DIC + fCO2;
//! 2. TA + CO3, DIC + CO3, pH + CO3, pCO2 + CO3, fCO2 + CO3;
//! 3. without measured TA and with [`Options::estimated_ta`]: estimated TA + pH, + pCO2,
//!    + fCO2, + CO3;
//! 4. pH + pCO2, pH + fCO2 ([`Pair::is_poorly_conditioned`]).
//!
//! # Consistency tolerances
//!
//! Measured minus calculated, beyond which a further parameter is flagged (common practice:
//! the pH and TA/DIC values equal the GOA-ON "weather" quality goals, Newton et al. 2015,
//! from memory; the CO2 tolerance is twice that goal to allow for equilibrator and constant
//! errors; CO3 shares it): TA and DIC [`TOL_TA_DIC_UMOL_KG`] µmol/kg, pH [`TOL_PH`],
//! pCO2, fCO2 and CO3 [`TOL_CO2_FRACTION`] of the calculated value.

use std::fmt;

use super::{CarbonateState, ChemError, Constants, Input, solve_pair};

/// pH tolerance of the consistency check (common practice, see the module doc).
pub const TOL_PH: f64 = 0.02;
/// TA and DIC tolerance of the consistency check, µmol/kg (common practice).
pub const TOL_TA_DIC_UMOL_KG: f64 = 10.0;
/// pCO2, fCO2 and CO3 tolerance, as a fraction of the calculated value (common practice).
pub const TOL_CO2_FRACTION: f64 = 0.05;

/// One measurable carbonate-system parameter.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Param {
    Ta,
    Dic,
    /// pH on the total scale.
    PhT,
    Pco2,
    Fco2,
    Co3,
}

/// How far a measured value may be from the calculated one.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tolerance {
    /// The largest accepted |difference|.
    pub limit: f64,
    /// True when the difference is a fraction of the calculated value.
    pub relative: bool,
}

impl Param {
    /// Every parameter, in the order misfits are reported.
    pub const ALL: [Param; 6] = [
        Param::Ta,
        Param::Dic,
        Param::PhT,
        Param::Pco2,
        Param::Fco2,
        Param::Co3,
    ];

    /// The column name used in CSV files (`ta`, `dic`, `ph_t`, `pco2`, `fco2`, `co3`).
    pub fn column(self) -> &'static str {
        match self {
            Param::Ta => "ta",
            Param::Dic => "dic",
            Param::PhT => "ph_t",
            Param::Pco2 => "pco2",
            Param::Fco2 => "fco2",
            Param::Co3 => "co3",
        }
    }

    /// The solver input carrying `v`.
    pub fn input(self, v: f64) -> Input {
        match self {
            Param::Ta => Input::Ta(v),
            Param::Dic => Input::Dic(v),
            Param::PhT => Input::PhT(v),
            Param::Pco2 => Input::Pco2(v),
            Param::Fco2 => Input::Fco2(v),
            Param::Co3 => Input::Co3(v),
        }
    }

    /// This parameter's value in a solved state.
    pub fn of(self, st: &CarbonateState) -> f64 {
        match self {
            Param::Ta => st.ta,
            Param::Dic => st.dic,
            Param::PhT => st.ph_t,
            Param::Pco2 => st.pco2,
            Param::Fco2 => st.fco2,
            Param::Co3 => st.co3,
        }
    }

    /// The consistency tolerance (see the module doc).
    pub fn tolerance(self) -> Tolerance {
        match self {
            Param::Ta | Param::Dic => Tolerance {
                limit: TOL_TA_DIC_UMOL_KG,
                relative: false,
            },
            Param::PhT => Tolerance {
                limit: TOL_PH,
                relative: false,
            },
            Param::Pco2 | Param::Fco2 | Param::Co3 => Tolerance {
                limit: TOL_CO2_FRACTION,
                relative: true,
            },
        }
    }

    /// pCO2 and fCO2 carry the same information: they are one quantity.
    fn quantity(self) -> u8 {
        match self {
            Param::Ta => 0,
            Param::Dic => 1,
            Param::PhT => 2,
            Param::Pco2 | Param::Fco2 => 3,
            Param::Co3 => 4,
        }
    }
}

/// The measured parameters of one sample (µmol/kg, total-scale pH, µatm); `None` = not
/// measured.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct MeasuredParams {
    pub ta: Option<f64>,
    pub dic: Option<f64>,
    pub ph_t: Option<f64>,
    pub pco2: Option<f64>,
    pub fco2: Option<f64>,
    pub co3: Option<f64>,
}

impl MeasuredParams {
    /// The value of `p`, if measured.
    pub fn get(&self, p: Param) -> Option<f64> {
        match p {
            Param::Ta => self.ta,
            Param::Dic => self.dic,
            Param::PhT => self.ph_t,
            Param::Pco2 => self.pco2,
            Param::Fco2 => self.fco2,
            Param::Co3 => self.co3,
        }
    }

    /// Set (or clear) the value of `p`.
    pub fn set(&mut self, p: Param, v: Option<f64>) {
        let slot = match p {
            Param::Ta => &mut self.ta,
            Param::Dic => &mut self.dic,
            Param::PhT => &mut self.ph_t,
            Param::Pco2 => &mut self.pco2,
            Param::Fco2 => &mut self.fco2,
            Param::Co3 => &mut self.co3,
        };
        *slot = v;
    }

    /// The measured parameters, in [`Param::ALL`] order.
    pub fn given(&self) -> Vec<Param> {
        Param::ALL
            .into_iter()
            .filter(|p| self.get(*p).is_some())
            .collect()
    }

    /// How many distinct quantities are measured (pCO2 and fCO2 count as one).
    pub fn count(&self) -> usize {
        let mut seen = [false; 5];
        for p in self.given() {
            if let Some(s) = seen.get_mut(usize::from(p.quantity())) {
                *s = true;
            }
        }
        seen.iter().filter(|s| **s).count()
    }
}

/// Two parameters solved together.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Pair(pub Param, pub Param);

impl Pair {
    /// Whether `p` is one of the two.
    pub fn contains(&self, p: Param) -> bool {
        self.0 == p || self.1 == p
    }
    /// pH with pCO2 or fCO2: small errors in either give large errors in TA and DIC.
    pub fn is_poorly_conditioned(&self) -> bool {
        self.0 == Param::PhT && matches!(self.1, Param::Pco2 | Param::Fco2)
    }
}

impl fmt::Display for Pair {
    /// `ta+dic`: the two column names joined by `+`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}+{}", self.0.column(), self.1.column())
    }
}

const fn pair(a: Param, b: Param) -> Pair {
    Pair(a, b)
}

/// Measured pairs in order of preference (tiers 1, 2 and 4 of the module doc; tier 3, the
/// estimated TA, is tried before the last two).
pub const PREFERENCE: [Pair; 14] = {
    use Param::*;
    [
        pair(Ta, Dic),
        pair(Ta, PhT),
        pair(Ta, Pco2),
        pair(Ta, Fco2),
        pair(Dic, PhT),
        pair(Dic, Pco2),
        pair(Dic, Fco2),
        pair(Ta, Co3),
        pair(Dic, Co3),
        pair(PhT, Co3),
        pair(Pco2, Co3),
        pair(Fco2, Co3),
        pair(PhT, Pco2),
        pair(PhT, Fco2),
    ]
};

/// How many of [`PREFERENCE`] come before the estimated-TA pairs.
const BEFORE_ESTIMATED_TA: usize = 12;

/// Choices beyond the measured values.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Options {
    /// TA (µmol/kg) to pair with pH, pCO2, fCO2 or CO3 when TA was not measured (tier 3 of
    /// the order of preference).
    pub estimated_ta: Option<f64>,
}

/// A measured parameter outside the solved pair, against the state.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Misfit {
    pub param: Param,
    pub measured: f64,
    pub calculated: f64,
    /// Measured − calculated; divided by the calculated value when the tolerance is
    /// relative (infinite when that value is not positive).
    pub difference: f64,
    pub tolerance: Tolerance,
}

impl Misfit {
    /// Whether the difference is beyond the tolerance.
    pub fn exceeds(&self) -> bool {
        // A NaN difference counts as beyond.
        self.difference.is_nan() || self.difference.abs() > self.tolerance.limit
    }
}

/// The result for one sample.
#[derive(Clone, Debug, PartialEq)]
pub struct Solution {
    /// The pair solved from.
    pub pair: Pair,
    /// True when the pair's TA is [`Options::estimated_ta`], not a measurement.
    pub ta_estimated: bool,
    pub state: CarbonateState,
    /// One per measured parameter outside the pair, in [`Param::ALL`] order.
    pub misfits: Vec<Misfit>,
}

impl Solution {
    /// The misfits beyond their tolerance.
    pub fn inconsistent(&self) -> impl Iterator<Item = &Misfit> {
        self.misfits.iter().filter(|m| m.exceeds())
    }
}

/// Why a sample could not be solved.
#[derive(Clone, Debug, PartialEq)]
pub enum MeasuredError {
    /// Fewer than two distinct quantities (pCO2 with fCO2 is one); `given` lists what was
    /// measured, in [`Param::ALL`] order.
    NoPair { given: Vec<Param> },
    /// The preferred pair has no seawater solution or a value is outside its limit.
    Solve { pair: Pair, error: ChemError },
}

impl fmt::Display for MeasuredError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            MeasuredError::NoPair { given } if given.len() >= 2 => f.write_str(
                "pco2 with fco2 is not a valid pair: they carry the same information; \
                 give one of them with ta, dic, ph_t or co3",
            ),
            MeasuredError::NoPair { given } => {
                let names: Vec<&str> = given.iter().map(|p| p.column()).collect();
                write!(
                    f,
                    "two of ta, dic, ph_t, pco2/fco2, co3 are needed, this row gives {}",
                    if names.is_empty() {
                        "none".to_string()
                    } else {
                        format!("{} only", names.join(", "))
                    }
                )
            }
            MeasuredError::Solve { error, .. } => write!(f, "{error}"),
        }
    }
}

impl std::error::Error for MeasuredError {}

/// The pair [`solve_measured`] would use, and whether its TA is the estimate.
pub fn choose_pair(m: &MeasuredParams, opts: &Options) -> Option<(Pair, bool)> {
    let has = |p: Param| m.get(p).is_some();
    let (first, last) = PREFERENCE.split_at(BEFORE_ESTIMATED_TA);
    if let Some(p) = first.iter().find(|p| has(p.0) && has(p.1)) {
        return Some((*p, false));
    }
    if !has(Param::Ta) && opts.estimated_ta.is_some() {
        for other in [Param::PhT, Param::Pco2, Param::Fco2, Param::Co3] {
            if has(other) {
                return Some((Pair(Param::Ta, other), true));
            }
        }
    }
    last.iter()
        .find(|p| has(p.0) && has(p.1))
        .map(|p| (*p, false))
}

/// Solve one sample from its preferred pair and check every further measured parameter.
pub fn solve_measured(
    m: &MeasuredParams,
    k: &Constants,
    opts: &Options,
) -> Result<Solution, MeasuredError> {
    let Some((pair, ta_estimated)) = choose_pair(m, opts) else {
        return Err(MeasuredError::NoPair { given: m.given() });
    };
    let value = |p: Param| {
        if ta_estimated && p == Param::Ta {
            opts.estimated_ta
        } else {
            m.get(p)
        }
    };
    let (Some(a), Some(b)) = (value(pair.0), value(pair.1)) else {
        // choose_pair only returns pairs whose two values are present.
        return Err(MeasuredError::NoPair { given: m.given() });
    };
    let state = solve_pair(pair.0.input(a), pair.1.input(b), k)
        .map_err(|error| MeasuredError::Solve { pair, error })?;
    let misfits = Param::ALL
        .into_iter()
        .filter(|p| !pair.contains(*p))
        .filter_map(|p| m.get(p).map(|v| misfit(p, v, &state)))
        .collect();
    Ok(Solution {
        pair,
        ta_estimated,
        state,
        misfits,
    })
}

fn misfit(param: Param, measured: f64, st: &CarbonateState) -> Misfit {
    let calculated = param.of(st);
    let tolerance = param.tolerance();
    let difference = if !tolerance.relative {
        measured - calculated
    } else if calculated > 0.0 {
        (measured - calculated) / calculated
    } else {
        f64::INFINITY
    };
    Misfit {
        param,
        measured,
        calculated,
        difference,
        tolerance,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{Conditions, MethodSet};

    fn k() -> Constants {
        Constants::new(&Conditions::surface(25.0, 35.0), &MethodSet::default())
    }

    fn params(given: &[Param], v: f64) -> MeasuredParams {
        let mut m = MeasuredParams::default();
        for p in given {
            m.set(*p, Some(v));
        }
        m
    }

    /// The order `solve` used before this module existed, written out here as the
    /// expectation: TA + DIC, TA + pH, DIC + pH, then the CO2 and CO3 pairs, pH + CO2 last.
    /// For every subset of the six parameters both orders choose the same pair.
    #[test]
    fn preference_matches_the_former_solve_order_on_every_subset() {
        use Param::*;
        let former = [
            (Ta, Dic),
            (Ta, PhT),
            (Dic, PhT),
            (Ta, Pco2),
            (Ta, Fco2),
            (Dic, Pco2),
            (Dic, Fco2),
            (Ta, Co3),
            (Dic, Co3),
            (PhT, Co3),
            (Pco2, Co3),
            (Fco2, Co3),
            (PhT, Pco2),
            (PhT, Fco2),
        ];
        for bits in 0u32..64 {
            let given: Vec<Param> = Param::ALL
                .into_iter()
                .enumerate()
                .filter(|(i, _)| bits & (1 << i) != 0)
                .map(|(_, p)| p)
                .collect();
            let m = params(&given, 1.0);
            let has = |p| given.contains(&p);
            let want = former.iter().find(|(a, b)| has(*a) && has(*b));
            let got = choose_pair(&m, &Options::default()).map(|(p, _)| (p.0, p.1));
            assert_eq!(got.as_ref(), want, "{given:?}");
        }
    }

    #[test]
    fn estimated_ta_comes_before_the_ph_co2_pairs_only() {
        let opts = Options {
            estimated_ta: Some(2300.0),
        };
        let m = params(&[Param::PhT, Param::Pco2], 1.0);
        assert_eq!(
            choose_pair(&m, &opts),
            Some((Pair(Param::Ta, Param::PhT), true))
        );
        let m = params(&[Param::Dic, Param::PhT], 1.0);
        assert_eq!(
            choose_pair(&m, &opts),
            Some((Pair(Param::Dic, Param::PhT), false))
        );
        // With measured TA the estimate is never used.
        let m = params(&[Param::Ta], 1.0);
        assert_eq!(choose_pair(&m, &opts), None);
    }

    #[test]
    fn pair_labels_and_conditioning() {
        assert_eq!(PREFERENCE[0].to_string(), "ta+dic");
        assert_eq!(Pair(Param::PhT, Param::Fco2).to_string(), "ph_t+fco2");
        let poor: Vec<String> = PREFERENCE
            .iter()
            .filter(|p| p.is_poorly_conditioned())
            .map(ToString::to_string)
            .collect();
        assert_eq!(poor, ["ph_t+pco2", "ph_t+fco2"]);
    }

    #[test]
    fn too_few_parameters_name_what_was_given() {
        let e =
            solve_measured(&params(&[Param::Ta], 2300.0), &k(), &Options::default()).unwrap_err();
        assert_eq!(
            e.to_string(),
            "two of ta, dic, ph_t, pco2/fco2, co3 are needed, this row gives ta only"
        );
        let e = solve_measured(
            &params(&[Param::Pco2, Param::Fco2], 400.0),
            &k(),
            &Options::default(),
        )
        .unwrap_err();
        assert!(
            e.to_string()
                .starts_with("pco2 with fco2 is not a valid pair"),
            "{e}"
        );
        assert_eq!(params(&[Param::Pco2, Param::Fco2], 1.0).count(), 1);
    }

    /// TA 2300, DIC 2000 µmol/kg at S 35, 25 °C give pCO2 402.693 µatm (PyCO2SYS 1.8.3.4,
    /// fact sheet §7g): 410 is within 5 % of it, 430 is not (430/402.693 − 1 = 6.8 %).
    #[test]
    fn misfits_against_the_pyco2sys_state() {
        let mut m = params(&[], 0.0);
        m.ta = Some(2300.0);
        m.dic = Some(2000.0);
        m.pco2 = Some(410.0);
        m.ph_t = Some(8.05);
        let s = solve_measured(&m, &k(), &Options::default()).unwrap();
        assert_eq!(s.pair, Pair(Param::Ta, Param::Dic));
        assert_eq!(s.misfits.len(), 2);
        let ph = &s.misfits[0];
        assert_eq!(ph.param, Param::PhT);
        assert!((ph.difference - (8.05 - 8.040225)).abs() < 1e-5);
        assert!(!ph.exceeds());
        let pco2 = &s.misfits[1];
        assert!((pco2.difference - (410.0 / 402.693 - 1.0)).abs() < 1e-5);
        assert!(!pco2.exceeds());
        m.pco2 = Some(430.0);
        let s = solve_measured(&m, &k(), &Options::default()).unwrap();
        let bad: Vec<Param> = s.inconsistent().map(|m| m.param).collect();
        assert_eq!(bad, [Param::Pco2]);
    }

    #[test]
    fn solver_errors_keep_the_pair() {
        let mut m = params(&[], 0.0);
        m.ta = Some(4900.0);
        m.dic = Some(100.0);
        match solve_measured(&m, &k(), &Options::default()) {
            Err(MeasuredError::Solve { pair, error }) => {
                assert_eq!(pair.to_string(), "ta+dic");
                // TA 4900 with DIC 100 needs a pH far above the seawater range.
                assert!(
                    error
                        .to_string()
                        .starts_with("these inputs imply pH_T 10.8"),
                    "{error}"
                );
            }
            other => panic!("{other:?}"),
        }
    }
}
