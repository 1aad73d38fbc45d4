//! Equilibrium constants and total concentrations at one atmosphere, one function each.
//!
//! Conventions: `t_k` is temperature in kelvin, `s` practical salinity. Unless a function
//! says otherwise, constants are stoichiometric, in mol/kg-seawater, on the scale named in
//! the function's name (`_total`, `_sws` seawater scale, `_free`). Check values at S = 35,
//! t = 25 °C are those printed in Dickson, Sabine & Christian (2007), *Guide to Best
//! Practices for Ocean CO2 Measurements*, PICES Special Publication 3 (chapter 5), and are
//! asserted in the tests at the bottom of this file.

/// Zero of the Celsius scale in kelvin.
pub const KELVIN_OFFSET: f64 = 273.15;

/// Ionic strength of seawater (mol/kg-H2O) from practical salinity; DOE (1994), as used
/// inside KSO4 (Dickson 1990) and KSi (Millero 1995). Valid S 0–45.
pub fn ionic_strength(s: f64) -> f64 {
    19.924 * s / (1000.0 - 1.005 * s)
}

/// Conversion from mol/kg-H2O to mol/kg-seawater for the constants fitted per kg of water
/// (KSO4, KSi, KF of Dickson & Riley 1979): 1 − 0.001005·S (Dickson et al. 2007).
pub fn h2o_to_sw(s: f64) -> f64 {
    1.0 - 0.001005 * s
}

// ---------------------------------------------------------------------------------------
// Totals as functions of salinity (mol/kg-SW)
// ---------------------------------------------------------------------------------------

/// Total boron, Lee et al. (2010), *Geochim. Cosmochim. Acta* 74:1801: 0.0004326·S/35
/// (432.6 µmol/kg at S = 35). Default. Valid for oceanic seawater (S ≈ 30–40).
pub fn total_boron_lee2010(s: f64) -> f64 {
    0.0004326 * s / 35.0
}

/// Total boron, Uppström (1974), *Deep-Sea Res.* 21:161: 0.0004157·S/35 (415.7 µmol/kg at
/// S = 35). Alternative. Valid for oceanic seawater.
pub fn total_boron_uppstrom1974(s: f64) -> f64 {
    0.0004157 * s / 35.0
}

/// Total sulfate, Morris & Riley (1966), *Deep-Sea Res.* 13:699: (0.14/96.062)·S/1.80655
/// (28 235 µmol/kg at S = 35).
pub fn total_sulfate_morris_riley1966(s: f64) -> f64 {
    (0.14 / 96.062) * s / 1.80655
}

/// Total fluoride, Riley (1965), *Deep-Sea Res.* 12:219: (0.000067/18.998)·S/1.80655
/// (68.33 µmol/kg at S = 35).
pub fn total_fluoride_riley1965(s: f64) -> f64 {
    (0.000067 / 18.998) * s / 1.80655
}

/// Total calcium, Riley & Tongudai (1967), *Chem. Geol.* 2:263: (0.02128/40.087)·S/1.80655
/// (10 284.6 µmol/kg at S = 35). Assumes calcium conservative with salinity: estuarine or
/// evaporative lagoon water may depart from it.
pub fn total_calcium_riley_tongudai1967(s: f64) -> f64 {
    (0.02128 / 40.087) * s / 1.80655
}

// ---------------------------------------------------------------------------------------
// CO2 solubility
// ---------------------------------------------------------------------------------------

/// K0 = [CO2*]/fCO2 in mol kg⁻¹ atm⁻¹, Weiss (1974), *Mar. Chem.* 2:203.
/// Guide check: ln K0 = −3.5617 at S 35, 25 °C. Valid t −1–40 °C, S 0–40.
pub fn k0_weiss1974(t_k: f64, s: f64) -> f64 {
    let t100 = t_k / 100.0;
    (-60.2409
        + 93.4517 / t100
        + 23.3585 * t100.ln()
        + s * (0.023517 - 0.023656 * t100 + 0.0047036 * t100 * t100))
        .exp()
}

// ---------------------------------------------------------------------------------------
// Carbonic acid: K1, K2 sets
// ---------------------------------------------------------------------------------------

