//! Streaming a record file's rows into samples (values still in the file's units).

use std::collections::HashMap;
use std::fs::File;
use std::io::BufReader;
use std::path::Path;
use std::sync::Arc;

use chrono::{DateTime, Datelike, FixedOffset, NaiveDate, NaiveDateTime, Utc};

use super::columns::{Columns, resolve_columns};
use super::sample::{Measured, RowFlags, Sample};
use super::{DEPTH_RANGE_M, SALINITY_RANGE, TEMP_RANGE_C};
use crate::chem;
use crate::diag::Severity;
use crate::site::dates::{CellError, parse_number, parse_stamp};
use crate::site::findings::{Finding, FindingKind, Value};
use crate::site::schema::{Co2Kind, DateFormat, OutOfRange, RecordSpec};

/// Everything reading needs to know about the site.
pub(crate) struct ReadContext<'a> {
    pub file_index: usize,
    pub path: Arc<Path>,
    pub spec: &'a RecordSpec,
    pub spec_index: usize,
    pub utc_offset: FixedOffset,
    pub season_of_month: [usize; 12],
    pub default_pressure_dbar: f64,
    pub default_station: Arc<str>,
    pub now: DateTime<Utc>,
}

impl ReadContext<'_> {
    /// A finding about `line` of this file.
    pub fn finding(
        &self,
        severity: Severity,
        kind: FindingKind,
        line: usize,
        message: impl Into<String>,
    ) -> Finding {
        Finding::new(
            severity,
            kind,
            self.file_index,
            self.path.clone(),
            line,
            message,
        )
    }

    /// An error about the whole file (or its `line`), pointing at its `[[records]]` path.
    pub fn file_error(&self, line: usize, message: String, help: &str) -> Finding {
        self.finding(Severity::Error, FindingKind::Unreadable, line, message)
            .with_field(format!("records[{}].path", self.spec_index))
            .with_help(help)
    }
}

/// Interns station names so that a million rows share a few allocations.
#[derive(Default)]
pub(crate) struct Stations(HashMap<String, Arc<str>>);

impl Stations {
    pub fn get(&mut self, name: &str) -> Arc<str> {
        if let Some(a) = self.0.get(name) {
            return a.clone();
        }
        let a: Arc<str> = Arc::from(name);
        self.0.insert(name.to_string(), a.clone());
        a
    }
}

/// Reads one record file into `out` (values still in the file's units; see
/// [`super::convert_units`]). Returns the columns found, or `None` when the file could not be
/// read at all.
pub(crate) fn read_record(
    ctx: &ReadContext<'_>,
    stations: &mut Stations,
    out: &mut Vec<Sample>,
    findings: &mut Vec<Finding>,
) -> Option<Columns> {
    let (mut rdr, cols, header_line) = open_record(ctx, findings)?;
    let mut rows = RowReader {
        ctx,
        cols: &cols,
        station_fixed: ctx.spec.station.as_deref().map(|s| stations.get(s)),
        last_time: HashMap::new(),
        last_station: None,
        times: Vec::new(),
        out_of_order: 0,
    };
    let mut rec = csv::ByteRecord::new();
    let start_len = out.len();
    // Reserve the whole file's rows once, estimated from the first rows, so that a long
    // sensor series does not pay for the vector doubling (which briefly holds 1.5× the rows).
    let file_len = std::fs::metadata(&ctx.path).map_or(0, |m| m.len());
    let mut reserved = false;
    loop {
        if !reserved && out.len() - start_len == 1000 {
            reserved = true;
            let used = rdr.position().byte().max(1);
            let estimate = file_len.saturating_mul(1000) / used;
            let extra = usize::try_from(estimate + estimate / 50).unwrap_or(0);
            out.reserve_exact(extra.saturating_sub(1000));
        }
        match rdr.read_byte_record(&mut rec) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => {
                let line = e
                    .position()
                    .map_or(0, |p| usize::try_from(p.line()).unwrap_or(0));
                findings.push(ctx.file_error(
                    line,
                    format!("CSV error: {e}"),
                    "check the quoting on this line",
                ));
                break;
            }
        }
        let line = usize::try_from(rec.position().map_or(0, |p| p.line())).unwrap_or(0);
        if rec.iter().all(|c| c.iter().all(u8::is_ascii_whitespace)) {
            continue; // a row of empty cells
        }
        if let Some(s) = rows.row(&rec, line, stations, findings) {
            out.push(s);
        }
    }
    if rows.out_of_order > 0
        && let Some(f) = rows.date_format_hint(header_line)
    {
        findings.push(f);
    }
    if out.len() == start_len
        && !findings
            .iter()
            .any(|f| f.file_index == ctx.file_index && f.severity == Severity::Error)
    {
        findings.push(ctx.file_error(
            header_line,
            format!("{} has no data rows", ctx.path.display()),
            "add one row per sample below the header",
        ));
    }
    Some(cols)
}

