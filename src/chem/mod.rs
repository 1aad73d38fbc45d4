//! The marine carbonate system.
//!
//! [`Constants::new`] evaluates every equilibrium constant of a [`MethodSet`] at in-situ
//! temperature, salinity and pressure; [`solve_pair`] finds the full [`CarbonateState`] from
//! any two measured parameters; [`measured::solve_measured`] picks the preferred pair from
//! any set of measured parameters and checks the others against the result. The choices a
//! method set can make (K1/K2 fit, total boron, KF) are listed once, in [`catalogue`]. Concentrations at this interface are µmol/kg-seawater,
//! pCO2 and fCO2 are µatm at in-situ temperature and one atmosphere total pressure, pH is on
//! the total scale. Internally everything is mol/kg.
//!
//! Scale handling follows CO2SYS (Lewis & Wallace 1998) and PyCO2SYS (Humphreys et al.
//! 2022): constants are brought to the seawater scale with the one-atmosphere KSO4 and KF,
//! pressure-corrected there (Millero 1995), and returned to the total scale with the
//! pressure-corrected KSO4 and KF.

pub mod catalogue;
pub mod constants;
pub mod density;
pub mod gas;
pub mod limits;
pub mod measured;
mod memo;
pub mod pressure;
pub mod scales;
mod solver;

use std::fmt;
use std::str::FromStr;

use serde::{Deserialize, Serialize};

pub use memo::ConstantsMemo;
pub use solver::{solve_from_h, solve_pair};

use constants as c;

/// Where a sample sits: in-situ temperature, practical salinity, gauge pressure, nutrients.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Conditions {
    /// In-situ temperature, °C (ITS-90).
    pub temp_c: f64,
    /// Practical salinity (PSS-78).
    pub salinity: f64,
    /// Hydrostatic (gauge) pressure, dbar; 0 at the surface.
    pub pressure_dbar: f64,
    /// Total silicate, µmol/kg.
    pub silicate: f64,
    /// Total phosphate, µmol/kg.
    pub phosphate: f64,
}

impl Conditions {
    /// Surface water without nutrients.
    pub fn surface(temp_c: f64, salinity: f64) -> Self {
        Conditions {
            temp_c,
            salinity,
            pressure_dbar: 0.0,
            silicate: 0.0,
            phosphate: 0.0,
        }
    }
}

