//! Calcification–saturation relationships and the net-calcification outlook.
//!
//! Each relationship gives a relative factor `f = G(Omega, T) / G(Omega_b, T_b)` against a
//! present-day state: in the ensemble, each member's own state at present (the same record
//! draws, constants and temperature), so changes are paired member by member.
//! Absolute net calcification is `baseline rate × f`. These are screening relationships: reef
//! net ecosystem calcification is only weakly predicted by Omega_ar alone (Jones, Ridgwell &
//! Hendy 2015, Biogeosciences 12:1339; Davis et al. 2021, Commun. Earth Environ. 2:105), and
//! biological and local factors (coral cover, light, bleaching, bioerosion) are not modelled.

use serde::Serialize;

/// What is said of the absolute rate when the site gives none: no global default is ever
/// presented as the site's rate.
pub const NO_SITE_RATE: &str = "none: the site file gives no measured net calcification rate, \
     so only relative changes are given (no global average is used as the site's rate)";

/// A net calcification rate measured at the site, with its source.
#[derive(Clone, Debug, PartialEq)]
pub struct SiteRate {
    /// kg CaCO3 m⁻² yr⁻¹.
    pub kg_m2_yr: f64,
    /// Where the number comes from (survey, paper).
    pub source: String,
}

/// Chan & Connolly (2013) meta-analysis sensitivity: −15 % calcification per unit decrease in
/// Omega_ar (95 % CI about −10 to −20 %). Global Change Biology 19:282–290. Status M (from
/// memory, medium confidence). Fitted range: experiments spanning Omega_ar about 1–5.
pub const CHAN_CONNOLLY_2013_PCT_PER_OMEGA: f64 = 15.0;

/// Silverman et al. (2009) temperature dependence of the rate constant of the aragonite
/// precipitation rate law, fitted to the Burton & Walter (1987) values:
/// `k(T) = −0.0177 T² + 1.4697 T + 14.893` (µmol m⁻² h⁻¹, T in °C). Silverman, Lazar, Cao,
/// Caldeira & Erez (2009), GRL 36:L05606. Coefficients status M (from memory) but they reproduce
/// the verified Burton & Walter (1987, Geology 15:111) k = 21.8, 40.6, 45.1 at 5, 25, 37 °C.
/// Valid 5–37 °C.
pub fn silverman_k(temp_c: f64) -> f64 {
    -0.0177 * temp_c * temp_c + 1.4697 * temp_c + 14.893
}

/// Silverman et al. (2009) temperature dependence of the reaction order:
/// `n(T) = 0.0628 T + 0.0985` (T in °C). Same source and status as [`silverman_k`]; reproduces
/// Burton & Walter (1987) n = 0.4, 1.7, 2.4 at 5, 25, 37 °C. Valid 5–37 °C.
pub fn silverman_n(temp_c: f64) -> f64 {
    0.0628 * temp_c + 0.0985
}

/// The functional form of a relationship.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Form {
    /// `f = 1 + (s/100) (Omega − Omega_b)`: a linear relative change of `s` % per unit Omega_ar.
    LinearPercentPerOmega {
        /// Percent change per unit Omega_ar.
        pct_per_unit: f64,
    },
    /// `G = k(T) (Omega − 1)^n(T)` with [`silverman_k`], [`silverman_n`]; `G = 0` for
    /// Omega ≤ 1 (the law gives no precipitation there; dissolution is not modelled).
    SilvermanRateLaw,
    /// `G = k (Omega − 1)`: linear in Omega − 1; negative (net dissolution, extrapolated) below
    /// Omega = 1.
    LinearOmegaMinusOne,
}

