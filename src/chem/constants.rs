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

/// ln 10, for converting the published log10 and pK forms to natural logarithms.
const LN10: f64 = std::f64::consts::LN_10;

/// Temperature and salinity with the logarithms and roots every constant needs, computed
/// once per sample (the constants are evaluated millions of times in a projection).
#[derive(Clone, Copy, Debug)]
pub struct TempSal {
    /// Temperature, K.
    pub t_k: f64,
    /// ln of the temperature in K.
    pub ln_t: f64,
    /// Practical salinity.
    pub s: f64,
    /// √S.
    pub sqrt_s: f64,
    /// Ionic strength (DOE 1994), mol/kg-H2O.
    pub ionic: f64,
    /// √(ionic strength).
    pub sqrt_i: f64,
}

impl TempSal {
    /// From temperature in °C and practical salinity.
    pub fn new(temp_c: f64, s: f64) -> TempSal {
        let t_k = temp_c + KELVIN_OFFSET;
        let ionic = ionic_strength(s);
        TempSal {
            t_k,
            ln_t: t_k.ln(),
            s,
            sqrt_s: s.sqrt(),
            ionic,
            sqrt_i: ionic.sqrt(),
        }
    }
}

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
// CO2 solubility. From here on each function returns the natural logarithm of its
// constant, so that scale conversions and pressure corrections add up before a single exp.
// ---------------------------------------------------------------------------------------

/// ln K0, K0 = [CO2*]/fCO2 in mol kg⁻¹ atm⁻¹, Weiss (1974), *Mar. Chem.* 2:203.
/// Guide check: ln K0 = −3.5617 at S 35, 25 °C. Valid t −1–40 °C, S 0–40.
pub fn ln_k0_weiss1974(x: &TempSal) -> f64 {
    let t100 = x.t_k / 100.0;
    -60.2409
        + 93.4517 / t100
        + 23.3585 * (x.ln_t - 100f64.ln())
        + x.s * (0.023517 - 0.023656 * t100 + 0.0047036 * t100 * t100)
}

// ---------------------------------------------------------------------------------------
// Carbonic acid: K1, K2 sets (each returns (ln K1, ln K2))
// ---------------------------------------------------------------------------------------

/// K1 and K2 of carbonic acid, Lueker, Dickson & Keeling (2000), *Mar. Chem.* 70:105,
/// total scale (refit of Mehrbach et al. 1973). Guide check: log10 K1 = −5.8472,
/// log10 K2 = −8.9660. Fitted t 2–35 °C, S 19–43. Default set.
pub fn ln_k1k2_total_lueker2000(x: &TempSal) -> (f64, f64) {
    let (t, s) = (x.t_k, x.s);
    let pk1 = 3633.86 / t - 61.2172 + 9.6777 * x.ln_t - 0.011555 * s + 0.0001152 * s * s;
    let pk2 = 471.78 / t + 25.929 - 3.16967 * x.ln_t - 0.01781 * s + 0.0001122 * s * s;
    (-pk1 * LN10, -pk2 * LN10)
}

/// K1 and K2, Millero (2010), *Mar. Freshwater Res.* 61:139, seawater scale.
/// Fitted t 0–50 °C, S 1–50.
pub fn ln_k1k2_sws_millero2010(x: &TempSal) -> (f64, f64) {
    let (t, s, sq, ln_t) = (x.t_k, x.s, x.sqrt_s, x.ln_t);
    let pk1_0 = -126.34048 + 6320.813 / t + 19.568224 * ln_t;
    let a1 = 13.4038 * sq + 0.03206 * s - 5.242e-5 * s * s;
    let b1 = -530.659 * sq - 5.8210 * s;
    let c1 = -2.0664 * sq;
    let pk2_0 = -90.18333 + 5143.692 / t + 14.613358 * ln_t;
    let a2 = 21.3728 * sq + 0.1218 * s - 3.688e-4 * s * s;
    let b2 = -788.289 * sq - 19.189 * s;
    let c2 = -3.374 * sq;
    let pk1 = pk1_0 + a1 + b1 / t + c1 * ln_t;
    let pk2 = pk2_0 + a2 + b2 / t + c2 * ln_t;
    (-pk1 * LN10, -pk2 * LN10)
}

/// K1 and K2, Waters, Millero & Woosley (2014), *Mar. Chem.* 165:66 (corrigendum to
/// Millero 2010), seawater scale. Fitted t 0–50 °C, S 1–50.
pub fn ln_k1k2_sws_wmw2014(x: &TempSal) -> (f64, f64) {
    let (t, s, sq, ln_t) = (x.t_k, x.s, x.sqrt_s, x.ln_t);
    let pk1_0 = -126.34048 + 6320.813 / t + 19.568224 * ln_t;
    let a1 = 13.409160 * sq + 0.031646 * s - 5.1895e-5 * s * s;
    let b1 = -531.3642 * sq - 5.713 * s;
    let c1 = -2.0669166 * sq;
    let pk2_0 = -90.18333 + 5143.692 / t + 14.613358 * ln_t;
    let a2 = 21.225890 * sq + 0.12450870 * s - 3.7243e-4 * s * s;
    let b2 = -779.3444 * sq - 19.91739 * s;
    let c2 = -3.3534679 * sq;
    let pk1 = pk1_0 + a1 + b1 / t + c1 * ln_t;
    let pk2 = pk2_0 + a2 + b2 / t + c2 * ln_t;
    (-pk1 * LN10, -pk2 * LN10)
}