/// A typed handle on one catalogue list: which entry of [`catalogue`] a method set uses.
macro_rules! method_handle {
    ($(#[$m:meta])* $name:ident, $kind:expr, $list:expr, $fn_ty:ty,
     { $($(#[$cm:meta])* $alias:ident = $id:literal;)* }) => {
        $(#[$m])*
        #[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
        pub struct $name(u8);

        #[allow(non_upper_case_globals)]
        impl $name {
            $($(#[$cm])* pub const $alias: $name = $name::from_id_const($id);)*

            /// Every option as (id, value), the default first.
            pub const ALL: &'static [(&'static str, $name)] = &{
                let mut all = [("", $name(0)); $list.len()];
                let mut i = 0;
                while i < $list.len() {
                    all[i] = ($list[i].id, $name(i as u8));
                    i += 1;
                }
                all
            };

            /// The handle of a catalogue id known at compile time (a typo fails the build).
            const fn from_id_const(id: &str) -> $name {
                let mut i = 0;
                while i < $list.len() {
                    let a = $list[i].id.as_bytes();
                    let b = id.as_bytes();
                    if a.len() == b.len() {
                        let mut j = 0;
                        while j < a.len() && a[j] == b[j] {
                            j += 1;
                        }
                        if j == a.len() {
                            return $name(i as u8);
                        }
                    }
                    i += 1;
                }
                panic!("id not in the catalogue")
            }

            /// Which catalogue choice this is.
            pub const KIND: catalogue::MethodKind = $kind;

            /// The catalogue entry.
            pub fn entry(&self) -> &'static catalogue::Entry<$fn_ty> {
                // Handles are only made from positions in this list (see `ALL` and
                // `FromStr`), so the first arm always matches; the list is never empty.
                match $list.get(usize::from(self.0)) {
                    Some(e) => e,
                    None => &$list[0],
                }
            }
            /// The catalogue id.
            pub fn id(&self) -> &'static str { self.entry().id }
            /// Short citation of the publication behind this option.
            pub fn citation(&self) -> &'static str { self.entry().citation }
            /// Fitted (temperature °C, salinity) ranges: ((t_min, t_max), (s_min, s_max)).
            pub fn fitted_range(&self) -> ((f64, f64), (f64, f64)) {
                (self.entry().temp_c, self.entry().salinity)
            }
            /// The accepted ids, for messages.
            pub fn names() -> String { Self::KIND.ids().join(", ") }
        }
        impl FromStr for $name {
            type Err = catalogue::UnknownMethod;
            fn from_str(s: &str) -> Result<Self, catalogue::UnknownMethod> {
                // The position is below the list length, which is below 256 (asserted in
                // the catalogue).
                Self::KIND.parse(s).map(|i| $name(i as u8))
            }
        }
        impl fmt::Display for $name {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result { f.write_str(self.id()) }
        }
        impl Serialize for $name {
            fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> { s.collect_str(self) }
        }
        impl<'de> Deserialize<'de> for $name {
            fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
                let s = String::deserialize(d)?;
                s.parse().map_err(serde::de::Error::custom)
            }
        }
    };
}

method_handle! {
    /// The K1, K2 fit of carbonic acid: an entry of [`catalogue::CARBONIC_ACID`].
    K1K2, catalogue::MethodKind::CarbonicAcid, catalogue::CARBONIC_ACID, catalogue::CarbonicAcidFn, {
        Lueker2000 = "lueker2000";
        Millero2010 = "millero2010";
        WatersMilleroWoosley2014 = "wmw2014";
        Sulpis2020 = "sulpis2020";
        DicksonMillero1987 = "dm87";
    }
}

method_handle! {
    /// The total-boron–salinity ratio: an entry of [`catalogue::TOTAL_BORON`].
    BoronTotal, catalogue::MethodKind::TotalBoron, catalogue::TOTAL_BORON, catalogue::TotalBoronFn, {
        Lee2010 = "lee2010";
        Uppstrom1974 = "uppstrom1974";
    }
}

method_handle! {
    /// The hydrogen fluoride dissociation constant: an entry of
    /// [`catalogue::HYDROGEN_FLUORIDE`].
    KfSource, catalogue::MethodKind::HydrogenFluoride, catalogue::HYDROGEN_FLUORIDE, catalogue::HydrogenFluorideFn, {
        PerezFraga1987 = "pf87";
        DicksonRiley1979 = "dr79";
    }
}

/// The constants that a site may choose; everything else is fixed (see `DEVELOPERS.md`).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct MethodSet {
    pub k1k2: K1K2,
    pub boron: BoronTotal,
    pub kf: KfSource,
}

/// One constant of a methods section: what it gives, the name of the method (its authors)
/// and the short citation.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct MethodCitation {
    pub quantity: &'static str,
    pub method: &'static str,
    pub citation: &'static str,
}

/// Citations of the constants every method set shares.
pub const FIXED_CITATIONS: &[MethodCitation] = &[
    MethodCitation {
        quantity: "K0 and fugacity",
        method: "Weiss",
        citation: "Weiss (1974), Mar. Chem. 2:203",
    },
    MethodCitation {
        quantity: "KB",
        method: "Dickson",
        citation: "Dickson (1990), Deep-Sea Res. 37:755",
    },
    MethodCitation {
        quantity: "KW, KP1–3, KSi",
        method: "Millero",
        citation: "Millero (1995), Geochim. Cosmochim. Acta 59:661",
    },
    MethodCitation {
        quantity: "KSO4",
        method: "Dickson",
        citation: "Dickson (1990), J. Chem. Thermodyn. 22:113",
    },
    MethodCitation {
        quantity: "Total sulfate",
        method: "Morris & Riley",
        citation: "Morris & Riley (1966), Deep-Sea Res. 13:699",
    },
    MethodCitation {
        quantity: "Total fluoride",
        method: "Riley",
        citation: "Riley (1965), Deep-Sea Res. 12:219",
    },
    MethodCitation {
        quantity: "Calcite and aragonite solubility",
        method: "Mucci",
        citation: "Mucci (1983), Am. J. Sci. 283:780",
    },
    MethodCitation {
        quantity: "Total calcium",
        method: "Riley & Tongudai",
        citation: "Riley & Tongudai (1967), Chem. Geol. 2:263",
    },
    MethodCitation {
        quantity: "Pressure corrections",
        method: "Millero",
        citation: "Millero (1995), Geochim. Cosmochim. Acta 59:661",
    },
    MethodCitation {
        quantity: "Water vapour pressure",
        method: "Weiss & Price",
        citation: "Weiss & Price (1980), Mar. Chem. 8:347",
    },
];

impl MethodSet {
    /// Every constant with its source, for methods sections: (quantity, citation).
    pub fn citations(&self) -> Vec<(String, String)> {
        self.method_citations()
            .into_iter()
            .map(|c| (c.quantity.to_string(), c.citation.to_string()))
            .collect()
    }

    /// Every constant with the method's name and its source, the selectable ones from the
    /// catalogue and the fixed ones from [`FIXED_CITATIONS`].
    pub fn method_citations(&self) -> Vec<MethodCitation> {
        let mut v = vec![
            MethodCitation {
                quantity: "K1, K2",
                method: self.k1k2.entry().method,
                citation: self.k1k2.citation(),
            },
            MethodCitation {
                quantity: "Total boron",
                method: self.boron.entry().method,
                citation: self.boron.citation(),
            },
            MethodCitation {
                quantity: "KF",
                method: self.kf.entry().method,
                citation: self.kf.citation(),
            },
        ];
        v.extend_from_slice(FIXED_CITATIONS);
        v
    }

    /// Each fitted constant of this set: (constant, citation, (temperature °C, salinity)
    /// fitted ranges). Mucci (1983) is fitted 5–40 °C, S 5–44; the KSO4/KB/KW fits cover
    /// 0–45 °C, S 5–45.
    fn fitted_ranges(&self) -> [(&'static str, &'static str, FittedRange); 4] {
        use catalogue::MethodKind as K;
        [
            (
                K::CarbonicAcid.constant(),
                self.k1k2.citation(),
                self.k1k2.fitted_range(),
            ),
            (
                K::TotalBoron.constant(),
                self.boron.citation(),
                self.boron.fitted_range(),
            ),
            (
                K::HydrogenFluoride.constant(),
                self.kf.citation(),
                self.kf.fitted_range(),
            ),
            ("Ksp", "Mucci 1983", ((5.0, 40.0), (5.0, 44.0))),
        ]
    }

    /// Warnings for conditions outside the fitted ranges of this set's constants (the
    /// sample is still solved; the caller flags it).
    pub fn range_warnings(&self, c: &Conditions) -> Vec<String> {
        let mut out = Vec::new();
        for (what, cite, ((t0, t1), (s0, s1))) in self.fitted_ranges() {
            if c.temp_c < t0 || c.temp_c > t1 {
                out.push(format!(
                    "temp_c {:.2} °C is outside the {what} fitted range {t0}–{t1} °C ({cite})",
                    c.temp_c
                ));
            }
            if c.salinity < s0 || c.salinity > s1 {
                out.push(format!(
                    "salinity {:.3} is outside the {what} fitted range {s0}–{s1} ({cite})",
                    c.salinity
                ));
            }
        }
        out
    }

    /// Whether [`MethodSet::range_warnings`] would give no warning at `c`: the same test,
    /// without building the messages (most samples lie inside every range).
    pub fn in_fitted_ranges(&self, c: &Conditions) -> bool {
        self.fitted_ranges()
            .iter()
            .all(|(_, _, ((t0, t1), (s0, s1)))| {
                !(c.temp_c < *t0 || c.temp_c > *t1 || c.salinity < *s0 || c.salinity > *s1)
            })
    }
}

/// A constant's fitted ranges: ((lowest, highest) temperature °C, (lowest, highest)
/// salinity).
type FittedRange = ((f64, f64), (f64, f64));

/// Every constant needed to solve the system at one (T, S, P). Acid constants are on the
/// total pH scale except `ks` and `kf` (free scale); all are mol/kg-SW. Totals are mol/kg.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Constants {
    pub temp_c: f64,
    pub salinity: f64,
    pub k0: f64,
    pub k1: f64,
    pub k2: f64,
    pub kb: f64,
    pub kw: f64,
    pub ks: f64,
    pub kf: f64,
    pub k1p: f64,
    pub k2p: f64,
    pub k3p: f64,
    pub ksi: f64,
    pub ksp_ar: f64,
    pub ksp_ca: f64,
    pub bt: f64,
    pub st: f64,
    pub ft: f64,
    pub ca: f64,
    pub sit: f64,
    pub pt: f64,
    /// fCO2/pCO2 at in-situ temperature and one atmosphere.
    pub fugacity_factor: f64,
}

