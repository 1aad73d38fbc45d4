//! Conversion of a record's values to the canonical units, with the chemistry limits applied
//! to the converted values.

use rayon::prelude::*;

use super::sample::{Measured, Sample};
use crate::chem;
use crate::diag::Severity;
use crate::site::findings::{Finding, FindingKind};
use crate::site::schema::{Co2Kind, ConcUnit, PhScaleName};

/// Per-file unit settings for conversion and solving.
#[derive(Clone, Copy, Debug)]
pub(crate) struct FileUnits {
    pub ta: ConcUnit,
    pub dic: ConcUnit,
    pub silicate: ConcUnit,
    pub phosphate: ConcUnit,
    pub ph: PhScaleName,
    pub co2: Co2Kind,
    pub drop_out_of_range: bool,
}

fn to_per_kg(v: f64, unit: ConcUnit, rho: f64) -> f64 {
    match unit {
        ConcUnit::UmolPerKg => v,
        ConcUnit::MmolPerKg => v * 1000.0,
        ConcUnit::UmolPerL => chem::density::per_litre_to_per_kg(v, rho),
    }
}

/// Converts concentrations to µmol/kg and xCO2 to pCO2, in place, and applies the chemistry
/// module's limits to the converted values. Returns findings; `drop` is set for dropped rows.
pub(crate) fn convert_units(
    samples: &mut [Sample],
    drop: &mut [bool],
    units: FileUnits,
    lon: f64,
    lat: f64,
    file_index: usize,
) -> Vec<Finding> {
    let needs_density =
        [units.ta, units.dic, units.silicate, units.phosphate].contains(&ConcUnit::UmolPerL);
    samples
        .par_iter_mut()
        .zip(drop.par_iter_mut())
        .filter_map(|(s, dropped)| {
            let rho = if needs_density {
                match chem::density::density_kg_m3(s.salinity, s.temp_c, s.pressure_dbar, lon, lat)
                {
                    Ok(r) => r,
                    Err(msg) => {
                        if units.drop_out_of_range {
                            *dropped = true;
                        }
                        return Some(vec![limit_finding(
                            s,
                            file_index,
                            "density",
                            msg,
                            units.drop_out_of_range,
                        )]);
                    }
                }
            } else {
                1000.0
            };
            let m = s.measured;
            let ta = m.ta().map(|v| to_per_kg(v, units.ta, rho));
            let dic = m.dic().map(|v| to_per_kg(v, units.dic, rho));
            let pco2 = m.pco2().map(|v| match units.co2 {
                Co2Kind::Xco2Ppm => chem::gas::xco2_to_pco2(v, s.temp_c, s.salinity, 1.0),
                _ => v,
            });
            s.silicate = to_per_kg(s.silicate, units.silicate, rho);
            s.phosphate = to_per_kg(s.phosphate, units.phosphate, rho);
            s.measured = Measured::new(ta, dic, m.ph_t(), pco2, m.fco2());
            let mut found = Vec::new();
            for (key, v) in [
                ("ta", ta),
                ("dic", dic),
                ("pco2", pco2),
                ("fco2", m.fco2()),
                ("silicate", Some(s.silicate)),
                ("phosphate", Some(s.phosphate)),
            ] {
                if let Some(v) = v
                    && let Err(msg) = chem::limits::check(key, v)
                {
                    found.push(limit_finding(
                        s,
                        file_index,
                        key,
                        msg,
                        units.drop_out_of_range,
                    ));
                }
            }
            if !found.is_empty() && units.drop_out_of_range {
                *dropped = true;
            }
            (!found.is_empty()).then_some(found)
        })
        .flatten()
        .collect()
}