/// K1 and K2 of carbonic acid, Lueker, Dickson & Keeling (2000), *Mar. Chem.* 70:105,
/// total scale (refit of Mehrbach et al. 1973). Guide check: log10 K1 = −5.8472,
/// log10 K2 = −8.9660. Fitted t 2–35 °C, S 19–43. Default set.
pub fn k1k2_total_lueker2000(t_k: f64, s: f64) -> (f64, f64) {
    let pk1 = 3633.86 / t_k - 61.2172 + 9.6777 * t_k.ln() - 0.011555 * s + 0.0001152 * s * s;
    let pk2 = 471.78 / t_k + 25.929 - 3.16967 * t_k.ln() - 0.01781 * s + 0.0001122 * s * s;
    (10f64.powf(-pk1), 10f64.powf(-pk2))
}

/// K1 and K2, Millero (2010), *Mar. Freshwater Res.* 61:139, seawater scale.
/// Fitted t 0–50 °C, S 1–50.
pub fn k1k2_sws_millero2010(t_k: f64, s: f64) -> (f64, f64) {
    let sq = s.sqrt();
    let ln_t = t_k.ln();
    let pk1_0 = -126.34048 + 6320.813 / t_k + 19.568224 * ln_t;
    let a1 = 13.4038 * sq + 0.03206 * s - 5.242e-5 * s * s;
    let b1 = -530.659 * sq - 5.8210 * s;
    let c1 = -2.0664 * sq;
    let pk2_0 = -90.18333 + 5143.692 / t_k + 14.613358 * ln_t;
    let a2 = 21.3728 * sq + 0.1218 * s - 3.688e-4 * s * s;
    let b2 = -788.289 * sq - 19.189 * s;
    let c2 = -3.374 * sq;
    let pk1 = pk1_0 + a1 + b1 / t_k + c1 * ln_t;
    let pk2 = pk2_0 + a2 + b2 / t_k + c2 * ln_t;
    (10f64.powf(-pk1), 10f64.powf(-pk2))
}

/// K1 and K2, Waters, Millero & Woosley (2014), *Mar. Chem.* 165:66 (corrigendum to
/// Millero 2010), seawater scale. Fitted t 0–50 °C, S 1–50.
pub fn k1k2_sws_wmw2014(t_k: f64, s: f64) -> (f64, f64) {
    let sq = s.sqrt();
    let ln_t = t_k.ln();
    let pk1_0 = -126.34048 + 6320.813 / t_k + 19.568224 * ln_t;
    let a1 = 13.409160 * sq + 0.031646 * s - 5.1895e-5 * s * s;
    let b1 = -531.3642 * sq - 5.713 * s;
    let c1 = -2.0669166 * sq;
    let pk2_0 = -90.18333 + 5143.692 / t_k + 14.613358 * ln_t;
    let a2 = 21.225890 * sq + 0.12450870 * s - 3.7243e-4 * s * s;
    let b2 = -779.3444 * sq - 19.91739 * s;
    let c2 = -3.3534679 * sq;
    let pk1 = pk1_0 + a1 + b1 / t_k + c1 * ln_t;
    let pk2 = pk2_0 + a2 + b2 / t_k + c2 * ln_t;
    (10f64.powf(-pk1), 10f64.powf(-pk2))
}

/// K1 and K2, Sulpis et al. (2020), *Ocean Sci.* 16:847, total scale (field-data refit of
/// the Lueker form). Fitted t −1.7–31.8 °C, S 30.7–37.6.
pub fn k1k2_total_sulpis2020(t_k: f64, s: f64) -> (f64, f64) {
    let pk1 = 8510.63 / t_k - 172.4493 + 26.32996 * t_k.ln() - 0.011555 * s + 0.0001152 * s * s;
    let pk2 = 4226.23 / t_k - 59.4636 + 9.60817 * t_k.ln() - 0.01781 * s + 0.0001122 * s * s;
    (10f64.powf(-pk1), 10f64.powf(-pk2))
}

/// K1 and K2, Dickson & Millero (1987), *Deep-Sea Res.* 34:1733, refit of Mehrbach et al.
/// (1973), seawater scale. Fitted t 2–35 °C, S 20–40.
pub fn k1k2_sws_dickson_millero1987(t_k: f64, s: f64) -> (f64, f64) {
    let pk1 = 3670.7 / t_k - 62.008 + 9.7944 * t_k.ln() - 0.0118 * s + 0.000116 * s * s;
    let pk2 = 1394.7 / t_k + 4.777 - 0.0184 * s + 0.000118 * s * s;
    (10f64.powf(-pk1), 10f64.powf(-pk2))
}

// ---------------------------------------------------------------------------------------
// Other acid-base systems
// ---------------------------------------------------------------------------------------