type Reader = csv::Reader<BufReader<File>>;

/// Opens a record file and reads its header: the reader, the columns and the header's line.
fn open_record(
    ctx: &ReadContext<'_>,
    findings: &mut Vec<Finding>,
) -> Option<(Reader, Columns, usize)> {
    let file = match File::open(&ctx.path) {
        Ok(f) => f,
        Err(e) => {
            findings.push(ctx.file_error(
                0,
                format!("cannot open {}: {e}", ctx.path.display()),
                "check the path and permissions",
            ));
            return None;
        }
    };
    let mut rdr = csv::ReaderBuilder::new()
        .flexible(true)
        .has_headers(true)
        .buffer_capacity(1 << 16)
        .from_reader(BufReader::with_capacity(1 << 16, file));
    let headers = match rdr.byte_headers() {
        Ok(h) => h.clone(),
        Err(e) => {
            findings.push(ctx.file_error(
                0,
                format!("cannot read the header of {}: {e}", ctx.path.display()),
                "the first line must be a comma-separated header",
            ));
            return None;
        }
    };
    let header_line = usize::try_from(headers.position().map_or(1, |p| p.line())).unwrap_or(1);
    // UTF-16 (a common spreadsheet "Unicode text" export) would otherwise show as garbage.
    let raw = headers.as_slice();
    if raw.starts_with(&[0xFF, 0xFE]) || raw.starts_with(&[0xFE, 0xFF]) || raw.contains(&0) {
        // No line: a snippet of UTF-16 bytes would only print garbage.
        findings.push(ctx.file_error(
            0,
            format!(
                "{} is not UTF-8 text (it looks like UTF-16)",
                ctx.path.display()
            ),
            "save or export the file as \"CSV UTF-8\" (comma-separated)",
        ));
        return None;
    }
    let header_names: Vec<String> = headers
        .iter()
        .map(|h| {
            String::from_utf8_lossy(h)
                .trim()
                .trim_start_matches('\u{feff}')
                .trim()
                .to_string()
        })
        .collect();
    if header_names.len() <= 1 && header_names.first().is_some_and(|h| h.contains(';')) {
        findings.push(ctx.file_error(
            header_line,
            format!("{} looks semicolon-separated", ctx.path.display()),
            "record files must be comma-separated (CSV); export the file again with commas",
        ));
        return None;
    }
    if rdr.is_done() && header_names.iter().all(|h| h.is_empty()) {
        findings.push(ctx.file_error(
            0,
            format!("{} is empty", ctx.path.display()),
            "the first line must be a comma-separated header",
        ));
        return None;
    }
    let cols = resolve_columns(header_names, ctx, header_line, findings)?;
    Some((rdr, cols, header_line))
}

/// The numbers of one row, in the file's units (`None`: empty or not in the file).
struct Cells {
    temp: Option<f64>,
    sal: Option<f64>,
    depth: Option<f64>,
    pres: Option<f64>,
    ta: Option<f64>,
    dic: Option<f64>,
    ph: Option<f64>,
    co2: Option<f64>,
    si: Option<f64>,
    po4: Option<f64>,
}

/// Reads rows of one file, keeping what a row needs from the rows before it.
struct RowReader<'a, 'c> {
    ctx: &'a ReadContext<'c>,
    cols: &'a Columns,
    station_fixed: Option<Arc<str>>,
    /// Time and line of each station's previous row (for the date-order check).
    last_time: HashMap<Arc<str>, (DateTime<FixedOffset>, usize)>,
    last_station: Option<Arc<str>>,
    /// Station and local time of every row read, in file order (for the date-format test).
    times: Vec<(Arc<str>, NaiveDateTime)>,
    /// Rows with a date earlier than their station's previous row.
    out_of_order: usize,
}

impl RowReader<'_, '_> {
    /// A finding about `line` in the cell `col`, its field named by the header (and by the
    /// quantity `key` where the header differs).
    fn cell_finding(
        &self,
        line: usize,
        col: Option<usize>,
        key: &str,
        e: CellError,
        sev: Severity,
        kind: FindingKind,
    ) -> Finding {
        let field = col
            .and_then(|c| self.cols.headers.get(c))
            .map_or(key.to_string(), |h| {
                if h == key {
                    h.clone()
                } else {
                    format!("{h} ({key})")
                }
            });
        self.ctx
            .finding(sev, kind, line, e.message)
            .with_cell(col)
            .with_field(field)
            .with_help(e.help)
    }

