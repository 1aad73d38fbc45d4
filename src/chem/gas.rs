//! CO2 in the gas phase: water vapour pressure, the fugacity factor and xCO2 → pCO2.

use super::constants::KELVIN_OFFSET;
use super::pressure::GAS_CONSTANT;

/// Standard atmosphere in bar.
pub const ATM_IN_BAR: f64 = 1.01325;

/// Water vapour pressure over seawater in atm, Weiss & Price (1980), *Mar. Chem.* 8:347:
/// pH2O = exp(24.4543 − 67.4509·(100/T) − 4.8489·ln(T/100) − 0.000544·S).
/// Valid t 0–40 °C, S 0–40.
pub fn vapour_pressure_atm(temp_c: f64, salinity: f64) -> f64 {
    let t100 = (temp_c + KELVIN_OFFSET) / 100.0;
    (24.4543 - 67.4509 / t100 - 4.8489 * t100.ln() - 0.000544 * salinity).exp()
}

/// pCO2 (µatm) of water in equilibrium with air of dry-air mole fraction `xco2_ppm` at total
/// pressure `pressure_atm`: pCO2 = xCO2·(P − pH2O) (Dickson et al. 2007, SOP 5;
/// vapour pressure of Weiss & Price 1980).
pub fn xco2_to_pco2(xco2_ppm: f64, temp_c: f64, salinity: f64, pressure_atm: f64) -> f64 {
    xco2_ppm * (pressure_atm - vapour_pressure_atm(temp_c, salinity))
}

/// fCO2/pCO2 at one atmosphere total pressure, from the virial coefficients of Weiss (1974),
/// *Mar. Chem.* 2:203: exp[(B + 2δ)·P/(R·T)], B = −1636.75 + 12.0408·T − 0.0327957·T² +
/// 3.16528e−5·T³ and δ = 57.7 − 0.118·T (cm³/mol, T in K). About 0.9968 at 25 °C.
/// Valid t −1–40 °C.
pub fn fugacity_factor(temp_c: f64) -> f64 {
    let t = temp_c + KELVIN_OFFSET;
    let b = -1636.75 + 12.0408 * t - 0.0327957 * t * t + 3.16528e-5 * t * t * t;
    let delta = 57.7 - 0.118 * t;
    ((b + 2.0 * delta) * ATM_IN_BAR / (GAS_CONSTANT * t)).exp()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Cross-check values computed with PyCO2SYS 1.8.3.4 (CODATA 2018 gas constant) in the
    /// project's fact sheet: fugacity factor 0.9968104 at 25 °C; 1 − pH2O = 0.96549 at
    /// 27 °C, S 35.
    #[test]
    fn pyco2sys_cross_checks() {
        assert!((fugacity_factor(25.0) - 0.9968104).abs() < 2e-7);
        assert!((1.0 - vapour_pressure_atm(27.0, 35.0) - 0.96549).abs() < 1e-5);
    }
}
