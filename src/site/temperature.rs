//! A temperature-logger file for the thermal-stress outlook (documented in
//! `docs/site-format.md`, section `[thermal]`).
//!
//! Format: CSV with a header; one column holds the date or date-time (ISO 8601 by default, or
//! the record's `date_format`), one the temperature. Times without an offset take the site's
//! `utc_offset`. Blank lines and lines starting with `#` are skipped. Times must increase
//! strictly (no duplicates); temperatures are converted to °C from the file's `unit` and must
//! lie within −2–40 °C, so a Fahrenheit logger read as Celsius is caught with a hint to set the
//! unit.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use chrono::{FixedOffset, NaiveDateTime};
use serde::{Deserialize, Serialize};

use super::Sample;
use super::dates::{parse_number, parse_stamp};
use super::schema::{DateFormat, RecordKind};
use crate::diag::{Diagnostic, Diagnostics};

/// `[thermal]` in the site file: where the temperatures come from and, optionally, a stated
/// maximum monthly mean (MMM) with its source and base period.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ThermalSpec {
    /// A temperature-logger file, relative to the site file. Without it the site's sensor
    /// records serve (the station with the most timed rows).
    #[serde(default)]
    pub path: Option<String>,
    /// Column of the date or date-time (default `datetime`, else `date`).
    #[serde(default)]
    pub time_column: Option<String>,
    /// Column of the temperature (default `temp_c`).
    #[serde(default)]
    pub temp_column: Option<String>,
    #[serde(default)]
    pub unit: TempUnit,
    #[serde(default)]
    pub date_format: DateFormat,
    /// A stated MMM, °C (e.g. from a satellite SST climatology).
    #[serde(default)]
    pub mmm_c: Option<f64>,
    /// Where the stated MMM comes from (required with `mmm_c`).
    #[serde(default)]
    pub mmm_source: Option<String>,
    /// The years the stated MMM was averaged over, e.g. `[1985, 2012]` (required with `mmm_c`).
    #[serde(default)]
    pub mmm_base_period: Option<[i32; 2]>,
    /// Adaptation allowance: °C per decade added to the MMM from the last year of record
    /// (default 0).
    #[serde(default)]
    pub allowance_c_per_decade: f64,
}

/// Plausible MMM values, °C (tropical and subtropical reef water).
pub const MMM_RANGE_C: (f64, f64) = (15.0, 35.0);
/// Largest adaptation allowance accepted, °C per decade.
pub const MAX_ALLOWANCE_C_PER_DECADE: f64 = 1.0;

/// A stated MMM with its provenance.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct StatedMmm {
    pub value_c: f64,
    pub source: String,
    pub base_period: (i32, i32),
}

/// Where the temperatures came from.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub enum ThermalSource {
    /// A logger file (path as given, relative to the site file).
    Logger { file: String, path: PathBuf },
    /// The timed rows of one station of the site's sensor records.
    SensorRecords { station: String },
}

/// The site's temperature record as the thermal outlook takes it.
#[derive(Clone, Debug, PartialEq)]
pub struct ThermalRecord {
    pub source: ThermalSource,
    pub readings: Vec<TempReading>,
    pub stated_mmm: Option<StatedMmm>,
    pub allowance_c_per_decade: f64,
}

