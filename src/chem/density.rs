//! Seawater density from TEOS-10 (IOC, SCOR & IAPSO 2010; McDougall & Barker 2011) through
//! the `gsw` crate, for converting concentrations per litre into per kilogram.
//!
//! The `gsw` crate provides Absolute Salinity anomaly, Conservative Temperature from
//! potential temperature, and in-situ density `rho(SA, CT, p)`. It does not provide
//! potential temperature from in-situ temperature, so that one step uses the adiabatic
//! lapse rate of Bryden (1973) integrated by the Runge–Kutta scheme of Fofonoff & Millard
//! (1983, UNESCO Tech. Pap. Mar. Sci. 44). Over 0–1000 dbar it differs from the TEOS-10
//! potential temperature by about 1e-3 °C, i.e. below 1e-5 relative in density.

/// Adiabatic lapse rate in °C/dbar, Bryden (1973) as given in Fofonoff & Millard (1983).
fn adiabatic_lapse_rate(s: f64, t: f64, p: f64) -> f64 {
    let ds = s - 35.0;
    (((-2.1687e-16 * t + 1.8676e-14) * t - 4.6206e-13) * p
        + ((2.7759e-12 * t - 1.1351e-10) * ds
            + ((-5.4481e-14 * t + 8.733e-12) * t - 6.7795e-10) * t
            + 1.8741e-8))
        * p
        + (-4.2393e-8 * t + 1.8932e-6) * ds
        + ((6.6228e-10 * t - 6.836e-8) * t + 8.5258e-6) * t
        + 3.5803e-5
}

/// Potential temperature (°C) referenced to the surface, Fofonoff & Millard (1983).
pub fn potential_temperature(salinity: f64, temp_c: f64, pressure_dbar: f64) -> f64 {
    let h = -pressure_dbar;
    let mut p = pressure_dbar;
    let mut xk = h * adiabatic_lapse_rate(salinity, temp_c, p);
    let mut t = temp_c + 0.5 * xk;
    let mut q = xk;
    p += 0.5 * h;
    xk = h * adiabatic_lapse_rate(salinity, t, p);
    t += 0.292_893_22 * (xk - q);
    q = 0.585_786_44 * xk + 0.121_320_344 * q;
    xk = h * adiabatic_lapse_rate(salinity, t, p);
    t += 1.707_106_781 * (xk - q);
    q = 3.414_213_562 * xk - 4.121_320_344 * q;
    p += 0.5 * h;
    xk = h * adiabatic_lapse_rate(salinity, t, p);
    t + (xk - 2.0 * q) / 6.0
}

/// In-situ density (kg/m³) of seawater of practical salinity `salinity` at `temp_c` and
/// `pressure_dbar` (gauge). Valid SP 0–42, t −2–40 °C, p 0–10000 dbar.
///
/// Absolute Salinity is taken as Reference Salinity (SR = 35.16504/35·SP): the `gsw` crate
/// 0.2 does not carry the TEOS-10 composition-anomaly atlas, so the position (`lon`, `lat`,
/// degrees) is accepted for that use but not applied. The anomaly is below about
/// 0.02 g/kg in surface water, i.e. under 2e-5 relative in density.
pub fn density_kg_m3(
    salinity: f64,
    temp_c: f64,
    pressure_dbar: f64,
    _lon: f64,
    _lat: f64,
) -> Result<f64, String> {
    let bad = || {
        format!(
            "TEOS-10 density undefined for salinity {salinity}, temperature {temp_c} °C, \
             pressure {pressure_dbar} dbar"
        )
    };
    if !(salinity.is_finite() && temp_c.is_finite() && pressure_dbar.is_finite()) {
        return Err(bad());
    }
    let sa = gsw::conversions::sr_from_sp(salinity);
    let pt = potential_temperature(salinity, temp_c, pressure_dbar);
    let ct = gsw::conversions::ct_from_pt(sa, pt).map_err(|_| bad())?;
    let rho = gsw::volume::rho(sa, ct, pressure_dbar).map_err(|_| bad())?;
    if rho.is_finite() && rho > 900.0 && rho < 1200.0 {
        Ok(rho)
    } else {
        Err(bad())
    }
}

/// µmol/L → µmol/kg with the density in kg/m³.
pub fn per_litre_to_per_kg(value_per_l: f64, density_kg_m3: f64) -> f64 {
    value_per_l / (density_kg_m3 / 1000.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Fofonoff & Millard (1983) check value: θ(S 40, t 40 °C, p 10000 dbar) = 36.89073 °C.
    #[test]
    fn potential_temperature_unesco_check_value() {
        assert!((potential_temperature(40.0, 40.0, 10000.0) - 36.89073).abs() < 1e-4);
    }

    /// SP 35, t 25 °C, p 0 gives about 1023.3 kg/m³ (from memory; the tight check is the
    /// committed table from the PyPI `gsw` package in tests/reference).
    #[test]
    fn surface_density_plausible() {
        let rho = density_kg_m3(35.0, 25.0, 0.0, 0.0, 0.0).unwrap();
        assert!((rho - 1023.34).abs() < 0.05, "{rho}");
    }

    #[test]
    fn nonsense_is_an_error_not_a_panic() {
        assert_eq!(
            density_kg_m3(f64::NAN, 25.0, 0.0, 0.0, 0.0),
            Err(
                "TEOS-10 density undefined for salinity NaN, temperature 25 °C, pressure 0 dbar"
                    .to_string()
            )
        );
    }
}