/// A value outside the chemistry module's limits after conversion: an error, or a warning
/// with the row dropped under `on_out_of_range = "drop"`.
pub(super) fn limit_finding(
    s: &Sample,
    file: usize,
    key: &str,
    msg: String,
    drop: bool,
) -> Finding {
    let (severity, message, help) = if drop {
        (
            Severity::Warning,
            format!("{msg} (after unit conversion); row dropped"),
            "the row is left out".to_string(),
        )
    } else {
        (
            Severity::Error,
            format!("{msg} (after unit conversion)"),
            "check the value and the record's [records.units]; set on_out_of_range = \"drop\" for the record to drop such rows instead".to_string(),
        )
    };
    Finding::new(
        severity,
        FindingKind::OutOfRange,
        file,
        s.source_file.clone(),
        s.line,
        message,
    )
    .with_field(key)
    .with_help(help)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::site::records::test_util::{csv_rows, sample, units};
    use crate::site::schema::PhScaleName;

    /// µmol/L → µmol/kg against TEOS-10 in-situ density from the PyPI `gsw` package 3.6.23
    /// (McDougall & Barker 2011), table tests/reference/density_reference.csv written by
    /// make_density_reference.py beside it. 2300 µmol/L must become 2300·1000/ρ µmol/kg.
    #[test]
    fn per_litre_conversion_matches_teos10_gsw_table() {
        let rows = csv_rows("tests/reference/density_reference.csv");
        assert!(rows.len() >= 20);
        for r in rows {
            let (sp, t, p, lon, lat, rho) = (
                r["sp"],
                r["temp_c"],
                r["pressure_dbar"],
                r["lon"],
                r["lat"],
                r["rho_kg_m3"],
            );
            let mut s = vec![sample(
                t,
                sp,
                p,
                Measured::new(Some(2300.0), None, None, None, None),
            )];
            let mut drop = vec![false];
            let f = convert_units(
                &mut s,
                &mut drop,
                units(ConcUnit::UmolPerL, Co2Kind::Pco2Uatm, PhScaleName::Total),
                lon,
                lat,
                0,
            );
            assert!(f.is_empty(), "{f:?}");
            let want = 2300.0 * 1000.0 / rho;
            let got = s[0].measured.ta().unwrap_or(f64::NAN);
            // 2e-5 relative: the density's Absolute Salinity anomaly is not applied by the
            // chemistry module (Reference Salinity is used), worth < 1e-5 in density.
            assert!(
                ((got - want) / want).abs() < 2e-5,
                "S {sp} T {t} p {p}: {got} vs {want}"
            );
        }
    }

    /// mmol/kg → µmol/kg is ×1000.
    #[test]
    fn mmol_per_kg_conversion() {
        let mut s = vec![sample(
            25.0,
            35.0,
            0.0,
            Measured::new(Some(2.3), None, None, None, None),
        )];
        let mut drop = vec![false];
        convert_units(
            &mut s,
            &mut drop,
            units(ConcUnit::MmolPerKg, Co2Kind::Pco2Uatm, PhScaleName::Total),
            0.0,
            0.0,
            0,
        );
        assert!((s[0].measured.ta().unwrap_or(0.0) - 2300.0).abs() < 1e-9);
    }

    /// xCO2 (dry air, ppm) → pCO2 (µatm) at 1 atm against PyCO2SYS 1.8.3.4 (Weiss & Price 1980
    /// vapour pressure), table tests/reference/xco2_reference.csv written by
    /// make_density_reference.py beside it.
    #[test]
    fn xco2_conversion_matches_pyco2sys_table() {
        let rows = csv_rows("tests/reference/xco2_reference.csv");
        assert!(rows.len() >= 40);
        for r in rows.into_iter().filter(|r| r["pressure_atm"] == 1.0) {
            let mut s = vec![sample(
                r["temp_c"],
                r["salinity"],
                0.0,
                Measured::new(Some(2300.0), None, None, Some(r["xco2_ppm"]), None),
            )];
            let mut drop = vec![false];
            convert_units(
                &mut s,
                &mut drop,
                units(ConcUnit::UmolPerKg, Co2Kind::Xco2Ppm, PhScaleName::Total),
                0.0,
                0.0,
                0,
            );
            let got = s[0].measured.pco2().unwrap_or(f64::NAN);
            let want = r["pco2_uatm"];
            assert!(((got - want) / want).abs() < 1e-7, "{got} vs {want}");
        }
    }
}