/// The site's temperature record: the `[thermal]` logger file when given, else the timed
/// rows of the sensor station with the most of them; `Ok(None)` when there is neither.
/// Diagnostics name the site file's `thermal.*` fields (without line: locate them with
/// `LoadedSite::locate`) or the logger file's line and column.
pub fn load_thermal(
    site_path: &Path,
    spec: Option<&ThermalSpec>,
    utc_offset: FixedOffset,
    samples: &[Sample],
) -> Result<Option<ThermalRecord>, Diagnostics> {
    let default = ThermalSpec::default();
    let spec = spec.unwrap_or(&default);
    let stated_mmm = stated_mmm(spec)?;
    if !(0.0..=MAX_ALLOWANCE_C_PER_DECADE).contains(&spec.allowance_c_per_decade) {
        return Err(field_error(
            site_path,
            "thermal.allowance_c_per_decade",
            format!(
                "allowance_c_per_decade = {} is outside 0–{MAX_ALLOWANCE_C_PER_DECADE} °C per decade",
                spec.allowance_c_per_decade
            ),
        ));
    }
    let (source, readings) = match &spec.path {
        Some(file) => {
            let path = super::validate::tidy_path(
                &site_path.parent().unwrap_or(Path::new(".")).join(file),
            );
            let text = std::fs::read_to_string(&path).map_err(|e| {
                field_error(
                    site_path,
                    "thermal.path",
                    format!("cannot read {}: {e}", path.display()),
                )
            })?;
            let header = text
                .trim_start_matches('\u{feff}')
                .lines()
                .find(|l| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
            let has = |c: &str| {
                header.is_some_and(|h| h.split(',').any(|x| x.trim().eq_ignore_ascii_case(c)))
            };
            let time_column = spec.time_column.clone().unwrap_or_else(|| {
                if has("datetime") {
                    "datetime".into()
                } else {
                    "date".into()
                }
            });
            let logger = LoggerSpec {
                time_column,
                temp_column: spec.temp_column.clone().unwrap_or_else(|| "temp_c".into()),
                unit: spec.unit,
                date_format: spec.date_format,
                utc_offset,
            };
            let readings = read_logger(&path, &text, &logger)?;
            (
                ThermalSource::Logger {
                    file: file.clone(),
                    path,
                },
                readings,
            )
        }
        None => match sensor_readings(samples) {
            Some(v) => v,
            None => return Ok(None),
        },
    };
    Ok(Some(ThermalRecord {
        source,
        readings,
        stated_mmm,
        allowance_c_per_decade: spec.allowance_c_per_decade,
    }))
}

fn field_error(site_path: &Path, field: &str, message: String) -> Diagnostics {
    Diagnostics::from(
        Diagnostic::error(message)
            .with_file(site_path)
            .with_field(field.to_string()),
    )
}

/// The stated MMM, checked: a value needs its source and base period.
fn stated_mmm(spec: &ThermalSpec) -> Result<Option<StatedMmm>, Diagnostics> {
    let mut d = Diagnostics::new();
    let Some(value_c) = spec.mmm_c else {
        return Ok(None);
    };
    if !(MMM_RANGE_C.0..=MMM_RANGE_C.1).contains(&value_c) {
        d.push(
            Diagnostic::error(format!(
                "mmm_c = {value_c} °C is outside {}–{} °C",
                MMM_RANGE_C.0, MMM_RANGE_C.1
            ))
            .with_field("thermal.mmm_c"),
        );
    }
    let source = spec.mmm_source.clone().unwrap_or_default();
    if source.trim().is_empty() {
        d.push(
            Diagnostic::error("a stated mmm_c needs mmm_source: where the value comes from")
                .with_field("thermal.mmm_c")
                .with_help(
                    "e.g. mmm_source = \"satellite SST climatology, 5 km grid cell over the site\"",
                ),
        );
    }
    let base = match spec.mmm_base_period {
        Some([a, b]) if (1900..=2100).contains(&a) && a <= b && b <= 2100 => (a, b),
        Some([a, b]) => {
            d.push(
                Diagnostic::error(format!(
                    "mmm_base_period = [{a}, {b}] is not a span of years"
                ))
                .with_field("thermal.mmm_base_period")
                .with_help("give the first and last year, e.g. [1985, 2012]"),
            );
            (a, b)
        }
        None => {
            d.push(
                Diagnostic::error("a stated mmm_c needs mmm_base_period: the years it averages")
                    .with_field("thermal.mmm_c")
                    .with_help("e.g. mmm_base_period = [1985, 2012]"),
            );
            (0, 0)
        }
    };
    if d.has_errors() {
        return Err(d);
    }
    Ok(Some(StatedMmm {
        value_c,
        source,
        base_period: base,
    }))
}

/// Timed temperatures of the sensor station with the most timed rows, in time order with
/// repeated times dropped.
fn sensor_readings(samples: &[Sample]) -> Option<(ThermalSource, Vec<TempReading>)> {
    let mut by_station: BTreeMap<&str, Vec<&Sample>> = BTreeMap::new();
    for s in samples {
        if s.kind == RecordKind::Sensor && s.has_time && s.temp_c.is_finite() {
            by_station.entry(&s.station).or_default().push(s);
        }
    }
    let (station, mut rows) = by_station.into_iter().max_by_key(|(_, v)| v.len())?;
    rows.sort_by_key(|s| s.time);
    let mut readings: Vec<TempReading> = Vec::with_capacity(rows.len());
    for s in rows {
        let local = s.time.naive_local();
        if readings.last().is_some_and(|r| r.local >= local) {
            continue;
        }
        readings.push(TempReading {
            local,
            has_time: true,
            temp_c: s.temp_c,
            line: s.line,
        });
    }
    Some((
        ThermalSource::SensorRecords {
            station: station.to_string(),
        },
        readings,
    ))
}

/// Plausible in-situ temperatures after unit conversion, °C.
pub const TEMP_RANGE_C: (f64, f64) = (-2.0, 40.0);

/// The unit a logger writes temperatures in.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
pub enum TempUnit {
    #[default]
    #[serde(rename = "degC")]
    Celsius,
    #[serde(rename = "degF")]
    Fahrenheit,
    #[serde(rename = "K")]
    Kelvin,
}

impl TempUnit {
    /// The reading in °C (exact conversions: °F − 32 × 5/9; K − 273.15).
    pub fn to_celsius(self, v: f64) -> f64 {
        match self {
            TempUnit::Celsius => v,
            TempUnit::Fahrenheit => (v - 32.0) * 5.0 / 9.0,
            TempUnit::Kelvin => v - 273.15,
        }
    }

    /// The unit's key in the site file.
    pub fn key(self) -> &'static str {
        match self {
            TempUnit::Celsius => "degC",
            TempUnit::Fahrenheit => "degF",
            TempUnit::Kelvin => "K",
        }
    }
}