    /// One row as a sample, or `None` (with findings) when it cannot be used.
    fn row(
        &mut self,
        rec: &csv::ByteRecord,
        line: usize,
        stations: &mut Stations,
        findings: &mut Vec<Finding>,
    ) -> Option<Sample> {
        let ncols = self.cols.headers.len();
        if rec.len() != ncols {
            // A quoted cell running over line ends is almost always a missing quote.
            let help = if rec.iter().any(|c| c.contains(&b'\n')) {
                format!(
                    "a quoted cell starting on line {line} runs over several lines: check for a missing closing quote (\")"
                )
            } else {
                "every row must have as many comma-separated cells as the header".to_string()
            };
            let e = CellError {
                message: format!("the row has {} cells but the header has {ncols}", rec.len()),
                help,
            };
            findings.push(self.cell_finding(
                line,
                None,
                "row",
                e,
                Severity::Error,
                FindingKind::CellCount,
            ));
            return None;
        }
        let cells = self.numbers(rec, line, findings);
        let stamp = self.stamp(rec, line, findings);
        let (Some(cells), Some(stamp)) = (cells, stamp) else {
            return None;
        };
        let station = self.station(rec, line, stations, findings)?;
        if self.out_of_limits(&cells, line, findings) {
            return None;
        }
        let (Some(temp_c), Some(salinity)) = (cells.temp, cells.sal) else {
            let (which, col) = if cells.temp.is_none() {
                ("temperature", self.cols.temp)
            } else {
                ("salinity", self.cols.sal)
            };
            findings.push(
                self.ctx
                    .finding(
                        Severity::Warning,
                        FindingKind::MissingTs,
                        line,
                        format!("the row has no {which}; row dropped"),
                    )
                    .with_cell(col)
                    .with_field(which)
                    .with_help("temperature and salinity are needed to solve the carbonate system"),
            );
            return None;
        };
        let pressure_dbar = cells
            .pres
            .or(cells.depth)
            .unwrap_or(self.ctx.default_pressure_dbar);
        self.date_order(&station, stamp.time, line, findings);

        let local = stamp.time.with_timezone(&self.ctx.utc_offset);
        let month0 = local.month0() as usize;
        let season = self.ctx.season_of_month.get(month0).copied().unwrap_or(0);
        let (pco2, fco2) = match self.cols.co2_kind {
            Co2Kind::Fco2Uatm => (None, cells.co2),
            _ => (cells.co2, None), // xCO2 is held in the pCO2 slot until converted
        };
        Some(Sample {
            source_file: self.ctx.path.clone(),
            line,
            station,
            time: stamp.time,
            has_time: stamp.has_time,
            season,
            kind: self.ctx.spec.kind,
            temp_c,
            salinity,
            pressure_dbar,
            silicate: cells.si.unwrap_or(0.0),
            phosphate: cells.po4.unwrap_or(0.0),
            measured: Measured::new(cells.ta, cells.dic, cells.ph, pco2, fco2),
            pair: None,
            ta_estimated: false,
            state: None,
            flags: RowFlags::default(),
        })
    }

    /// The numeric cells, or `None` (with a finding per bad cell) when any is not a number.
    fn numbers(
        &self,
        rec: &csv::ByteRecord,
        line: usize,
        findings: &mut Vec<Finding>,
    ) -> Option<Cells> {
        let c = self.cols;
        let missing = &self.ctx.spec.missing;
        let mut ok = true;
        let mut num = |i: Option<usize>, key: &str| -> Option<f64> {
            let i = i?;
            match cell(rec, i).and_then(|s| parse_number(s, missing)) {
                Ok(v) => v,
                Err(e) => {
                    findings.push(self.cell_finding(
                        line,
                        Some(i),
                        key,
                        e,
                        Severity::Error,
                        FindingKind::NonNumeric,
                    ));
                    ok = false;
                    None
                }
            }
        };
        let cells = Cells {
            temp: num(c.temp, "temp_c"),
            sal: match c.sal {
                Some(_) => num(c.sal, "salinity"),
                None => self.ctx.spec.salinity,
            },
            depth: num(c.depth, "depth_m"),
            pres: num(c.pres, "pressure_dbar"),
            ta: num(c.ta, "ta"),
            dic: num(c.dic, "dic"),
            ph: num(c.ph, "ph"),
            co2: num(c.co2, "co2"),
            si: num(c.si, "silicate"),
            po4: num(c.po4, "phosphate"),
        };
        ok.then_some(cells)
    }