impl Constants {
    /// Evaluate all constants of `m` at the conditions `cond`.
    pub fn new(cond: &Conditions, m: &MethodSet) -> Constants {
        let t_c = cond.temp_c;
        let x = c::TempSal::new(t_c, cond.salinity);
        let s = cond.salinity;
        let p_bar = cond.pressure_dbar / 10.0;

        let st = c::total_sulfate_morris_riley1966(s);
        let ft = c::total_fluoride_riley1965(s);
        let bt = (m.boron.entry().function)(s);

        use pressure as pc;
        let lnf = |terms: pc::VolumeTerms| terms.ln_factor(t_c, p_bar);

        // Free-scale constants at one atmosphere and in situ, and the SWS→total factors.
        let ln_ks0 = c::ln_ks_free_dickson1990(&x);
        let ln_kf0 = (m.kf.entry().function)(&x);
        let (ks0, kf0) = (ln_ks0.exp(), ln_kf0.exp());
        let ks = (ln_ks0 + lnf(pc::KS)).exp();
        let kf = (ln_kf0 + lnf(pc::KF)).exp();
        let sws_to_total_0 = (1.0 + st / ks0) / (1.0 + st / ks0 + ft / kf0);
        let sws_to_total = (1.0 + st / ks) / (1.0 + st / ks + ft / kf);
        // ln of the factors taking a constant from its native scale at one atmosphere to
        // the total scale in situ (the pressure factor is added separately).
        let ln_from_sws = sws_to_total.ln();
        let ln_from_total = ln_from_sws - sws_to_total_0.ln();

        let k1k2 = m.k1k2.entry();
        let (ln_k1, ln_k2) = (k1k2.function)(&x);
        let ln_scale_k = match k1k2.native_scale {
            Some(scales::PhScale::Seawater) => ln_from_sws,
            // A K1, K2 fit on the free scale is first taken to the seawater scale at one
            // atmosphere, [H]SWS = [H]F·(1 + ST/KS + FT/KF). (Worked out here only, not
            // for every constant set: one logarithm fewer for the others.)
            Some(scales::PhScale::Free) => (1.0 + st / ks0 + ft / kf0).ln() + ln_from_sws,
            // Every K1, K2 entry names its scale (a catalogue test checks it); total
            // otherwise.
            _ => ln_from_total,
        };
        let (ln_k1p, ln_k2p, ln_k3p) = c::ln_kp_sws_millero1995(&x);

        Constants {
            temp_c: t_c,
            salinity: s,
            k0: c::ln_k0_weiss1974(&x).exp(),
            k1: (ln_k1 + ln_scale_k + lnf(pc::K1)).exp(),
            k2: (ln_k2 + ln_scale_k + lnf(pc::K2)).exp(),
            kb: (c::ln_kb_total_dickson1990(&x) + ln_from_total + lnf(pc::KB)).exp(),
            kw: (c::ln_kw_sws_millero1995(&x) + ln_from_sws + lnf(pc::KW)).exp(),
            ks,
            kf,
            k1p: (ln_k1p + ln_from_sws + lnf(pc::KP1)).exp(),
            k2p: (ln_k2p + ln_from_sws + lnf(pc::KP2)).exp(),
            k3p: (ln_k3p + ln_from_sws + lnf(pc::KP3)).exp(),
            // Millero (1995) gives no volume terms for silicic acid; the KB ones are used.
            ksi: (c::ln_ksi_sws_millero1995(&x) + ln_from_sws + lnf(pc::KB)).exp(),
            ksp_ar: (c::ln_ksp_aragonite_mucci1983(&x) + lnf(pc::KSP_ARAGONITE)).exp(),
            ksp_ca: (c::ln_ksp_calcite_mucci1983(&x) + lnf(pc::KSP_CALCITE)).exp(),
            bt,
            st,
            ft,
            ca: c::total_calcium_riley_tongudai1967(s),
            sit: cond.silicate * 1e-6,
            pt: cond.phosphate * 1e-6,
            fugacity_factor: gas::fugacity_factor(t_c),
        }
    }

