//! Pressure corrections of the equilibrium constants, Millero (1995), *Geochim. Cosmochim.
//! Acta* 59:661, in the partial-molal-volume and compressibility form
//!
//! ln(K_P / K_0) = (−ΔV + ½·Δκ·P)·P / (R·T)
//!
//! with t in °C, P the gauge pressure in bar, ΔV in cm³/mol and Δκ in cm³ mol⁻¹ bar⁻¹.
//! Coefficients are those of Millero (1995) with the known typos of its Table 9 corrected
//! (missing 10⁻³ on κ, sign of the KB a1 term, calcite signs), as carried in CO2SYS.
//! KSi uses the KB coefficients because Millero (1995) gives none for silicic acid.
//! Check factors at 25 °C and 300 bar are those tabulated by Zeebe & Wolf-Gladrow (2001),
//! *CO2 in Seawater*, and are asserted in the tests below. Valid 0–1000 bar, 0–40 °C.

/// Gas constant in cm³ bar K⁻¹ mol⁻¹, CODATA 2018 (8.314462618 J K⁻¹ mol⁻¹).
pub const GAS_CONSTANT: f64 = 83.144_626_18;

/// One row of the correction table: ΔV = a0 + a1·t + a2·t², Δκ = (b0 + b1·t)/1000.
#[derive(Clone, Copy, Debug)]
pub struct VolumeTerms {
    pub a0: f64,
    pub a1: f64,
    pub a2: f64,
    pub b0: f64,
    pub b1: f64,
}

impl VolumeTerms {
    /// ln of the factor K(P)/K(0) at `t_c` °C and `p_bar` bar (gauge).
    pub fn ln_factor(&self, t_c: f64, p_bar: f64) -> f64 {
        if p_bar == 0.0 {
            return 0.0;
        }
        let dv = self.a0 + self.a1 * t_c + self.a2 * t_c * t_c;
        let dk = (self.b0 + self.b1 * t_c) / 1000.0;
        (-dv + 0.5 * dk * p_bar) * p_bar / (GAS_CONSTANT * (t_c + super::constants::KELVIN_OFFSET))
    }

    /// The factor K(P)/K(0) at `t_c` °C and `p_bar` bar (gauge).
    pub fn factor(&self, t_c: f64, p_bar: f64) -> f64 {
        self.ln_factor(t_c, p_bar).exp()
    }
}

const fn row(a0: f64, a1: f64, a2: f64, b0: f64, b1: f64) -> VolumeTerms {
    VolumeTerms { a0, a1, a2, b0, b1 }
}

/// K1 of carbonic acid.
pub const K1: VolumeTerms = row(-25.50, 0.1271, 0.0, -3.08, 0.0877);
/// K2 of carbonic acid.
pub const K2: VolumeTerms = row(-15.82, -0.0219, 0.0, 1.13, -0.1475);
/// Boric acid (also used for silicic acid).
pub const KB: VolumeTerms = row(-29.48, 0.1622, -0.002608, -2.84, 0.0);
/// Water.
pub const KW: VolumeTerms = row(-20.02, 0.1119, -0.001409, -5.13, 0.0794);
/// Bisulfate.
pub const KS: VolumeTerms = row(-18.03, 0.0466, 0.000316, -4.53, 0.0900);
/// Hydrogen fluoride.
pub const KF: VolumeTerms = row(-9.78, -0.0090, -0.000942, -3.91, 0.054);
/// First dissociation of phosphoric acid.
pub const KP1: VolumeTerms = row(-14.51, 0.1211, -0.000321, -2.67, 0.0427);
/// Second dissociation of phosphoric acid.
pub const KP2: VolumeTerms = row(-23.12, 0.1758, -0.002647, -5.15, 0.09);
/// Third dissociation of phosphoric acid.
pub const KP3: VolumeTerms = row(-26.57, 0.2020, -0.003042, -4.08, 0.0714);
/// Calcite solubility product.
pub const KSP_CALCITE: VolumeTerms = row(-48.76, 0.5304, 0.0, -11.76, 0.3692);
/// Aragonite solubility product (calcite ΔV + 2.8 cm³/mol).
pub const KSP_ARAGONITE: VolumeTerms = row(-45.96, 0.5304, 0.0, -11.76, 0.3692);

#[cfg(test)]
mod tests {
    use super::*;

    /// Zeebe & Wolf-Gladrow (2001), pressure factors at 25 °C and 300 bar. Their table was
    /// computed with R = 83.1451; with the CODATA 2018 value the 5th decimal moves, hence
    /// the 2e-4 tolerance.
    #[test]
    fn zeebe_wolf_gladrow_factors_at_25c_300bar() {
        let cases = [
            (K1, 1.30804),
            (K2, 1.21341),
            (KB, 1.38024),
            (KW, 1.23784),
            (KS, 1.21844),
            (KF, 1.13151),
            (KSP_CALCITE, 1.52962),
            (KSP_ARAGONITE, 1.47866),
            (KP1, 1.14852),
            (KP2, 1.27298),
            (KP3, 1.32217),
        ];
        for (terms, expected) in cases {
            let f = terms.factor(25.0, 300.0);
            assert!((f - expected).abs() < 2e-4, "{terms:?}: {f} vs {expected}");
        }
    }

    #[test]
    fn no_pressure_no_change() {
        assert_eq!(K1.factor(20.0, 0.0), 1.0);
    }
}
