//! Record files: streaming CSV reading with column mapping, unit conversion to the canonical
//! units (µmol/kg, pH total scale, µatm), and per-sample solution of the carbonate system.
//!
//! Canonical units after conversion:
//! * TA, DIC, silicate, phosphate: µmol/kg-seawater. µmol/L is divided by the TEOS-10 in-situ
//!   density at the sample's temperature, salinity, pressure and the site's position (the
//!   density of the water as sampled; a lab that measured by volume at another temperature
//!   should convert itself); mmol/kg is multiplied by 1000.
//! * pH: total scale, converted from the SWS, free or NBS scale with the chemistry module's
//!   scale factors at the sample's conditions.
//! * pCO2/fCO2: µatm at the sample's temperature. xCO2 (ppm, dry air) becomes pCO2 =
//!   xCO2 × (1 atm − pH2O), with the vapour pressure of Weiss & Price (1980).
//! * Pressure: dbar (gauge). A depth in m is taken as that many dbar (1 m ≈ 1 dbar; the error
//!   is under 1 % in the upper 1000 m, negligible for the constants at reef depths).

//!
//! Layout: [`sample`] (the row types), [`columns`] (header mapping), [`reading`] (streaming
//! CSV rows into samples), [`units`] (conversion to canonical units), [`solving`] (pair
//! choice and solution of each row).

mod columns;
mod reading;
mod sample;
mod solving;
mod units;

pub(crate) use columns::Columns;
pub(crate) use reading::{ReadContext, Stations, read_record};
pub use sample::{Measured, Pair, RowFlags, Sample, ser_opt_time, ser_time};
pub use solving::{TOL_CO2_FRACTION, TOL_PH, TOL_TA_DIC_UMOL_KG};
pub(crate) use solving::{TaModel, solve_samples};
pub(crate) use units::{FileUnits, convert_units};

/// Physical limits applied to every row before solving, beyond the chemistry module's own
/// limits. Chosen to cover any surface ocean or reef lagoon water (common practice):
/// temperature −2…40 °C (seawater freezes near −1.9 °C; reef flats rarely exceed 38 °C);
/// practical salinity 0…45 (hypersaline lagoons reach the low 40s); depth and pressure
/// 0…1000 m / dbar.
pub const TEMP_RANGE_C: (f64, f64) = (-2.0, 40.0);
pub const SALINITY_RANGE: (f64, f64) = (0.0, 45.0);
pub const DEPTH_RANGE_M: (f64, f64) = (0.0, 1000.0);

/// Removes the rows marked in `drop`.
pub(crate) fn retain_kept(samples: &mut Vec<Sample>, drop: &[bool]) {
    let mut i = 0;
    samples.retain(|_| {
        let keep = !drop.get(i).copied().unwrap_or(false);
        i += 1;
        keep
    });
}

#[cfg(test)]
pub(crate) mod test_util {
    use std::collections::HashMap;
    use std::path::Path;
    use std::sync::Arc;

    use chrono::{FixedOffset, TimeZone};

    use super::{FileUnits, Measured, RowFlags, Sample};
    use crate::site::schema::{Co2Kind, ConcUnit, PhScaleName, RecordKind};

    pub(crate) fn sample(temp_c: f64, salinity: f64, pressure_dbar: f64, m: Measured) -> Sample {
        let t = FixedOffset::east_opt(0)
            .and_then(|o| o.with_ymd_and_hms(2024, 1, 1, 0, 0, 0).single())
            .unwrap_or_else(|| unreachable!());
        Sample {
            source_file: Arc::from(Path::new("t.csv")),
            line: 2,
            station: Arc::from("S"),
            time: t,
            has_time: false,
            season: 0,
            kind: RecordKind::Bottle,
            temp_c,
            salinity,
            pressure_dbar,
            silicate: 0.0,
            phosphate: 0.0,
            measured: m,
            pair: None,
            ta_estimated: false,
            state: None,
            flags: RowFlags::default(),
        }
    }

    pub(crate) fn units(ta: ConcUnit, co2: Co2Kind, ph: PhScaleName) -> FileUnits {
        FileUnits {
            ta,
            dic: ConcUnit::UmolPerKg,
            silicate: ConcUnit::UmolPerKg,
            phosphate: ConcUnit::UmolPerKg,
            ph,
            co2,
            drop_out_of_range: false,
        }
    }

    pub(crate) fn csv_rows(path: &str) -> Vec<HashMap<String, f64>> {
        let full = Path::new(env!("CARGO_MANIFEST_DIR")).join(path);
        let mut r =
            csv::Reader::from_path(&full).unwrap_or_else(|e| panic!("{}: {e}", full.display()));
        let headers: Vec<String> = r
            .headers()
            .map(|h| h.iter().map(str::to_string).collect())
            .unwrap_or_default();
        r.records()
            .filter_map(Result::ok)
            .map(|rec| {
                headers
                    .iter()
                    .cloned()
                    .zip(rec.iter().map(|v| v.parse().unwrap_or(f64::NAN)))
                    .collect()
            })
            .collect()
    }
}