/// KB of boric acid, Dickson (1990), *Deep-Sea Res.* 37:755, total scale.
/// Guide check: ln KB = −19.7964. Fitted t 0–45 °C, S 5–45.
pub fn kb_total_dickson1990(t_k: f64, s: f64) -> f64 {
    let sq = s.sqrt();
    let ln_kb = (-8966.90 - 2890.53 * sq - 77.942 * s + 1.728 * s * sq - 0.0996 * s * s) / t_k
        + 148.0248
        + 137.1942 * sq
        + 1.62142 * s
        - (24.4344 + 25.085 * sq + 0.2474 * s) * t_k.ln()
        + 0.053105 * sq * t_k;
    ln_kb.exp()
}

/// KW of water, Millero (1995), *Geochim. Cosmochim. Acta* 59:661, seawater scale.
/// (The Guide's total-scale form shifts the constant by −0.015 in ln K; we convert exactly
/// with KSO4 and KF instead, which gives ln KW(total) ≈ −30.442 against the Guide's −30.434.)
/// Fitted t 0–45 °C, S 0–45.
pub fn kw_sws_millero1995(t_k: f64, s: f64) -> f64 {
    (148.9802 - 13847.26 / t_k - 23.6521 * t_k.ln()
        + (-5.977 + 118.67 / t_k + 1.0495 * t_k.ln()) * s.sqrt()
        - 0.01615 * s)
        .exp()
}

/// KSO4 (bisulfate dissociation), Dickson (1990), *J. Chem. Thermodyn.* 22:113, free scale,
/// converted to mol/kg-SW. Guide check: ln KS = −2.30. Fitted t 0–45 °C, S 5–45.
pub fn ks_free_dickson1990(t_k: f64, s: f64) -> f64 {
    let i = ionic_strength(s);
    let ln_t = t_k.ln();
    let ln_ks = -4276.1 / t_k + 141.328 - 23.093 * ln_t
        + (-13856.0 / t_k + 324.57 - 47.986 * ln_t) * i.sqrt()
        + (35474.0 / t_k - 771.54 + 114.723 * ln_t) * i
        - (2698.0 / t_k) * i * i.sqrt()
        + (1776.0 / t_k) * i * i;
    ln_ks.exp() * h2o_to_sw(s)
}

/// KF of hydrogen fluoride, Perez & Fraga (1987), *Mar. Chem.* 21:161, free scale.
/// Guide check: ln KF = −6.09. Fitted t 9–33 °C, S 10–40. Default.
pub fn kf_free_perez_fraga1987(t_k: f64, s: f64) -> f64 {
    (874.0 / t_k - 9.68 + 0.111 * s.sqrt()).exp()
}

/// KF of hydrogen fluoride, Dickson & Riley (1979), *Mar. Chem.* 7:89, free scale,
/// converted to mol/kg-SW (ln KF = −6.0468 at S 35, 25 °C). Alternative. Fitted t 5–35 °C.
pub fn kf_free_dickson_riley1979(t_k: f64, s: f64) -> f64 {
    let i = ionic_strength(s);
    (1590.2 / t_k - 12.641 + 1.525 * i.sqrt()).exp() * h2o_to_sw(s)
}

/// K1P, K2P, K3P of phosphoric acid, Yao & Millero (1995) as compiled in Millero (1995),
/// seawater scale. Guide checks (total scale): ln K1P = −3.71, ln K2P = −13.727,
/// ln K3P = −20.24. Fitted t 0–45 °C, S 0–45.
pub fn kp_sws_millero1995(t_k: f64, s: f64) -> (f64, f64, f64) {
    let sq = s.sqrt();
    let ln_t = t_k.ln();
    let k1 = (-4576.752 / t_k + 115.54 - 18.453 * ln_t
        + (-106.736 / t_k + 0.69171) * sq
        + (-0.65643 / t_k - 0.01844) * s)
        .exp();
    let k2 = (-8814.715 / t_k + 172.1033 - 27.927 * ln_t
        + (-160.34 / t_k + 1.3566) * sq
        + (0.37335 / t_k - 0.05778) * s)
        .exp();
    let k3 = (-3070.75 / t_k - 18.126
        + (17.27039 / t_k + 2.81197) * sq
        + (-44.99486 / t_k - 0.09984) * s)
        .exp();
    (k1, k2, k3)
}

/// KSi of silicic acid, Yao & Millero (1995) as compiled in Millero (1995), seawater scale,
/// converted to mol/kg-SW. Guide check (total scale): ln KSi = −21.61. Fitted t 0–45 °C.
pub fn ksi_sws_millero1995(t_k: f64, s: f64) -> f64 {
    let i = ionic_strength(s);
    let ln_t = t_k.ln();
    (-8904.2 / t_k + 117.4 - 19.334 * ln_t
        + (-458.79 / t_k + 3.5913) * i.sqrt()
        + (188.74 / t_k - 1.5998) * i
        + (-12.1652 / t_k + 0.07871) * i * i)
        .exp()
        * h2o_to_sw(s)
}