    /// The constants shifted by a Monte Carlo draw (see [`Perturbation`]).
    pub fn perturbed(&self, p: &Perturbation) -> Constants {
        let shift = |k: f64, dpk: f64| if dpk == 0.0 { k } else { k * 10f64.powf(-dpk) };
        let boron = if p.boron_factor == 0.0 {
            1.0
        } else {
            p.boron_factor
        };
        Constants {
            k0: shift(self.k0, p.pk0),
            k1: shift(self.k1, p.pk1),
            k2: shift(self.k2, p.pk2),
            kb: shift(self.kb, p.pkb),
            kw: shift(self.kw, p.pkw),
            ksp_ar: shift(self.ksp_ar, p.pksp_ar),
            ksp_ca: shift(self.ksp_ca, p.pksp_ca),
            bt: self.bt * boron,
            ..*self
        }
    }
}

/// Additive shifts of pK = −log10 K and a multiplicative factor on total boron, used to
/// propagate the constants' uncertainties. A `boron_factor` of 0 means "no change".
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct Perturbation {
    pub pk0: f64,
    pub pk1: f64,
    pub pk2: f64,
    pub pkb: f64,
    pub pkw: f64,
    pub pksp_ar: f64,
    pub pksp_ca: f64,
    pub boron_factor: f64,
}