/// K1 and K2, Sulpis et al. (2020), *Ocean Sci.* 16:847, total scale (field-data refit of
/// the Lueker form). Fitted t −1.7–31.8 °C, S 30.7–37.6.
pub fn ln_k1k2_total_sulpis2020(x: &TempSal) -> (f64, f64) {
    let (t, s) = (x.t_k, x.s);
    let pk1 = 8510.63 / t - 172.4493 + 26.32996 * x.ln_t - 0.011555 * s + 0.0001152 * s * s;
    let pk2 = 4226.23 / t - 59.4636 + 9.60817 * x.ln_t - 0.01781 * s + 0.0001122 * s * s;
    (-pk1 * LN10, -pk2 * LN10)
}

/// K1 and K2, Dickson & Millero (1987), *Deep-Sea Res.* 34:1733, refit of Mehrbach et al.
/// (1973), seawater scale. Fitted t 2–35 °C, S 20–40.
pub fn ln_k1k2_sws_dickson_millero1987(x: &TempSal) -> (f64, f64) {
    let (t, s) = (x.t_k, x.s);
    let pk1 = 3670.7 / t - 62.008 + 9.7944 * x.ln_t - 0.0118 * s + 0.000116 * s * s;
    let pk2 = 1394.7 / t + 4.777 - 0.0184 * s + 0.000118 * s * s;
    (-pk1 * LN10, -pk2 * LN10)
}

// ---------------------------------------------------------------------------------------
// Other acid-base systems
// ---------------------------------------------------------------------------------------

/// ln KB of boric acid, Dickson (1990), *Deep-Sea Res.* 37:755, total scale.
/// Guide check: ln KB = −19.7964. Fitted t 0–45 °C, S 5–45.
pub fn ln_kb_total_dickson1990(x: &TempSal) -> f64 {
    let (t, s, sq) = (x.t_k, x.s, x.sqrt_s);
    (-8966.90 - 2890.53 * sq - 77.942 * s + 1.728 * s * sq - 0.0996 * s * s) / t
        + 148.0248
        + 137.1942 * sq
        + 1.62142 * s
        - (24.4344 + 25.085 * sq + 0.2474 * s) * x.ln_t
        + 0.053105 * sq * t
}

/// ln KW of water, Millero (1995), *Geochim. Cosmochim. Acta* 59:661, seawater scale.
/// (The Guide's total-scale form shifts the constant by −0.015 in ln K; we convert exactly
/// with KSO4 and KF instead, which gives ln KW(total) ≈ −30.442 against the Guide's −30.434.)
/// Fitted t 0–45 °C, S 0–45.
pub fn ln_kw_sws_millero1995(x: &TempSal) -> f64 {
    let t = x.t_k;
    148.9802 - 13847.26 / t - 23.6521 * x.ln_t + (-5.977 + 118.67 / t + 1.0495 * x.ln_t) * x.sqrt_s
        - 0.01615 * x.s
}

/// ln KSO4 (bisulfate dissociation), Dickson (1990), *J. Chem. Thermodyn.* 22:113, free
/// scale, converted to mol/kg-SW. Guide check: ln KS = −2.30. Fitted t 0–45 °C, S 5–45.
pub fn ln_ks_free_dickson1990(x: &TempSal) -> f64 {
    let (t, i, si, ln_t) = (x.t_k, x.ionic, x.sqrt_i, x.ln_t);
    -4276.1 / t + 141.328 - 23.093 * ln_t
        + (-13856.0 / t + 324.57 - 47.986 * ln_t) * si
        + (35474.0 / t - 771.54 + 114.723 * ln_t) * i
        - (2698.0 / t) * i * si
        + (1776.0 / t) * i * i
        + h2o_to_sw(x.s).ln()
}

/// ln KF of hydrogen fluoride, Perez & Fraga (1987), *Mar. Chem.* 21:161, free scale.
/// Guide check: ln KF = −6.09. Fitted t 9–33 °C, S 10–40. Default.
pub fn ln_kf_free_perez_fraga1987(x: &TempSal) -> f64 {
    874.0 / x.t_k - 9.68 + 0.111 * x.sqrt_s
}

/// ln KF of hydrogen fluoride, Dickson & Riley (1979), *Mar. Chem.* 7:89, free scale,
/// converted to mol/kg-SW (ln KF = −6.0468 at S 35, 25 °C). Alternative. Fitted t 5–35 °C.
pub fn ln_kf_free_dickson_riley1979(x: &TempSal) -> f64 {
    1590.2 / x.t_k - 12.641 + 1.525 * x.sqrt_i + h2o_to_sw(x.s).ln()
}