// ---------------------------------------------------------------------------------------
// Carbonate mineral solubility
// ---------------------------------------------------------------------------------------

/// Stoichiometric solubility product of calcite, Mucci (1983), *Am. J. Sci.* 283:780,
/// (mol/kg-SW)². Check: log10 K*sp = −6.3693 at S 35, 25 °C (Zeebe & Wolf-Gladrow 2001,
/// App. A). Fitted t 5–40 °C, S 5–44.
pub fn ksp_calcite_mucci1983(t_k: f64, s: f64) -> f64 {
    let sq = s.sqrt();
    let log_k = -171.9065 - 0.077993 * t_k + 2839.319 / t_k + 71.595 * t_k.log10()
        + (-0.77712 + 0.0028426 * t_k + 178.34 / t_k) * sq
        - 0.07711 * s
        + 0.0041249 * s * sq;
    10f64.powf(log_k)
}

/// Stoichiometric solubility product of aragonite, Mucci (1983), *Am. J. Sci.* 283:780,
/// (mol/kg-SW)². Check: log10 K*sp = −6.1883 at S 35, 25 °C (Zeebe & Wolf-Gladrow 2001,
/// App. A). Fitted t 5–40 °C, S 5–44.
pub fn ksp_aragonite_mucci1983(t_k: f64, s: f64) -> f64 {
    let sq = s.sqrt();
    let log_k = -171.945 - 0.077993 * t_k + 2903.293 / t_k + 71.595 * t_k.log10()
        + (-0.068393 + 0.0017276 * t_k + 88.135 / t_k) * sq
        - 0.10018 * s
        + 0.0059415 * s * sq;
    10f64.powf(log_k)
}

#[cfg(test)]
mod tests {
    use super::*;

    const T25: f64 = 298.15;
    const S35: f64 = 35.0;

    /// Check values printed in Dickson, Sabine & Christian (2007), PICES Special
    /// Publication 3, chapter 5, at S = 35 and t = 25 °C.
    #[test]
    fn guide_check_values_at_s35_t25() {
        assert!((k0_weiss1974(T25, S35).ln() - -3.5617).abs() < 1e-4);
        let (k1, k2) = k1k2_total_lueker2000(T25, S35);
        assert!((k1.log10() - -5.8472).abs() < 1e-4);
        assert!((k2.log10() - -8.9660).abs() < 1e-4);
        assert!((kb_total_dickson1990(T25, S35).ln() - -19.7964).abs() < 1e-4);
        assert!((ks_free_dickson1990(T25, S35).ln() - -2.30).abs() < 5e-3);
        assert!((kf_free_perez_fraga1987(T25, S35).ln() - -6.09).abs() < 5e-3);
    }

    /// Mucci (1983) solubility products, check values as printed in Zeebe & Wolf-Gladrow
    /// (2001), *CO2 in Seawater*, Appendix A.
    #[test]
    fn mucci_solubility_products_at_s35_t25() {
        assert!((ksp_calcite_mucci1983(T25, S35).log10() - -6.3693).abs() < 1e-4);
        assert!((ksp_aragonite_mucci1983(T25, S35).log10() - -6.1883).abs() < 1e-4);
    }

    /// Totals at S = 35 as tabulated in the sources named on each function.
    #[test]
    fn totals_at_s35() {
        assert!((total_boron_lee2010(S35) * 1e6 - 432.6).abs() < 0.05);
        assert!((total_boron_uppstrom1974(S35) * 1e6 - 415.7).abs() < 0.05);
        assert!((total_sulfate_morris_riley1966(S35) * 1e6 - 28235.4).abs() < 0.5);
        assert!((total_fluoride_riley1965(S35) * 1e6 - 68.33).abs() < 0.01);
        assert!((total_calcium_riley_tongudai1967(S35) * 1e6 - 10284.6).abs() < 0.1);
    }

    /// Dickson & Riley (1979) KF: ln KF = −6.0468 at S 35, 25 °C, a value computed with
    /// PyCO2SYS 1.8.3 (cross-check, not a published number).
    #[test]
    fn kf_dickson_riley_cross_check() {
        assert!((kf_free_dickson_riley1979(T25, S35).ln() - -6.04677).abs() < 1e-4);
    }
}