/// Standard uncertainties of the constants recommended by Orr, Epitalon, Dickson & Gattuso
/// (2018), *Mar. Chem.* 207:84–107: pK0 0.002, pK1 0.0075, pK2 0.015, pKB 0.01, pKW 0.01,
/// pK*sp 0.02 (both minerals), total boron 2 % (here as `boron_factor` = 0.02, a fractional
/// standard uncertainty, not a factor to apply).
pub const ORR2018: Perturbation = Perturbation {
    pk0: 0.002,
    pk1: 0.0075,
    pk2: 0.015,
    pkb: 0.01,
    pkw: 0.01,
    pksp_ar: 0.02,
    pksp_ca: 0.02,
    boron_factor: 0.02,
};

/// One measured carbonate-system parameter (µmol/kg, total-scale pH, µatm).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Input {
    Ta(f64),
    Dic(f64),
    PhT(f64),
    Pco2(f64),
    Fco2(f64),
    Co3(f64),
}

impl Input {
    /// The column name of this parameter in CSV files.
    pub fn column(&self) -> &'static str {
        match self {
            Input::Ta(_) => "ta",
            Input::Dic(_) => "dic",
            Input::PhT(_) => "ph_t",
            Input::Pco2(_) => "pco2",
            Input::Fco2(_) => "fco2",
            Input::Co3(_) => "co3",
        }
    }
    /// The value as given.
    pub fn value(&self) -> f64 {
        match *self {
            Input::Ta(v)
            | Input::Dic(v)
            | Input::PhT(v)
            | Input::Pco2(v)
            | Input::Fco2(v)
            | Input::Co3(v) => v,
        }
    }
}