/// How to read one logger file (the `[thermal]` table's file keys).
#[derive(Clone, Debug, PartialEq)]
pub struct LoggerSpec {
    pub time_column: String,
    pub temp_column: String,
    pub unit: TempUnit,
    pub date_format: DateFormat,
    pub utc_offset: FixedOffset,
}

/// One reading as read: local date-time in its own offset, whether a time of day was given,
/// the temperature in °C and the 1-based line it came from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TempReading {
    pub local: NaiveDateTime,
    pub has_time: bool,
    pub temp_c: f64,
    pub line: usize,
}

/// Reads a logger file. Every problem is a diagnostic naming the file, line, column and
/// field; reading stops at the first 20 errors.
pub fn read_logger(
    path: &Path,
    text: &str,
    spec: &LoggerSpec,
) -> Result<Vec<TempReading>, Diagnostics> {
    let mut diags = Diagnostics::new();
    let err = |line: usize, col: usize, field: &str, msg: String| {
        Diagnostic::error(msg)
            .with_file(path)
            .at(line, col)
            .with_field(field.to_string())
    };
    let mut lines = text
        .trim_start_matches('\u{feff}')
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l))
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let Some((header_line, header)) = lines.next() else {
        diags.push(Diagnostic::error("the temperature file is empty").with_file(path));
        return Err(diags);
    };
    let names: Vec<&str> = header.split(',').map(str::trim).collect();
    let find = |want: &str| names.iter().position(|n| n.eq_ignore_ascii_case(want));
    let (Some(ti), Some(vi)) = (find(&spec.time_column), find(&spec.temp_column)) else {
        let missing: Vec<&str> = [&spec.time_column, &spec.temp_column]
            .into_iter()
            .filter(|c| find(c).is_none())
            .map(String::as_str)
            .collect();
        diags.push(
            err(
                header_line,
                1,
                "header",
                format!(
                    "the header has no column {} (columns: {})",
                    missing.join(" or "),
                    names.join(", ")
                ),
            )
            .with_help("set time_column and temp_column in [thermal] to the file's column names"),
        );
        return Err(diags);
    };
    let mut out: Vec<TempReading> = Vec::new();
    for (line, row) in lines {
        if diags.len() >= 20 {
            break;
        }
        let cells: Vec<&str> = row.split(',').collect();
        let cell = |i: usize| cells.get(i).map_or("", |c| c.trim());
        let col = |i: usize| 1 + cells.iter().take(i).map(|c| c.len() + 1).sum::<usize>();
        let stamp = match parse_stamp(cell(ti), None, spec.date_format, spec.utc_offset) {
            Ok(s) => s,
            Err(e) => {
                diags.push(err(line, col(ti), &spec.time_column, e.message).with_help(e.help));
                continue;
            }
        };
        let raw = match parse_number(cell(vi), &[]) {
            Ok(Some(v)) => v,
            Ok(None) => continue, // an empty cell is a missing reading
            Err(e) => {
                diags.push(err(line, col(vi), &spec.temp_column, e.message).with_help(e.help));
                continue;
            }
        };
        let temp_c = spec.unit.to_celsius(raw);
        if !(TEMP_RANGE_C.0..=TEMP_RANGE_C.1).contains(&temp_c) {
            let reading = if spec.unit == TempUnit::Celsius {
                format!("temperature {raw} °C")
            } else {
                format!("temperature {raw} {} ({temp_c:.2} °C)", spec.unit.key())
            };
            let mut d = err(
                line,
                col(vi),
                &spec.temp_column,
                format!(
                    "{reading} is outside {}–{} °C",
                    TEMP_RANGE_C.0, TEMP_RANGE_C.1
                ),
            );
            // Readings that would be reef water in another unit (10–40 °C as °F or K).
            if spec.unit == TempUnit::Celsius && (50.0..=104.0).contains(&raw) {
                d = d.with_help("this looks like °F: set unit = \"degF\" in [thermal]");
            } else if spec.unit == TempUnit::Celsius && (283.15..=313.15).contains(&raw) {
                d = d.with_help("this looks like kelvin: set unit = \"K\" in [thermal]");
            }
            diags.push(d);
            continue;
        }
        let local = stamp.time.naive_local();
        if let Some(prev) = out.last()
            && prev.local >= local
        {
            let what = if prev.local == local {
                "repeats"
            } else {
                "is earlier than"
            };
            diags.push(
                err(
                    line,
                    col(ti),
                    &spec.time_column,
                    format!("time {} {what} the reading on line {}", cell(ti), prev.line),
                )
                .with_help("a logger file must be in time order with one reading per time"),
            );
            continue;
        }
        out.push(TempReading {
            local,
            has_time: stamp.has_time,
            temp_c,
            line,
        });
    }
    if diags.has_errors() {
        return Err(diags);
    }
    if out.is_empty() {
        diags.push(Diagnostic::error("the temperature file has no readings").with_file(path));
        return Err(diags);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(unit: TempUnit) -> LoggerSpec {
        LoggerSpec {
            time_column: "datetime".into(),
            temp_column: "temp_c".into(),
            unit,
            date_format: DateFormat::Iso,
            utc_offset: FixedOffset::west_opt(8 * 3600).expect("offset"),
        }
    }

    fn messages(d: Diagnostics) -> String {
        d.iter()
            .map(|d| d.render(false))
            .collect::<Vec<_>>()
            .join("\n")
    }

    #[test]
    fn reads_hourly_rows_in_local_time() {
        let text = "\u{feff}datetime,temp_c\n# a comment\n2024-01-01T00:00,27.5\n2024-01-01T01:00-08:00,27.25\n";
        let r = read_logger(Path::new("t.csv"), text, &spec(TempUnit::Celsius)).expect("valid");
        assert_eq!(r.len(), 2);
        assert_eq!(r[0].line, 3);
        assert_eq!(r[1].temp_c, 27.25);
        assert!(r[0].has_time);
        assert_eq!(r[1].local.to_string(), "2024-01-01 01:00:00");
    }

    /// °F to °C, worked: (82.4 − 32) × 5/9 = 28.0; 301.15 K − 273.15 = 28.0.
    #[test]
    fn converts_units() {
        let f = read_logger(
            Path::new("t.csv"),
            "datetime,temp_c\n2024-01-01,82.4\n",
            &spec(TempUnit::Fahrenheit),
        )
        .expect("valid");
        assert!((f[0].temp_c - 28.0).abs() < 1e-12);
        let k = read_logger(
            Path::new("t.csv"),
            "datetime,temp_c\n2024-01-01,301.15\n",
            &spec(TempUnit::Kelvin),
        )
        .expect("valid");
        assert!((k[0].temp_c - 28.0).abs() < 1e-9);
    }

    #[test]
    fn fahrenheit_without_its_unit_key_is_named() {
        let e = read_logger(
            Path::new("logger.csv"),
            "datetime,temp_c\n2024-01-01,82.4\n",
            &spec(TempUnit::Celsius),
        )
        .expect_err("82.4 °C is not seawater");
        let m = messages(e);
        assert!(m.contains("logger.csv:2:12"), "{m}");
        assert!(
            m.contains("outside -2–40 °C") && m.contains("unit = \"degF\""),
            "{m}"
        );
    }

    #[test]
    fn duplicate_and_backward_times_are_named() {
        let text =
            "datetime,temp_c\n2024-01-01T00:00,27\n2024-01-01T00:00,27\n2023-12-31T23:00,27\n";
        let m = messages(
            read_logger(Path::new("l.csv"), text, &spec(TempUnit::Celsius)).expect_err("bad order"),
        );
        assert!(
            m.contains("l.csv:3:1") && m.contains("repeats the reading on line 2"),
            "{m}"
        );
        assert!(
            m.contains("l.csv:4:1") && m.contains("is earlier than the reading on line 2"),
            "{m}"
        );
    }

    #[test]
    fn missing_column_names_the_header() {
        let m = messages(
            read_logger(
                Path::new("l.csv"),
                "time,t\n2024-01-01,27\n",
                &spec(TempUnit::Celsius),
            )
            .expect_err("no columns"),
        );
        assert!(
            m.contains("l.csv:1:1") && m.contains("no column datetime or temp_c"),
            "{m}"
        );
    }
}