/// ln K1P, ln K2P, ln K3P of phosphoric acid, Yao & Millero (1995) as compiled in Millero
/// (1995), seawater scale. Guide checks (total scale): ln K1P = −3.71, ln K2P = −13.727,
/// ln K3P = −20.24. Fitted t 0–45 °C, S 0–45.
pub fn ln_kp_sws_millero1995(x: &TempSal) -> (f64, f64, f64) {
    let (t, s, sq, ln_t) = (x.t_k, x.s, x.sqrt_s, x.ln_t);
    let k1 = -4576.752 / t + 115.54 - 18.453 * ln_t
        + (-106.736 / t + 0.69171) * sq
        + (-0.65643 / t - 0.01844) * s;
    let k2 = -8814.715 / t + 172.1033 - 27.927 * ln_t
        + (-160.34 / t + 1.3566) * sq
        + (0.37335 / t - 0.05778) * s;
    let k3 = -3070.75 / t - 18.126 + (17.27039 / t + 2.81197) * sq + (-44.99486 / t - 0.09984) * s;
    (k1, k2, k3)
}

/// ln KSi of silicic acid, Yao & Millero (1995) as compiled in Millero (1995), seawater
/// scale, converted to mol/kg-SW. Guide check (total scale): ln KSi = −21.61. Fitted
/// t 0–45 °C.
pub fn ln_ksi_sws_millero1995(x: &TempSal) -> f64 {
    let (t, i, ln_t) = (x.t_k, x.ionic, x.ln_t);
    -8904.2 / t + 117.4 - 19.334 * ln_t
        + (-458.79 / t + 3.5913) * x.sqrt_i
        + (188.74 / t - 1.5998) * i
        + (-12.1652 / t + 0.07871) * i * i
        + h2o_to_sw(x.s).ln()
}

// ---------------------------------------------------------------------------------------
// Carbonate mineral solubility
// ---------------------------------------------------------------------------------------

/// ln of the stoichiometric solubility product of calcite, Mucci (1983), *Am. J. Sci.*
/// 283:780, (mol/kg-SW)². Check: log10 K*sp = −6.3693 at S 35, 25 °C (Zeebe &
/// Wolf-Gladrow 2001, App. A). Fitted t 5–40 °C, S 5–44.
pub fn ln_ksp_calcite_mucci1983(x: &TempSal) -> f64 {
    let (t, s, sq) = (x.t_k, x.s, x.sqrt_s);
    let log_k = -171.9065 - 0.077993 * t
        + 2839.319 / t
        + 71.595 * x.ln_t / LN10
        + (-0.77712 + 0.0028426 * t + 178.34 / t) * sq
        - 0.07711 * s
        + 0.0041249 * s * sq;
    log_k * LN10
}

/// ln of the stoichiometric solubility product of aragonite, Mucci (1983), *Am. J. Sci.*
/// 283:780, (mol/kg-SW)². Check: log10 K*sp = −6.1883 at S 35, 25 °C (Zeebe &
/// Wolf-Gladrow 2001, App. A). Fitted t 5–40 °C, S 5–44.
pub fn ln_ksp_aragonite_mucci1983(x: &TempSal) -> f64 {
    let (t, s, sq) = (x.t_k, x.s, x.sqrt_s);
    let log_k = -171.945 - 0.077993 * t
        + 2903.293 / t
        + 71.595 * x.ln_t / LN10
        + (-0.068393 + 0.0017276 * t + 88.135 / t) * sq
        - 0.10018 * s
        + 0.0059415 * s * sq;
    log_k * LN10
}

#[cfg(test)]
mod tests {
    use super::*;

    const S35: f64 = 35.0;

    fn x() -> TempSal {
        TempSal::new(25.0, S35)
    }

    /// Check values printed in Dickson, Sabine & Christian (2007), PICES Special
    /// Publication 3, chapter 5, at S = 35 and t = 25 °C.
    #[test]
    fn guide_check_values_at_s35_t25() {
        let x = x();
        assert!((ln_k0_weiss1974(&x) - -3.5617).abs() < 1e-4);
        let (k1, k2) = ln_k1k2_total_lueker2000(&x);
        assert!((k1 / LN10 - -5.8472).abs() < 1e-4);
        assert!((k2 / LN10 - -8.9660).abs() < 1e-4);
        assert!((ln_kb_total_dickson1990(&x) - -19.7964).abs() < 1e-4);
        assert!((ln_ks_free_dickson1990(&x) - -2.30).abs() < 5e-3);
        assert!((ln_kf_free_perez_fraga1987(&x) - -6.09).abs() < 5e-3);
    }

    /// Mucci (1983) solubility products, check values as printed in Zeebe & Wolf-Gladrow
    /// (2001), *CO2 in Seawater*, Appendix A.
    #[test]
    fn mucci_solubility_products_at_s35_t25() {
        assert!((ln_ksp_calcite_mucci1983(&x()) / LN10 - -6.3693).abs() < 1e-4);
        assert!((ln_ksp_aragonite_mucci1983(&x()) / LN10 - -6.1883).abs() < 1e-4);
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
        assert!((ln_kf_free_dickson_riley1979(&x()) - -6.04677).abs() < 1e-4);
    }
}