    /// The row's timestamp, or `None` with a finding (unreadable or in the future).
    fn stamp(
        &self,
        rec: &csv::ByteRecord,
        line: usize,
        findings: &mut Vec<Finding>,
    ) -> Option<crate::site::dates::Stamp> {
        let date_col = self.cols.date;
        let stamp = cell(rec, date_col).and_then(|d| {
            let t = match self.cols.time {
                Some(i) => Some(cell(rec, i)?),
                None => None,
            };
            parse_stamp(d, t, self.ctx.spec.date_format, self.ctx.utc_offset)
        });
        let stamp = match stamp {
            Ok(s) => s,
            Err(e) => {
                findings.push(self.cell_finding(
                    line,
                    Some(date_col),
                    "date",
                    e,
                    Severity::Error,
                    FindingKind::BadDate,
                ));
                return None;
            }
        };
        if stamp.time.with_timezone(&Utc) > self.ctx.now {
            let e = CellError {
                message: format!("{} is in the future", stamp.time.to_rfc3339()),
                help: "check the year and the date format (day-first / month-first) of this record"
                    .to_string(),
            };
            findings.push(self.cell_finding(
                line,
                Some(date_col),
                "date",
                e,
                Severity::Error,
                FindingKind::FutureDate,
            ));
            return None;
        }
        Some(stamp)
    }

    /// The row's station: the record's fixed station, the station cell, or the site name.
    fn station(
        &mut self,
        rec: &csv::ByteRecord,
        line: usize,
        stations: &mut Stations,
        findings: &mut Vec<Finding>,
    ) -> Option<Arc<str>> {
        if let Some(s) = &self.station_fixed {
            return Some(s.clone());
        }
        let Some(i) = self.cols.station else {
            return Some(self.ctx.default_station.clone());
        };
        match cell(rec, i) {
            Err(e) => {
                findings.push(self.cell_finding(
                    line,
                    Some(i),
                    "station",
                    e,
                    Severity::Error,
                    FindingKind::NonUtf8,
                ));
                None
            }
            Ok(s) if !s.trim().is_empty() => {
                let s = s.trim();
                match &self.last_station {
                    Some(prev) if &**prev == s => Some(prev.clone()),
                    _ => {
                        let a = stations.get(s);
                        self.last_station = Some(a.clone());
                        Some(a)
                    }
                }
            }
            _ => Some(self.ctx.default_station.clone()),
        }
    }

    /// Checks T, S and depth/pressure against the physical limits; true when any is outside
    /// (the row is then dropped with a warning, or refused with an error).
    fn out_of_limits(&self, c: &Cells, line: usize, findings: &mut Vec<Finding>) -> bool {
        let drop = self.ctx.spec.on_out_of_range == OutOfRange::Drop;
        let cols = self.cols;
        let mut out = false;
        for (col, key, v, (lo, hi), unit) in [
            (cols.temp, "temp_c", c.temp, TEMP_RANGE_C, " °C"),
            (cols.sal, "salinity", c.sal, SALINITY_RANGE, ""),
            (cols.depth, "depth_m", c.depth, DEPTH_RANGE_M, " m"),
            (cols.pres, "pressure_dbar", c.pres, DEPTH_RANGE_M, " dbar"),
        ] {
            let Some(v) = v else { continue };
            let chem_msg = chem::limits::check(key, v).err();
            if !(v < lo || v > hi || chem_msg.is_some()) {
                continue;
            }
            let (sev, action) = if drop {
                (Severity::Warning, "row dropped")
            } else {
                (
                    Severity::Error,
                    "set on_out_of_range = \"drop\" for the record to drop such rows instead",
                )
            };
            // The record limits are the narrower ones: say the same range as the help.
            let message = if v < lo || v > hi {
                format!(
                    "{key} = {}{unit} is outside the valid range {lo} to {hi}{unit}",
                    crate::numfmt::tidy(v)
                )
            } else {
                chem_msg.unwrap_or_default()
            };
            let e = CellError {
                message: if drop {
                    format!("{message}; row dropped")
                } else {
                    message
                },
                help: format!("valid {key}: {lo} to {hi}{unit}; {action}"),
            };
            let unit = unit.trim();
            let values = vec![
                Value::new("value", v, unit),
                Value::new("valid_min", lo, unit),
                Value::new("valid_max", hi, unit),
            ];
            findings.push(
                self.cell_finding(line, col, key, e, sev, FindingKind::OutOfRange)
                    .with_values(values),
            );
            out = true;
        }
        out
    }

