//! Conversions between the pH scales (Dickson et al. 2007, chapter 2; Zeebe & Wolf-Gladrow
//! 2001, §1.5):
//!
//! * free: [H⁺]F;
//! * total: [H⁺]T = [H⁺]F·(1 + ST/KS);
//! * seawater (SWS): [H⁺]SWS = [H⁺]F·(1 + ST/KS + FT/KF);
//! * NBS: activity a(H⁺) = fH·[H⁺]SWS, with the activity coefficient fH of Takahashi et al.
//!   (1982, GEOSECS Pacific Expedition vol. 3) as used in CO2SYS:
//!   fH = 1.2948 − 0.002036·T + (0.0004607 − 0.000001475·T)·S², T in K. The NBS scale is
//!   ill-defined in seawater; use it only to read legacy data.

use std::fmt;
use std::str::FromStr;

use serde::{Deserialize, Serialize};

use super::Constants;

/// A pH scale.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum PhScale {
    #[default]
    Total,
    #[serde(rename = "sws")]
    Seawater,
    Free,
    Nbs,
}

impl PhScale {
    /// All scales with their names, for help texts.
    pub const ALL: [(&'static str, PhScale); 4] = [
        ("total", PhScale::Total),
        ("sws", PhScale::Seawater),
        ("free", PhScale::Free),
        ("nbs", PhScale::Nbs),
    ];
}

impl FromStr for PhScale {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        let low = s.trim().to_ascii_lowercase();
        Self::ALL
            .iter()
            .find(|(n, _)| *n == low || (low == "seawater" && *n == "sws"))
            .map(|(_, v)| *v)
            .ok_or_else(|| {
                format!("unknown pH scale '{s}' (expected one of: total, sws, free, nbs)")
            })
    }
}

impl fmt::Display for PhScale {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let name = Self::ALL
            .iter()
            .find(|(_, v)| v == self)
            .map(|(n, _)| *n)
            .unwrap_or("total");
        f.write_str(name)
    }
}

/// Activity coefficient of H⁺ for the NBS scale (Takahashi et al. 1982).
pub fn nbs_activity_coefficient(temp_c: f64, salinity: f64) -> f64 {
    let t = temp_c + super::constants::KELVIN_OFFSET;
    1.2948 - 0.002036 * t + (0.0004607 - 0.000001475 * t) * salinity * salinity
}

/// log10 of [H⁺] on `scale` divided by [H⁺] on the free scale (NBS: activity / free).
fn log_factor_from_free(scale: PhScale, k: &Constants) -> f64 {
    let free_to_total = 1.0 + k.st / k.ks;
    match scale {
        PhScale::Free => 0.0,
        PhScale::Total => free_to_total.log10(),
        PhScale::Seawater => (free_to_total + k.ft / k.kf).log10(),
        PhScale::Nbs => {
            ((free_to_total + k.ft / k.kf) * nbs_activity_coefficient(k.temp_c, k.salinity)).log10()
        }
    }
}

/// Convert a pH on `from` to the total scale at the conditions of `k`.
///
/// Never inlined: inlined into `solve`'s row loop, the compiler hoisted its three
/// logarithms out of the branch that needs them and ran them for every row.
#[inline(never)]
pub fn to_total(ph: f64, from: PhScale, k: &Constants) -> f64 {
    // pH_X = −log10([H]_F·f_X) = pH_F − log f_X
    ph + log_factor_from_free(from, k) - log_factor_from_free(PhScale::Total, k)
}

/// Convert a total-scale pH to `to` at the conditions of `k`.
pub fn from_total(ph_t: f64, to: PhScale, k: &Constants) -> f64 {
    ph_t + log_factor_from_free(PhScale::Total, k) - log_factor_from_free(to, k)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{Conditions, MethodSet};

    /// PyCO2SYS 1.8.3.4 with the default method set (fact sheet §7g): pH_T 8.040225 ↔
    /// pH_free 8.147945, pH_SWS 8.030103, pH_NBS 8.176768 at S 35, 25 °C, 0 dbar.
    #[test]
    fn pyco2sys_scale_cross_check() {
        let k = Constants::new(&Conditions::surface(25.0, 35.0), &MethodSet::default());
        let pht = 8.040225;
        assert!((from_total(pht, PhScale::Free, &k) - 8.147945).abs() < 2e-6);
        assert!((from_total(pht, PhScale::Seawater, &k) - 8.030103).abs() < 2e-6);
        assert!((from_total(pht, PhScale::Nbs, &k) - 8.176768).abs() < 2e-6);
        for (_, sc) in PhScale::ALL {
            assert!((to_total(from_total(pht, sc, &k), sc, &k) - pht).abs() < 1e-12);
        }
    }

    #[test]
    fn names_round_trip() {
        for (name, sc) in PhScale::ALL {
            assert_eq!(name.parse::<PhScale>().unwrap(), sc);
            assert_eq!(sc.to_string(), name);
        }
        assert_eq!(
            "ph".parse::<PhScale>().unwrap_err(),
            "unknown pH scale 'ph' (expected one of: total, sws, free, nbs)"
        );
    }
}