/// The solved carbonate system of one sample (µmol/kg, µatm, total-scale pH).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct CarbonateState {
    pub ta: f64,
    pub dic: f64,
    pub ph_t: f64,
    pub pco2: f64,
    pub fco2: f64,
    pub hco3: f64,
    pub co3: f64,
    pub co2aq: f64,
    pub omega_ar: f64,
    pub omega_ca: f64,
    pub revelle: f64,
}

/// Why a pair could not be solved.
#[derive(Clone, Debug, PartialEq)]
pub enum ChemError {
    /// The two parameters cannot be used together (e.g. pCO2 with fCO2, or one twice).
    InvalidPair(&'static str, &'static str),
    /// A value outside its physical limit (message names the column and the limit).
    OutOfRange(String),
    /// The inputs are finite and in range but no seawater state satisfies them.
    NoSolution(String),
}

impl fmt::Display for ChemError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ChemError::InvalidPair(a, b) => write!(
                f,
                "{a} with {b} is not a valid pair (use two of ta, dic, ph_t, pco2/fco2, co3; \
                 pco2 and fco2 carry the same information)"
            ),
            ChemError::OutOfRange(m) | ChemError::NoSolution(m) => f.write_str(m),
        }
    }
}

impl std::error::Error for ChemError {}

/// Convenience: constants for `cond` and `m`, then [`solve_pair`].
pub fn solve(
    a: Input,
    b: Input,
    cond: &Conditions,
    m: &MethodSet,
) -> Result<CarbonateState, ChemError> {
    for (col, v) in [
        ("temp_c", cond.temp_c),
        ("salinity", cond.salinity),
        ("pressure_dbar", cond.pressure_dbar),
        ("silicate", cond.silicate),
        ("phosphate", cond.phosphate),
    ] {
        limits::check(col, v).map_err(ChemError::OutOfRange)?;
    }
    solve_pair(a, b, &Constants::new(cond, m))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The quick test and the messages agree for every constant set, across and beyond the
    /// fitted ranges (edges, just outside them, and NaN, which no comparison flags).
    #[test]
    fn in_fitted_ranges_agrees_with_range_warnings() {
        for &(_, k1k2) in K1K2::ALL {
            for &(_, boron) in BoronTotal::ALL {
                for &(_, kf) in KfSource::ALL {
                    let m = MethodSet { k1k2, boron, kf };
                    for t in [
                        -2.0,
                        0.0,
                        2.0,
                        4.999,
                        5.0,
                        25.0,
                        33.0,
                        33.01,
                        40.0,
                        40.01,
                        45.0,
                        f64::NAN,
                    ] {
                        for s in [
                            0.0,
                            4.99,
                            5.0,
                            19.99,
                            20.0,
                            35.0,
                            43.0,
                            44.0,
                            44.01,
                            50.0,
                            f64::NAN,
                        ] {
                            let c = Conditions::surface(t, s);
                            assert_eq!(
                                m.in_fitted_ranges(&c),
                                m.range_warnings(&c).is_empty(),
                                "{m:?} {t} {s}"
                            );
                        }
                    }
                }
            }
        }
    }
}