/// One calcification–saturation relationship (a table row).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Relationship {
    /// Short id used in quantity names, e.g. "chan2013".
    pub id: &'static str,
    /// What the relationship's output is: a relative change in organism or community
    /// calcification (never an absolute reef rate).
    pub measures: &'static str,
    /// Name for readers: authors and year, e.g. "Chan & Connolly (2013)".
    pub name: &'static str,
    /// Citation.
    pub source: &'static str,
    /// Functional form as text.
    pub form_text: &'static str,
    /// Parameters as text.
    pub parameters: &'static str,
    /// Units of the underlying rate.
    pub units: &'static str,
    /// Omega_ar range of the data the relationship was fitted to (min, max); values outside
    /// are flagged as extrapolation.
    pub omega_range: (f64, f64),
    /// Temperature range of the fit, °C, when the source states one.
    pub temp_range_c: Option<(f64, f64)>,
    /// Scope of the data.
    pub scope: &'static str,
    /// Status on the fact sheet: V verified, M from memory (with the part it applies to).
    pub status: &'static str,
    /// For readers: the parts that were not checked against the original publication, in
    /// words ("" when every part was). The report prints this; it never prints `status`.
    #[serde(skip)]
    pub unchecked: &'static str,
    /// The form used in computation.
    pub form: Form,
}

impl Relationship {
    /// The rate in the relationship's own (relative) units at `omega`, `temp_c`. For the
    /// linear-percent form this is the relative factor against `omega_b` directly.
    fn raw(&self, omega: f64, temp_c: f64, omega_b: f64) -> f64 {
        match self.form {
            Form::LinearPercentPerOmega { pct_per_unit } => {
                1.0 + pct_per_unit / 100.0 * (omega - omega_b)
            }
            Form::SilvermanRateLaw => {
                if omega <= 1.0 {
                    0.0
                } else {
                    silverman_k(temp_c) * (omega - 1.0).powf(silverman_n(temp_c))
                }
            }
            Form::LinearOmegaMinusOne => omega - 1.0,
        }
    }

    /// Relative factor `G(omega, temp) / G(omega_b, temp_b)`; `None` when the baseline rate is
    /// not positive (the relationship cannot be scaled at this site).
    pub fn relative(&self, omega: f64, temp_c: f64, omega_b: f64, temp_b: f64) -> Option<f64> {
        let base = self.raw(omega_b, temp_b, omega_b);
        if base.is_nan() || base <= 0.0 || !base.is_finite() {
            return None;
        }
        Some(self.raw(omega, temp_c, omega_b) / base)
    }

    /// True when `omega` and `temp_c` lie inside the fitted ranges.
    pub fn in_range(&self, omega: f64, temp_c: f64) -> bool {
        let (lo, hi) = self.omega_range;
        let omega_ok = omega >= lo && omega <= hi;
        let temp_ok = self
            .temp_range_c
            .is_none_or(|(tl, th)| temp_c >= tl && temp_c <= th);
        omega_ok && temp_ok
    }
}

/// The built-in relationships.
pub fn builtin_relationships() -> Vec<Relationship> {
    vec![
        Relationship {
            id: "chan2013",
            measures: "relative change in coral (organism) calcification",
            name: "Chan & Connolly (2013)",
            source: "Chan & Connolly (2013), Global Change Biology 19:282-290 (meta-analysis of \
                     coral experiments)",
            form_text: "relative change = -s x (Omega_b - Omega), linear",
            parameters: "s = 15 % per unit Omega_ar (95 % CI about 10-20 %)",
            units: "percent of baseline calcification",
            omega_range: (1.0, 5.0),
            temp_range_c: None,
            scope: "coral calcification in experiments; Omega_ar about 1-5",
            status: "M (from memory, medium confidence)",
            unchecked: "the sensitivity of 15 % per unit Ω_ar and the fitted Ω_ar range 1–5",
            form: Form::LinearPercentPerOmega {
                pct_per_unit: CHAN_CONNOLLY_2013_PCT_PER_OMEGA,
            },
        },
        Relationship {
            id: "silverman2009",
            measures: "relative change in reef community gross calcification (an inorganic \
                       precipitation rate law applied to the community)",
            name: "Silverman et al. (2009)",
            source: "Silverman, Lazar, Cao, Caldeira & Erez (2009), GRL 36:L05606; rate law of \
                     Burton & Walter (1987), Geology 15:111",
            form_text: "G = k(T) x (Omega_ar - 1)^n(T); G = 0 for Omega_ar <= 1",
            parameters: "k(T) = -0.0177 T^2 + 1.4697 T + 14.893; n(T) = 0.0628 T + 0.0985 \
                         (T in degC)",
            units: "umol m-2 h-1 (inorganic aragonite precipitation; used here as a ratio)",
            omega_range: (1.0, f64::INFINITY),
            temp_range_c: Some((5.0, 37.0)),
            scope: "inorganic aragonite precipitation in seawater, 5-37 degC; applied to reef \
                    gross calcification by Silverman et al. (2009)",
            status: "form and Burton & Walter k, n points V; k(T), n(T) coefficients M",
            unchecked: "the coefficients of k(T) and n(T); they reproduce the rate constants and \
                        reaction orders of Burton & Walter (1987) at 5, 25 and 37 °C, which were \
                        checked",
            form: Form::SilvermanRateLaw,
        },
        Relationship {
            id: "langdon2005",
            measures: "relative change in coral and coral-community calcification",
            name: "Langdon & Atkinson (2005)",
            source: "Langdon & Atkinson (2005), JGR 110:C09S07",
            form_text: "G = k x (Omega_ar - 1), linear in Omega_ar - 1",
            parameters: "k site-, species-, light- and temperature-dependent (cancels in the \
                         ratio); about 40 % lower G at 2x pre-industrial pCO2",
            units: "mmol CaCO3 m-2 d-1 (used here as a ratio)",
            omega_range: (1.0, 5.0),
            temp_range_c: None,
            scope: "experimental corals and a coral community (Biosphere-2 mesocosm); fitted \
                    Omega_ar range about 1-5",
            status: "M (from memory, low-medium confidence on the 40 % figure and the range)",
            unchecked: "the fitted Ω_ar range 1–5 (which marks extrapolation here)",
            form: Form::LinearOmegaMinusOne,
        },
    ]
}

