//! A temperature-logger file for the thermal-stress outlook (documented in
//! `docs/site-format.md`, section `[thermal]`).
//!
//! Format: CSV with a header; one column holds the date or date-time (ISO 8601 by default, or
//! the record's `date_format`), one the temperature. Times without an offset take the site's
//! `utc_offset`. Blank lines and lines starting with `#` are skipped. Times must increase
//! strictly (no duplicates); temperatures are converted to °C from the file's `unit` and must
//! lie within −2–40 °C, so a Fahrenheit logger read as Celsius is caught with a hint to set the
//! unit.

use std::path::Path;

use chrono::{FixedOffset, NaiveDateTime};
use serde::{Deserialize, Serialize};

use super::dates::{parse_number, parse_stamp};
use super::schema::DateFormat;
use crate::diag::{Diagnostic, Diagnostics};

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
            let mut d = err(
                line,
                col(vi),
                &spec.temp_column,
                format!(
                    "temperature {raw} {} is {temp_c:.2} °C, outside {}–{} °C",
                    spec.unit.key(),
                    TEMP_RANGE_C.0,
                    TEMP_RANGE_C.1
                ),
            );
            if spec.unit == TempUnit::Celsius && (40.0..=110.0).contains(&raw) {
                d = d.with_help("this looks like °F: set unit = \"degF\" in [thermal]");
            } else if spec.unit == TempUnit::Celsius && (270.0..=315.0).contains(&raw) {
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