    /// Dates out of order within a station: a warning on the row (kept).
    fn date_order(
        &mut self,
        station: &Arc<str>,
        time: DateTime<FixedOffset>,
        line: usize,
        findings: &mut Vec<Finding>,
    ) {
        self.times.push((station.clone(), time.naive_local()));
        if let Some((prev, prev_line)) = self.last_time.get(station)
            && time < *prev
        {
            self.out_of_order += 1;
            findings.push(
                self.ctx
                    .finding(
                        Severity::Note,
                        FindingKind::OutOfOrder,
                        line,
                        format!(
                            "{} is earlier than the previous row of station `{station}` (line {prev_line}); row kept",
                            time.to_rfc3339()
                        ),
                    )
                    .with_cell(Some(self.cols.date))
                    .with_field("date")
                    .with_other_line(*prev_line)
                    .with_help("rows need not be sorted, but out-of-order dates often mean a wrong date format"),
            );
        }
        self.last_time.insert(station.clone(), (time, line));
    }
}

impl RowReader<'_, '_> {
    /// A warning that the record's date format is probably the other one: only for day-first
    /// or month-first records, and only when every date also reads as a valid date with day
    /// and month swapped and, read that way, every station's rows are in time order.
    fn date_format_hint(&self, header_line: usize) -> Option<Finding> {
        let (now, other) = match self.ctx.spec.date_format {
            DateFormat::DayFirst => ("day-first", "month-first"),
            DateFormat::MonthFirst => ("month-first", "day-first"),
            DateFormat::Iso => return None,
        };
        if !swapped_dates_are_in_order(&self.times) {
            return None;
        }
        Some(
            self.ctx
                .finding(
                    Severity::Warning,
                    FindingKind::DateFormat,
                    header_line,
                    format!(
                        "{} rows of {} have dates earlier than their station's previous row when read {now}; every date also reads as a valid date with day and month swapped, and read that way every station's rows are in time order: the dates are probably {other}",
                        self.out_of_order,
                        self.ctx.path.display()
                    ),
                )
                .with_cell(Some(self.cols.date))
                .with_field("date")
                .with_help(format!(
                    "if the file writes dates {other}, set date_format = \"{other}\" in its [[records]] table"
                )),
        )
    }
}

/// True when every date, with day and month swapped, is a valid date and the swapped times
/// of each station are non-decreasing in file order.
fn swapped_dates_are_in_order(times: &[(Arc<str>, NaiveDateTime)]) -> bool {
    let mut last: HashMap<&str, NaiveDateTime> = HashMap::new();
    for (station, t) in times {
        let d = t.date();
        let Some(swapped) = NaiveDate::from_ymd_opt(d.year(), d.day(), d.month()) else {
            return false;
        };
        let t2 = swapped.and_time(t.time());
        if last.get(&**station).is_some_and(|p| t2 < *p) {
            return false;
        }
        last.insert(station, t2);
    }
    true
}

/// The text of cell `i`.
fn cell(rec: &csv::ByteRecord, i: usize) -> Result<&str, CellError> {
    std::str::from_utf8(rec.get(i).unwrap_or(b"")).map_err(|_| CellError {
        message: "the cell is not valid UTF-8 text".to_string(),
        help: "save the file as UTF-8".to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rows(dates: &[(&str, u32, u32)]) -> Vec<(Arc<str>, NaiveDateTime)> {
        dates
            .iter()
            .map(|&(st, m, d)| {
                let t = NaiveDate::from_ymd_opt(2024, m, d)
                    .and_then(|x| x.and_hms_opt(0, 0, 0))
                    .unwrap_or_else(|| panic!("bad test date"));
                (Arc::from(st), t)
            })
            .collect()
    }

    /// Month-first dates 01/12, 02/03, 02/10 (12 Jan, 3 Feb, 10 Feb) read day-first are
    /// 1 Dec, 2 Mar, 2 Oct: out of order; swapped they are in order, so the hint applies.
    /// With a day above 12 (25 Mar) no swapped reading exists, and no hint is given.
    #[test]
    fn swapped_dates_decide_the_format_hint() {
        let read = rows(&[("A", 12, 1), ("A", 3, 2), ("A", 10, 2)]);
        assert!(swapped_dates_are_in_order(&read));
        let not = rows(&[("A", 12, 1), ("A", 3, 25), ("A", 10, 2)]);
        assert!(!swapped_dates_are_in_order(&not));
        // Swapped but still out of order within a station: no hint.
        let unsorted = rows(&[("A", 2, 3), ("A", 1, 2)]);
        assert!(!swapped_dates_are_in_order(&unsorted));
        // Each station separately.
        let two = rows(&[("A", 12, 1), ("B", 1, 1), ("A", 3, 2)]);
        assert!(swapped_dates_are_in_order(&two));
    }
}