/// Calcification settings of a site.
#[derive(Clone, Debug, PartialEq)]
pub struct CalcificationSettings {
    /// Relationships to evaluate.
    pub relationships: Vec<Relationship>,
    /// The site's measured net calcification rate, when it gives one; absolute rates are
    /// reported only then.
    pub site_rate: Option<SiteRate>,
}

impl Default for CalcificationSettings {
    fn default() -> Self {
        CalcificationSettings {
            relationships: builtin_relationships(),
            site_rate: None,
        }
    }
}

impl CalcificationSettings {
    /// Settings with a site-given baseline rate and a subset of relationship ids (all when
    /// `ids` is empty). Errors name an unknown id or a rate outside 0–50 kg m⁻² yr⁻¹.
    pub fn from_site(
        baseline_rate: Option<f64>,
        rate_source: Option<&str>,
        ids: &[String],
    ) -> Result<CalcificationSettings, String> {
        let mut s = CalcificationSettings::default();
        if let Some(r) = baseline_rate {
            if !r.is_finite() || r <= 0.0 || r > 50.0 {
                return Err(format!(
                    "calcification baseline rate {r} kg CaCO3 m-2 yr-1 is outside 0-50"
                ));
            }
            s.site_rate = Some(SiteRate {
                kg_m2_yr: r,
                source: rate_source.unwrap_or("site file [baseline]").to_string(),
            });
        }
        if !ids.is_empty() {
            let all = builtin_relationships();
            let mut chosen = Vec::new();
            for id in ids {
                let rel = all.iter().find(|r| r.id == id.trim()).ok_or_else(|| {
                    format!(
                        "unknown calcification relationship \"{id}\" (known: {})",
                        all.iter().map(|r| r.id).collect::<Vec<_>>().join(", ")
                    )
                })?;
                if !chosen.iter().any(|c: &Relationship| c.id == rel.id) {
                    chosen.push(rel.clone());
                }
            }
            s.relationships = chosen;
        }
        Ok(s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(id: &str) -> Relationship {
        builtin_relationships()
            .into_iter()
            .find(|r| r.id == id)
            .unwrap()
    }

    /// Outside check: Burton & Walter (1987, Geology 15:111) rate-law parameters at 5, 25 and
    /// 37 °C, k = 21.8, 40.6, 45.1 µmol m⁻² h⁻¹ and n = 0.4, 1.7, 2.4 (fact sheet §3, V, as
    /// carried in a public aragonite-kinetics script); the Silverman et al. (2009) fits must
    /// reproduce them to the precision printed (k ±0.1, n ±0.05).
    #[test]
    fn silverman_fits_reproduce_burton_walter() {
        for (t, k, n) in [(5.0, 21.8, 0.4), (25.0, 40.6, 1.7), (37.0, 45.1, 2.4)] {
            assert!(
                (silverman_k(t) - k).abs() <= 0.1,
                "k({t}) = {}",
                silverman_k(t)
            );
            assert!(
                (silverman_n(t) - n).abs() <= 0.05,
                "n({t}) = {}",
                silverman_n(t)
            );
        }
    }

    /// Outside check (from memory, medium confidence): Chan & Connolly (2013) report a 15 %
    /// decline in calcification per unit decrease in Omega_ar.
    #[test]
    fn chan_connolly_fifteen_percent_per_unit() {
        let r = rel("chan2013");
        let f = r.relative(3.0, 27.0, 4.0, 27.0).unwrap();
        assert!((f - 0.85).abs() < 1e-12);
        let f = r.relative(2.0, 27.0, 4.0, 27.0).unwrap();
        assert!((f - 0.70).abs() < 1e-12);
        assert!(r.in_range(3.0, 40.0) && !r.in_range(5.5, 27.0));
    }

    #[test]
    fn rate_law_reaches_zero_at_saturation_and_flags_range() {
        let r = rel("silverman2009");
        assert_eq!(r.relative(1.0, 27.0, 3.5, 27.0), Some(0.0));
        assert_eq!(r.relative(0.8, 27.0, 3.5, 27.0), Some(0.0));
        let f = r.relative(3.0, 27.0, 3.5, 27.0).unwrap();
        let expect = (2.0f64 / 2.5).powf(silverman_n(27.0));
        assert!((f - expect).abs() < 1e-12);
        assert!(!r.in_range(0.8, 27.0));
        assert!(!r.in_range(3.0, 38.0));
        assert!(r.in_range(3.0, 30.0));
        // Baseline at or below saturation: cannot be scaled.
        assert_eq!(r.relative(2.0, 27.0, 1.0, 27.0), None);
    }

    #[test]
    fn langdon_linear_in_omega_minus_one() {
        let r = rel("langdon2005");
        let f = r.relative(2.0, 27.0, 3.0, 27.0).unwrap();
        assert!((f - 0.5).abs() < 1e-12);
        assert!((r.relative(1.0, 27.0, 3.0, 27.0).unwrap()).abs() < 1e-12);
        assert!(r.relative(0.5, 27.0, 3.0, 27.0).unwrap() < 0.0);
    }

    /// Outside check (from memory, low–medium confidence; fact sheet §3): Langdon & Atkinson
    /// (2005) report about 40 % lower calcification at twice the pre-industrial pCO2. With the
    /// linear (Omega − 1) form and Omega_ar from the project's chemistry (TA 2300 µmol/kg,
    /// S 35, 25 and 27 °C, xCO2 280 vs 560 ppm) the decline must lie within 30–50 %.
    #[test]
    fn langdon_about_forty_percent_at_doubled_co2() {
        use crate::chem::{Conditions, Constants, Input, MethodSet, gas, solve_pair};
        let r = rel("langdon2005");
        for t in [25.0, 27.0] {
            let k = Constants::new(&Conditions::surface(t, 35.0), &MethodSet::default());
            let dry = 1.0 - gas::vapour_pressure_atm(t, 35.0);
            let om = |x: f64| {
                solve_pair(Input::Ta(2300.0), Input::Pco2(x * dry), &k)
                    .unwrap()
                    .omega_ar
            };
            let f = r.relative(om(560.0), t, om(280.0), t).unwrap();
            let decline = (1.0 - f) * 100.0;
            assert!((30.0..=50.0).contains(&decline), "{t} degC: {decline} %");
        }
    }

    #[test]
    fn site_settings_validate() {
        let s = CalcificationSettings::from_site(Some(4.0), None, &["langdon2005".into()]).unwrap();
        assert_eq!(s.relationships.len(), 1);
        assert_eq!(s.site_rate.as_ref().map(|r| r.kg_m2_yr), Some(4.0));
        assert_eq!(
            CalcificationSettings::from_site(None, None, &[])
                .unwrap()
                .site_rate,
            None
        );
        let e = CalcificationSettings::from_site(None, None, &["x".into()]).unwrap_err();
        assert!(e.contains("chan2013"), "{e}");
        assert!(CalcificationSettings::from_site(Some(-1.0), None, &[]).is_err());
    }
}
