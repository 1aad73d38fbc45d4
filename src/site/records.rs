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

use std::collections::HashMap;
use std::fs::File;
use std::io::BufReader;
use std::path::Path;
use std::sync::Arc;

use chrono::{DateTime, Datelike, FixedOffset, Utc};
use rayon::prelude::*;
use serde::{Serialize, Serializer};

use super::dates::{CellError, parse_number, parse_stamp};
use super::qc::RowFinding;
use super::schema::{Co2Kind, ConcUnit, OutOfRange, PhScaleName, RecordKind, RecordSpec};
use super::spans::did_you_mean;
use crate::chem::{self, CarbonateState, Conditions, Constants, Input, MethodSet};
use crate::diag::Severity;

/// The carbonate-system quantities measured on a row, in canonical units (µmol/kg, pH total
/// scale, µatm). Stored compactly (not-measured as NaN); read them with the accessors.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Measured {
    ta: f64,
    dic: f64,
    ph_t: f64,
    pco2: f64,
    fco2: f64,
}

fn opt(v: f64) -> Option<f64> {
    (!v.is_nan()).then_some(v)
}

impl Default for Measured {
    fn default() -> Self {
        Measured {
            ta: f64::NAN,
            dic: f64::NAN,
            ph_t: f64::NAN,
            pco2: f64::NAN,
            fco2: f64::NAN,
        }
    }
}

impl Measured {
    pub fn new(
        ta: Option<f64>,
        dic: Option<f64>,
        ph_t: Option<f64>,
        pco2: Option<f64>,
        fco2: Option<f64>,
    ) -> Self {
        let n = |v: Option<f64>| v.unwrap_or(f64::NAN);
        Measured {
            ta: n(ta),
            dic: n(dic),
            ph_t: n(ph_t),
            pco2: n(pco2),
            fco2: n(fco2),
        }
    }
    /// Total alkalinity, µmol/kg.
    pub fn ta(&self) -> Option<f64> {
        opt(self.ta)
    }
    /// Dissolved inorganic carbon, µmol/kg.
    pub fn dic(&self) -> Option<f64> {
        opt(self.dic)
    }
    /// pH on the total scale.
    pub fn ph_t(&self) -> Option<f64> {
        opt(self.ph_t)
    }
    /// pCO2, µatm (measured directly or converted from xCO2).
    pub fn pco2(&self) -> Option<f64> {
        opt(self.pco2)
    }
    /// fCO2, µatm.
    pub fn fco2(&self) -> Option<f64> {
        opt(self.fco2)
    }
    /// How many distinct carbonate quantities were measured (pCO2 and fCO2 count as one).
    pub fn count(&self) -> usize {
        usize::from(self.ta().is_some())
            + usize::from(self.dic().is_some())
            + usize::from(self.ph_t().is_some())
            + usize::from(self.pco2().is_some() || self.fco2().is_some())
    }
}

impl Serialize for Measured {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Measured", 5)?;
        st.serialize_field("ta_umol_kg", &self.ta())?;
        st.serialize_field("dic_umol_kg", &self.dic())?;
        st.serialize_field("ph_t", &self.ph_t())?;
        st.serialize_field("pco2_uatm", &self.pco2())?;
        st.serialize_field("fco2_uatm", &self.fco2())?;
        st.end()
    }
}

/// The pair of quantities a sample's carbonate state was solved from, in order of preference.
/// TA+DIC is best conditioned; pH with pCO2/fCO2 is used only when nothing else is available
/// (small errors in either give large errors in TA and DIC).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Pair {
    TaDic,
    TaPh,
    TaPco2,
    TaFco2,
    DicPh,
    DicPco2,
    DicFco2,
    PhPco2,
    PhFco2,
}

impl Pair {
    pub fn label(self) -> &'static str {
        match self {
            Pair::TaDic => "TA+DIC",
            Pair::TaPh => "TA+pH",
            Pair::TaPco2 => "TA+pCO2",
            Pair::TaFco2 => "TA+fCO2",
            Pair::DicPh => "DIC+pH",
            Pair::DicPco2 => "DIC+pCO2",
            Pair::DicFco2 => "DIC+fCO2",
            Pair::PhPco2 => "pH+pCO2",
            Pair::PhFco2 => "pH+fCO2",
        }
    }
}

/// One row of a record file after conversion, QC and solving.
#[derive(Clone, Debug, Serialize)]
pub struct Sample {
    #[serde(serialize_with = "ser_path")]
    pub source_file: Arc<Path>,
    /// 1-based line in the source file (the header is line 1).
    pub line: usize,
    #[serde(serialize_with = "ser_str")]
    pub station: Arc<str>,
    #[serde(serialize_with = "ser_time")]
    pub time: DateTime<FixedOffset>,
    /// Whether the record gave a time of day (sub-daily series); date-only rows are at 00:00.
    pub has_time: bool,
    /// Index into the site's seasons (`LoadedSite::seasons`).
    pub season: usize,
    pub kind: RecordKind,
    pub temp_c: f64,
    pub salinity: f64,
    pub pressure_dbar: f64,
    /// µmol/kg (0 when not measured).
    pub silicate: f64,
    /// µmol/kg (0 when not measured).
    pub phosphate: f64,
    pub measured: Measured,
    /// The pair the state was solved from.
    pub pair: Option<Pair>,
    /// True when TA was not measured on this row but estimated from the site's TA–salinity
    /// relationship (then `pair` is TA+pH, TA+pCO2 or TA+fCO2 with the estimated TA).
    pub ta_estimated: bool,
    pub state: Option<CarbonateState>,
    /// QC notes on this row that did not stop it from being used.
    pub flags: RowFlags,
}

/// QC notes on a kept row, as a compact bit set (a million-row series stays small).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct RowFlags(u8);

impl RowFlags {
    /// TA was estimated at a salinity outside the range of the bottle samples it was fitted to.
    pub const TA_FIT_EXTRAPOLATED: RowFlags = RowFlags(1);
    /// Solved from pH with pCO2 or fCO2, a poorly conditioned pair.
    pub const PH_CO2_PAIR: RowFlags = RowFlags(2);
    /// Measured and calculated values disagree beyond the documented tolerance.
    pub const INCONSISTENT: RowFlags = RowFlags(4);

    const LABELS: [(RowFlags, &'static str); 3] = [
        (
            Self::TA_FIT_EXTRAPOLATED,
            "salinity outside the TA–salinity fit range",
        ),
        (
            Self::PH_CO2_PAIR,
            "solved from pH with pCO2/fCO2 (poorly conditioned)",
        ),
        (Self::INCONSISTENT, "internally inconsistent"),
    ];

    pub fn contains(self, f: RowFlags) -> bool {
        self.0 & f.0 == f.0
    }
    pub fn insert(&mut self, f: RowFlags) {
        self.0 |= f.0;
    }
    pub fn is_empty(self) -> bool {
        self.0 == 0
    }
    /// Human-readable labels of the flags set.
    pub fn labels(self) -> Vec<&'static str> {
        Self::LABELS
            .iter()
            .filter(|(f, _)| self.contains(*f))
            .map(|(_, l)| *l)
            .collect()
    }
}

impl Serialize for RowFlags {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(self.labels())
    }
}

fn ser_path<S: Serializer>(p: &Arc<Path>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&p.display().to_string())
}
/// RFC 3339 text for a timestamp in JSON output.
pub fn ser_time<S: Serializer>(t: &DateTime<FixedOffset>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&t.to_rfc3339())
}
/// RFC 3339 text for an optional timestamp in JSON output.
pub fn ser_opt_time<S: Serializer>(
    t: &Option<DateTime<FixedOffset>>,
    s: S,
) -> Result<S::Ok, S::Error> {
    match t {
        Some(t) => s.serialize_str(&t.to_rfc3339()),
        None => s.serialize_none(),
    }
}
fn ser_str<S: Serializer>(p: &Arc<str>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(p)
}

/// Physical limits applied to every row before solving, beyond the chemistry module's own
/// limits. Chosen to cover any surface ocean or reef lagoon water (common practice):
/// temperature −2…40 °C (seawater freezes near −1.9 °C; reef flats rarely exceed 38 °C);
/// practical salinity 0…45 (hypersaline lagoons reach the low 40s); depth and pressure
/// 0…1000 m / dbar.
pub const TEMP_RANGE_C: (f64, f64) = (-2.0, 40.0);
pub const SALINITY_RANGE: (f64, f64) = (0.0, 45.0);
pub const DEPTH_RANGE_M: (f64, f64) = (0.0, 1000.0);

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

/// Column positions of one record file.
#[derive(Clone, Debug, Default)]
pub(crate) struct Columns {
    date: usize,
    time: Option<usize>,
    station: Option<usize>,
    temp: Option<usize>,
    sal: Option<usize>,
    depth: Option<usize>,
    pres: Option<usize>,
    ta: Option<usize>,
    dic: Option<usize>,
    ph: Option<usize>,
    co2: Option<usize>,
    si: Option<usize>,
    po4: Option<usize>,
    pub co2_kind: Co2Kind,
    pub headers: Vec<String>,
}

impl Columns {
    /// Index of the cell holding `key` (a quantity as named in row findings), if any.
    pub(crate) fn index_of(&self, key: &str) -> Option<usize> {
        match key {
            "date" => Some(self.date),
            "temp_c" => self.temp,
            "salinity" => self.sal,
            "depth_m" => self.depth,
            "pressure_dbar" => self.pres,
            "ta" => self.ta,
            "dic" => self.dic,
            "ph" | "ph_t" => self.ph,
            "co2" | "pco2" | "fco2" | "xco2" => self.co2,
            "silicate" => self.si,
            "phosphate" => self.po4,
            _ => None,
        }
    }
    pub fn has_ta(&self) -> bool {
        self.ta.is_some()
    }
    pub fn carbonate_columns(&self) -> usize {
        [self.ta, self.dic, self.ph, self.co2]
            .iter()
            .filter(|c| c.is_some())
            .count()
    }
}

/// Finds the header for canonical `key`: the mapped name (error if absent), else the
/// canonical names in `defaults` (exact, then case-insensitive).
fn find_column(
    headers: &[String],
    mapped: Option<&str>,
    defaults: &[&str],
    key: &str,
    ctx: &ReadContext<'_>,
    header_line: usize,
    out: &mut Vec<RowFinding>,
) -> Option<usize> {
    let exact = |name: &str| headers.iter().position(|h| h == name);
    let loose = |name: &str| {
        let mut it = headers
            .iter()
            .enumerate()
            .filter(|(_, h)| h.eq_ignore_ascii_case(name));
        match (it.next(), it.next()) {
            (Some((i, _)), None) => Some(i),
            _ => None,
        }
    };
    // The same header twice leaves it open which column holds the values: an error.
    let unique = |i: usize, out: &mut Vec<RowFinding>| -> Option<usize> {
        let name = headers.get(i)?;
        let cols: Vec<String> = headers
            .iter()
            .enumerate()
            .filter(|(_, h)| *h == name)
            .map(|(j, _)| (j + 1).to_string())
            .collect();
        if cols.len() < 2 {
            return Some(i);
        }
        out.push(RowFinding {
            kind: "duplicate-column",
            severity: Severity::Error,
            file: ctx.file_index,
            line: header_line,
            column: Some(i),
            field: Some(format!("records[{}].columns.{key}", ctx.spec_index)),
            message: format!(
                "the header of {} has `{name}` more than once (columns {})",
                ctx.path.display(),
                cols.join(", ")
            ),
            help: Some(format!(
                "rename or remove the extra `{name}` columns so that the {key} values are in one column"
            )),
        });
        None
    };
    if let Some(name) = mapped {
        let name = name.trim();
        if let Some(i) = exact(name).or_else(|| loose(name)) {
            return unique(i, out);
        }
        let list = headers
            .iter()
            .map(|h| format!("`{h}`"))
            .collect::<Vec<_>>()
            .join(", ");
        let help = match did_you_mean(name, headers.iter().map(String::as_str)) {
            Some(s) => format!("did you mean `{s}`? headers in the file: {list}"),
            None => format!("headers in the file: {list}"),
        };
        out.push(RowFinding {
            kind: "missing-column",
            severity: Severity::Error,
            file: ctx.file_index,
            line: header_line,
            column: None,
            field: Some(format!("records[{}].columns.{key}", ctx.spec_index)),
            message: format!(
                "column `{name}` (mapped to `{key}` in the site file) is not in the header of {}",
                ctx.path.display()
            ),
            help: Some(help),
        });
        return None;
    }
    let i = defaults
        .iter()
        .find_map(|d| exact(d))
        .or_else(|| defaults.iter().find_map(|d| loose(d)))?;
    unique(i, out)
}

pub(crate) fn resolve_columns(
    headers: Vec<String>,
    ctx: &ReadContext<'_>,
    header_line: usize,
    out: &mut Vec<RowFinding>,
) -> Option<Columns> {
    let m = &ctx.spec.columns;
    let u = &ctx.spec.units;
    let before = out.len();
    let f = |mapped: &Option<String>, defaults: &[&str], key: &str, out: &mut Vec<RowFinding>| {
        find_column(
            &headers,
            mapped.as_deref(),
            defaults,
            key,
            ctx,
            header_line,
            out,
        )
    };
    let date = f(&m.date, &["date", "datetime", "time_utc"], "date", out);
    let time = f(&m.time, &["time"], "time", out);
    let station = f(&m.station, &["station"], "station", out);
    let temp = f(&m.temp_c, &["temp_c"], "temp_c", out);
    let sal = f(&m.salinity, &["salinity"], "salinity", out);
    let depth = f(&m.depth_m, &["depth_m"], "depth_m", out);
    let pres = f(&m.pressure_dbar, &["pressure_dbar"], "pressure_dbar", out);
    let ta = f(&m.ta, &["ta"], "ta", out);
    let dic = f(&m.dic, &["dic"], "dic", out);
    let ph = f(&m.ph, &["ph_t", "ph"], "ph", out);
    let si = f(&m.silicate, &["silicate"], "silicate", out);
    let po4 = f(&m.phosphate, &["phosphate"], "phosphate", out);
    // CO2: the unit decides the default header; without a unit, the first of pco2/fco2/xco2
    // present decides the unit.
    let (co2, co2_kind) = match (u.co2, &m.co2) {
        (Some(k), mapped) => {
            let d = match k {
                Co2Kind::Pco2Uatm => "pco2",
                Co2Kind::Fco2Uatm => "fco2",
                Co2Kind::Xco2Ppm => "xco2",
            };
            (f(mapped, &[d], "co2", out), k)
        }
        (None, Some(_)) => (f(&m.co2, &[], "co2", out), Co2Kind::Pco2Uatm),
        (None, None) => {
            let mut found = (None, Co2Kind::Pco2Uatm);
            for (name, k) in [
                ("pco2", Co2Kind::Pco2Uatm),
                ("fco2", Co2Kind::Fco2Uatm),
                ("xco2", Co2Kind::Xco2Ppm),
            ] {
                if let Some(i) = f(&None, &[name], "co2", out) {
                    found = (Some(i), k);
                    break;
                }
            }
            found
        }
    };
    if out.len() > before {
        return None;
    }
    let header_text = headers.join(",");
    let mut file_error = |field: &str, message: String, help: &str| {
        out.push(RowFinding {
            kind: "missing-column",
            severity: Severity::Error,
            file: ctx.file_index,
            line: header_line,
            column: None,
            field: Some(format!("records[{}].columns.{field}", ctx.spec_index)),
            message,
            help: Some(format!("{help}; headers in the file: {header_text}")),
        });
    };
    let Some(date) = date else {
        file_error(
            "date",
            format!("{} has no date column", ctx.path.display()),
            "name the date column `date` or map it with [records.columns] date = \"...\"",
        );
        return None;
    };
    if temp.is_none() {
        file_error(
            "temp_c",
            format!("{} has no temperature column", ctx.path.display()),
            "name it `temp_c` (°C) or map it with [records.columns] temp_c = \"...\"",
        );
    }
    if sal.is_none() && ctx.spec.salinity.is_none() {
        file_error(
            "salinity",
            format!("{} has no salinity column", ctx.path.display()),
            "name it `salinity` or map it with [records.columns] salinity = \"...\", or give a constant `salinity = ...` in the [[records]] table",
        );
    }
    if [ta, dic, ph, co2].iter().all(Option::is_none) {
        file_error(
            "ta",
            format!(
                "{} has none of the carbonate columns ta, dic, ph, pco2/fco2/xco2",
                ctx.path.display()
            ),
            "map at least one carbonate quantity in [records.columns]",
        );
    }
    if out.len() > before {
        return None;
    }
    Some(Columns {
        date,
        time,
        station,
        temp,
        sal,
        depth,
        pres,
        ta,
        dic,
        ph,
        co2,
        si,
        po4,
        co2_kind,
        headers,
    })
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

/// Reads one record file into `out` (values still in the file's units; see [`convert_units`]).
/// Returns the columns found, or `None` when the file could not be read at all.
pub(crate) fn read_record(
    ctx: &ReadContext<'_>,
    stations: &mut Stations,
    out: &mut Vec<Sample>,
    findings: &mut Vec<RowFinding>,
) -> Option<Columns> {
    let file_err = |message: String, help: &str| RowFinding {
        kind: "unreadable",
        severity: Severity::Error,
        file: ctx.file_index,
        line: 0,
        column: None,
        field: Some(format!("records[{}].path", ctx.spec_index)),
        message,
        help: Some(help.to_string()),
    };
    let file = match File::open(&ctx.path) {
        Ok(f) => f,
        Err(e) => {
            findings.push(file_err(
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
            findings.push(file_err(
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
        findings.push(file_err(
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
        findings.push(RowFinding {
            line: header_line,
            ..file_err(
                format!("{} looks semicolon-separated", ctx.path.display()),
                "record files must be comma-separated (CSV); export the file again with commas",
            )
        });
        return None;
    }
    if rdr.is_done() && header_names.iter().all(|h| h.is_empty()) {
        findings.push(file_err(
            format!("{} is empty", ctx.path.display()),
            "the first line must be a comma-separated header",
        ));
        return None;
    }
    let cols = resolve_columns(header_names, ctx, header_line, findings)?;
    let ncols = cols.headers.len();
    let spec = ctx.spec;
    let missing = &spec.missing;
    let drop_out_of_range = spec.on_out_of_range == OutOfRange::Drop;
    let station_fixed = spec.station.as_deref().map(|s| stations.get(s));
    let mut last_time: HashMap<Arc<str>, (DateTime<FixedOffset>, usize)> = HashMap::new();
    let mut last_station: Option<Arc<str>> = None;
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
                findings.push(RowFinding {
                    line,
                    ..file_err(format!("CSV error: {e}"), "check the quoting on this line")
                });
                break;
            }
        }
        let line = usize::try_from(rec.position().map_or(0, |p| p.line())).unwrap_or(0);
        if rec.iter().all(|c| c.iter().all(u8::is_ascii_whitespace)) {
            continue; // a row of empty cells
        }
        let mut row_err =
            |col: Option<usize>, key: &str, e: CellError, sev: Severity, kind: &'static str| {
                findings.push(RowFinding {
                    kind,
                    severity: sev,
                    file: ctx.file_index,
                    line,
                    column: col,
                    field: Some(col.and_then(|c| cols.headers.get(c)).map_or(
                        key.to_string(),
                        |h| {
                            if h == key {
                                h.clone()
                            } else {
                                format!("{h} ({key})")
                            }
                        },
                    )),
                    message: e.message,
                    help: Some(e.help),
                });
            };
        if rec.len() != ncols {
            row_err(
                None,
                "row",
                CellError {
                    message: format!("the row has {} cells but the header has {ncols}", rec.len()),
                    // A quoted cell running over line ends is almost always a missing quote.
                    help: if rec.iter().any(|c| c.contains(&b'\n')) {
                        format!(
                            "a quoted cell starting on line {line} runs over several lines: check for a missing closing quote (\")"
                        )
                    } else {
                        "every row must have as many comma-separated cells as the header"
                            .to_string()
                    },
                },
                Severity::Error,
                "cell-count",
            );
            continue;
        }
        let cell = |i: usize| -> Result<&str, CellError> {
            std::str::from_utf8(rec.get(i).unwrap_or(b"")).map_err(|_| CellError {
                message: "the cell is not valid UTF-8 text".to_string(),
                help: "save the file as UTF-8".to_string(),
            })
        };
        let mut ok = true;
        let mut num = |i: Option<usize>, key: &str| -> Option<f64> {
            let i = i?;
            match cell(i).and_then(|s| parse_number(s, missing)) {
                Ok(v) => v,
                Err(e) => {
                    row_err(Some(i), key, e, Severity::Error, "non-numeric");
                    ok = false;
                    None
                }
            }
        };
        let temp = num(cols.temp, "temp_c");
        let sal = match cols.sal {
            Some(_) => num(cols.sal, "salinity"),
            None => spec.salinity,
        };
        let depth = num(cols.depth, "depth_m");
        let pres = num(cols.pres, "pressure_dbar");
        let ta = num(cols.ta, "ta");
        let dic = num(cols.dic, "dic");
        let ph = num(cols.ph, "ph");
        let co2 = num(cols.co2, "co2");
        let si = num(cols.si, "silicate");
        let po4 = num(cols.po4, "phosphate");

        let stamp = cell(cols.date).and_then(|d| {
            let t = match cols.time {
                Some(i) => Some(cell(i)?),
                None => None,
            };
            parse_stamp(d, t, spec.date_format, ctx.utc_offset)
        });
        let stamp = match stamp {
            Ok(s) => Some(s),
            Err(e) => {
                row_err(Some(cols.date), "date", e, Severity::Error, "bad-date");
                None
            }
        };
        let (Some(stamp), true) = (stamp, ok) else {
            continue;
        };
        if stamp.time.with_timezone(&Utc) > ctx.now {
            row_err(
                Some(cols.date),
                "date",
                CellError {
                    message: format!("{} is in the future", stamp.time.to_rfc3339()),
                    help: "check the year and the date format (day-first / month-first) of this record".to_string(),
                },
                Severity::Error,
                "future-date",
            );
            continue;
        }

        let station = match (&station_fixed, cols.station) {
            (Some(s), _) => s.clone(),
            (None, Some(i)) => match cell(i) {
                Err(e) => {
                    row_err(Some(i), "station", e, Severity::Error, "non-utf8");
                    continue;
                }
                Ok(s) if !s.trim().is_empty() => {
                    let s = s.trim();
                    match &last_station {
                        Some(prev) if &**prev == s => prev.clone(),
                        _ => {
                            let a = stations.get(s);
                            last_station = Some(a.clone());
                            a
                        }
                    }
                }
                _ => ctx.default_station.clone(),
            },
            (None, None) => ctx.default_station.clone(),
        };

        // Physical limits on T, S and depth/pressure.
        let mut out_of_range = false;
        let mut limit = |col: Option<usize>,
                         key: &str,
                         v: Option<f64>,
                         (lo, hi): (f64, f64),
                         unit: &str| {
            if let Some(v) = v {
                let chem_msg = chem::limits::check(key, v).err();
                if v < lo || v > hi || chem_msg.is_some() {
                    let (sev, action) = if drop_out_of_range {
                        (Severity::Warning, "row dropped")
                    } else {
                        (
                            Severity::Error,
                            "set on_out_of_range = \"drop\" for the record to drop such rows instead",
                        )
                    };
                    // The record limits are the narrower ones: say the same range as the help.
                    let message = if v < lo || v > hi {
                        format!("{key} = {v}{unit} is outside the valid range {lo} to {hi}{unit}")
                    } else {
                        chem_msg.unwrap_or_default()
                    };
                    row_err(
                        col,
                        key,
                        CellError {
                            message: if drop_out_of_range {
                                format!("{message}; row dropped")
                            } else {
                                message
                            },
                            help: format!("valid {key}: {lo} to {hi}{unit}; {action}"),
                        },
                        sev,
                        "out-of-range",
                    );
                    out_of_range = true;
                }
            }
        };
        limit(cols.temp, "temp_c", temp, TEMP_RANGE_C, " °C");
        limit(cols.sal, "salinity", sal, SALINITY_RANGE, "");
        limit(cols.depth, "depth_m", depth, DEPTH_RANGE_M, " m");
        limit(cols.pres, "pressure_dbar", pres, DEPTH_RANGE_M, " dbar");
        if out_of_range {
            continue;
        }
        let (Some(temp_c), Some(salinity)) = (temp, sal) else {
            let which = if temp.is_none() {
                "temperature"
            } else {
                "salinity"
            };
            findings.push(RowFinding {
                kind: "missing-ts",
                severity: Severity::Warning,
                file: ctx.file_index,
                line,
                column: if temp.is_none() { cols.temp } else { cols.sal },
                field: Some(which.to_string()),
                message: format!("the row has no {which}; row dropped"),
                help: Some(
                    "temperature and salinity are needed to solve the carbonate system".to_string(),
                ),
            });
            continue;
        };
        let pressure_dbar = pres.or(depth).unwrap_or(ctx.default_pressure_dbar);

        // Dates out of order within a station (warning, row kept).
        if let Some((prev, prev_line)) = last_time.get(&station)
            && stamp.time < *prev
        {
            findings.push(RowFinding {
                    kind: "out-of-order",
                    severity: Severity::Warning,
                    file: ctx.file_index,
                    line,
                    column: Some(cols.date),
                    field: Some("date".to_string()),
                    message: format!(
                        "{} is earlier than the previous row of station `{station}` (line {prev_line}); row kept",
                        stamp.time.to_rfc3339()
                    ),
                    help: Some("rows need not be sorted, but out-of-order dates often mean a wrong date format".to_string()),
                });
        }
        last_time.insert(station.clone(), (stamp.time, line));

        let local = stamp.time.with_timezone(&ctx.utc_offset);
        let month0 = local.month0() as usize;
        let season = ctx.season_of_month.get(month0).copied().unwrap_or(0);
        let (pco2, fco2) = match cols.co2_kind {
            Co2Kind::Fco2Uatm => (None, co2),
            _ => (co2, None), // xCO2 is held in the pCO2 slot until converted
        };
        out.push(Sample {
            source_file: ctx.path.clone(),
            line,
            station,
            time: stamp.time,
            has_time: stamp.has_time,
            season,
            kind: spec.kind,
            temp_c,
            salinity,
            pressure_dbar,
            silicate: si.unwrap_or(0.0),
            phosphate: po4.unwrap_or(0.0),
            measured: Measured::new(ta, dic, ph, pco2, fco2),
            pair: None,
            ta_estimated: false,
            state: None,
            flags: RowFlags::default(),
        });
    }
    if out.len() == start_len
        && !findings
            .iter()
            .any(|f| f.file == ctx.file_index && f.severity == Severity::Error)
    {
        findings.push(RowFinding {
            line: header_line,
            ..file_err(
                format!("{} has no data rows", ctx.path.display()),
                "add one row per sample below the header",
            )
        });
    }
    Some(cols)
}

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
) -> Vec<RowFinding> {
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

fn limit_finding(s: &Sample, file: usize, key: &str, msg: String, drop: bool) -> RowFinding {
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
    RowFinding {
        kind: "out-of-range",
        severity,
        file,
        line: s.line,
        column: None,
        field: Some(key.to_string()),
        message,
        help: Some(help),
    }
}

/// TA estimated from salinity, used for rows without a TA measurement.
#[derive(Clone, Copy, Debug)]
pub(crate) struct TaModel {
    pub intercept: f64,
    pub slope: f64,
    pub s_min: f64,
    pub s_max: f64,
}

/// Chooses the pair to solve from, in the documented order of preference.
pub(crate) fn choose_pair(m: &Measured, ta_est: Option<f64>) -> Option<(Pair, Input, Input, bool)> {
    use Input as I;
    let (ta, dic, ph, pco2, fco2) = (m.ta(), m.dic(), m.ph_t(), m.pco2(), m.fco2());
    let measured = [
        (Pair::TaDic, ta.map(I::Ta), dic.map(I::Dic)),
        (Pair::TaPh, ta.map(I::Ta), ph.map(I::PhT)),
        (Pair::TaPco2, ta.map(I::Ta), pco2.map(I::Pco2)),
        (Pair::TaFco2, ta.map(I::Ta), fco2.map(I::Fco2)),
        (Pair::DicPh, dic.map(I::Dic), ph.map(I::PhT)),
        (Pair::DicPco2, dic.map(I::Dic), pco2.map(I::Pco2)),
        (Pair::DicFco2, dic.map(I::Dic), fco2.map(I::Fco2)),
    ];
    for (p, a, b) in measured {
        if let (Some(a), Some(b)) = (a, b) {
            return Some((p, a, b, false));
        }
    }
    if ta.is_none()
        && let Some(t) = ta_est
    {
        for (p, b) in [
            (Pair::TaPh, ph.map(I::PhT)),
            (Pair::TaPco2, pco2.map(I::Pco2)),
            (Pair::TaFco2, fco2.map(I::Fco2)),
        ] {
            if let Some(b) = b {
                return Some((p, I::Ta(t), b, true));
            }
        }
    }
    for (p, a, b) in [
        (Pair::PhPco2, ph.map(I::PhT), pco2.map(I::Pco2)),
        (Pair::PhFco2, ph.map(I::PhT), fco2.map(I::Fco2)),
    ] {
        if let (Some(a), Some(b)) = (a, b) {
            return Some((p, a, b, false));
        }
    }
    None
}

/// Internal-consistency tolerances (measured − calculated) for rows with three or more
/// measured carbonate quantities, defined with their basis in `chem::measured`.
pub use crate::chem::measured::{TOL_CO2_FRACTION, TOL_PH, TOL_TA_DIC_UMOL_KG};

fn ph_scale(s: PhScaleName) -> chem::scales::PhScale {
    use chem::scales::PhScale;
    match s {
        PhScaleName::Total => PhScale::Total,
        PhScaleName::Sws => PhScale::Seawater,
        PhScaleName::Free => PhScale::Free,
        PhScaleName::Nbs => PhScale::Nbs,
    }
}

/// Converts pH to the total scale, checks the pH limit, chooses the pair, solves, and checks
/// internal consistency. Rows marked in `drop` are skipped.
pub(crate) fn solve_samples(
    samples: &mut [Sample],
    drop: &mut [bool],
    units: FileUnits,
    methods: &MethodSet,
    ta_model: Option<TaModel>,
    file_index: usize,
) -> Vec<RowFinding> {
    samples
        .par_iter_mut()
        .zip(drop.par_iter_mut())
        .filter_map(|(s, dropped)| {
            if *dropped {
                return None;
            }
            let found = solve_one(s, dropped, units, methods, ta_model, file_index);
            (!found.is_empty()).then_some(found)
        })
        .flatten()
        .collect()
}

fn solve_one(
    s: &mut Sample,
    dropped: &mut bool,
    units: FileUnits,
    methods: &MethodSet,
    ta_model: Option<TaModel>,
    file: usize,
) -> Vec<RowFinding> {
    let mut found = Vec::new();
    let cond = Conditions {
        temp_c: s.temp_c,
        salinity: s.salinity,
        pressure_dbar: s.pressure_dbar,
        silicate: s.silicate,
        phosphate: s.phosphate,
    };
    let k = Constants::new(&cond, methods);
    if let Some(ph) = s.measured.ph_t() {
        let ph_t = if units.ph == PhScaleName::Total {
            ph
        } else {
            chem::scales::to_total(ph, ph_scale(units.ph), &k)
        };
        let m = s.measured;
        s.measured = Measured::new(m.ta(), m.dic(), Some(ph_t), m.pco2(), m.fco2());
        if let Err(msg) = chem::limits::check("ph_t", ph_t) {
            found.push(limit_finding(s, file, "ph", msg, units.drop_out_of_range));
            if units.drop_out_of_range {
                *dropped = true;
            }
            return found;
        }
    }
    let warn = |kind: &'static str, field: Option<&str>, message: String, help: &str| RowFinding {
        kind,
        severity: Severity::Warning,
        file,
        line: s.line,
        column: None,
        field: field.map(str::to_string),
        message,
        help: Some(help.to_string()),
    };
    let ta_est = ta_model.map(|m| m.intercept + m.slope * s.salinity);
    let Some((pair, a, b, estimated)) = choose_pair(&s.measured, ta_est) else {
        let help = if s.measured.count() == 1 && s.measured.ta().is_none() {
            "a second carbonate quantity is needed; for sensor series, bottle samples with TA and salinity let the TA–salinity relationship supply TA"
        } else {
            "two of TA, DIC, pH, pCO2/fCO2 are needed (pCO2 with fCO2 is not a pair)"
        };
        found.push(warn(
            "no-pair",
            None,
            "the row has no solvable pair of carbonate quantities; row kept for temperature and salinity only".to_string(),
            help,
        ));
        return found;
    };
    if estimated
        && let Some(m) = ta_model
        && (s.salinity < m.s_min || s.salinity > m.s_max)
    {
        s.flags.insert(RowFlags::TA_FIT_EXTRAPOLATED);
        found.push(warn(
                    "ta-fit-range",
                    Some("salinity"),
                    format!(
                        "salinity {} is outside the range of the bottle samples used for the TA–salinity relationship ({:.2}–{:.2}); the estimated TA is an extrapolation; row kept",
                        s.salinity, m.s_min, m.s_max
                    ),
                    "add bottle TA samples that cover this salinity",
                ));
    }
    if matches!(pair, Pair::PhPco2 | Pair::PhFco2) {
        s.flags.insert(RowFlags::PH_CO2_PAIR);
    }
    for w in methods.range_warnings(&cond) {
        found.push(warn("method-range", None, format!("{w}; row kept"), "results outside a constant set's fitted range are less certain; consider another [chemistry] k1k2 set"));
    }
    match chem::solve_pair(a, b, &k) {
        Ok(st) => {
            s.pair = Some(pair);
            s.ta_estimated = estimated;
            if s.measured.count() >= 3 {
                consistency(s, &st, pair, &mut found, file);
            }
            s.state = Some(st);
        }
        Err(e) => {
            found.push(warn(
                "solve-failed",
                None,
                format!("the carbonate system could not be solved from {}: {e}; row kept without a carbonate state", pair.label()),
                "check the measured values and their units",
            ));
        }
    }
    found
}

fn consistency(
    s: &mut Sample,
    st: &CarbonateState,
    pair: Pair,
    found: &mut Vec<RowFinding>,
    file: usize,
) {
    let m = s.measured;
    let in_pair = |q: &str| match pair {
        Pair::TaDic => q == "ta" || q == "dic",
        Pair::TaPh => q == "ta" || q == "ph",
        Pair::TaPco2 | Pair::TaFco2 => q == "ta" || q == "co2",
        Pair::DicPh => q == "dic" || q == "ph",
        Pair::DicPco2 | Pair::DicFco2 => q == "dic" || q == "co2",
        Pair::PhPco2 | Pair::PhFco2 => q == "ph" || q == "co2",
    };
    let mut misfits = Vec::new();
    if let (Some(v), false) = (m.ta(), in_pair("ta"))
        && (v - st.ta).abs() > TOL_TA_DIC_UMOL_KG
    {
        misfits.push(format!(
            "TA measured {v:.1} vs calculated {:.1} µmol/kg (tolerance {TOL_TA_DIC_UMOL_KG})",
            st.ta
        ));
    }
    if let (Some(v), false) = (m.dic(), in_pair("dic"))
        && (v - st.dic).abs() > TOL_TA_DIC_UMOL_KG
    {
        misfits.push(format!(
            "DIC measured {v:.1} vs calculated {:.1} µmol/kg (tolerance {TOL_TA_DIC_UMOL_KG})",
            st.dic
        ));
    }
    if let (Some(v), false) = (m.ph_t(), in_pair("ph"))
        && (v - st.ph_t).abs() > TOL_PH
    {
        misfits.push(format!(
            "pH_T measured {v:.3} vs calculated {:.3} (tolerance {TOL_PH})",
            st.ph_t
        ));
    }
    for (name, v, c) in [("pCO2", m.pco2(), st.pco2), ("fCO2", m.fco2(), st.fco2)] {
        let Some(v) = v else { continue };
        let used = match pair {
            Pair::TaPco2 | Pair::DicPco2 | Pair::PhPco2 => name == "pCO2",
            Pair::TaFco2 | Pair::DicFco2 | Pair::PhFco2 => name == "fCO2",
            _ => false,
        };
        if !used && c > 0.0 && ((v - c) / c).abs() > TOL_CO2_FRACTION {
            misfits.push(format!(
                "{name} measured {v:.1} vs calculated {c:.1} µatm (tolerance {:.0} %)",
                TOL_CO2_FRACTION * 100.0
            ));
        }
    }
    if !misfits.is_empty() {
        s.flags.insert(RowFlags::INCONSISTENT);
        found.push(RowFinding {
            kind: "inconsistent",
            severity: Severity::Warning,
            file,
            line: s.line,
            column: None,
            field: None,
            message: format!(
                "measured and calculated values disagree (solved from {}): {}; row kept",
                pair.label(),
                misfits.join("; ")
            ),
            help: Some("check calibration, units and pH scale of this row; the state uses the preferred pair".to_string()),
        });
    }
}

/// Shared helper for the QC module: lines of dropped rows are reported there.
pub(crate) fn retain_kept(samples: &mut Vec<Sample>, drop: &[bool]) {
    let mut i = 0;
    samples.retain(|_| {
        let keep = !drop.get(i).copied().unwrap_or(false);
        i += 1;
        keep
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn sample(temp_c: f64, salinity: f64, pressure_dbar: f64, m: Measured) -> Sample {
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

    fn units(ta: ConcUnit, co2: Co2Kind, ph: PhScaleName) -> FileUnits {
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

    fn csv_rows(path: &str) -> Vec<HashMap<String, f64>> {
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

    /// The documented order of preference, including TA estimated from salinity ahead of the
    /// poorly conditioned pH + pCO2 pair.
    #[test]
    fn pair_preference() {
        let m = Measured::new(Some(2300.0), Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(choose_pair(&m, None).map(|p| p.0), Some(Pair::TaDic));
        let m = Measured::new(None, Some(2000.0), Some(8.0), Some(400.0), None);
        assert_eq!(
            choose_pair(&m, Some(2300.0)).map(|p| (p.0, p.3)),
            Some((Pair::DicPh, false))
        );
        let m = Measured::new(None, None, Some(8.0), Some(400.0), None);
        assert_eq!(
            choose_pair(&m, Some(2300.0)).map(|p| (p.0, p.3)),
            Some((Pair::TaPh, true))
        );
        assert_eq!(choose_pair(&m, None).map(|p| p.0), Some(Pair::PhPco2));
        let m = Measured::new(None, None, None, Some(400.0), Some(398.0));
        assert!(choose_pair(&m, None).is_none());
        assert_eq!(m.count(), 1);
    }

    /// pH on the seawater scale, converted and solved with TA, reproduces the state solved
    /// from the total-scale pH directly; a third measured quantity off by more than the
    /// tolerance is reported (TA 2300, DIC 2000, 25 °C, S 35: pH_T 8.040225, fact sheet §7g, C).
    #[test]
    fn scale_conversion_and_consistency_check() {
        let methods = MethodSet::default();
        let cond = Conditions {
            temp_c: 25.0,
            salinity: 35.0,
            pressure_dbar: 0.0,
            silicate: 0.0,
            phosphate: 0.0,
        };
        let k = Constants::new(&cond, &methods);
        let ph_sws = chem::scales::from_total(8.040225, chem::scales::PhScale::Seawater, &k);
        let mut s = vec![sample(
            25.0,
            35.0,
            0.0,
            Measured::new(Some(2300.0), None, Some(ph_sws), None, None),
        )];
        let mut drop = vec![false];
        let f = solve_samples(
            &mut s,
            &mut drop,
            units(ConcUnit::UmolPerKg, Co2Kind::Pco2Uatm, PhScaleName::Sws),
            &methods,
            None,
            0,
        );
        assert!(f.is_empty(), "{f:?}");
        let st = s[0].state.unwrap_or_else(|| panic!("not solved"));
        assert!((st.dic - 2000.0).abs() < 0.05, "{st:?}");
        assert!((s[0].measured.ph_t().unwrap_or(0.0) - 8.040225).abs() < 1e-9);

        // Third quantity consistent: no finding. Off by 30 µmol/kg: one warning, row kept.
        for (dic, n) in [(2001.0, 0), (2030.0, 1)] {
            let mut s = vec![sample(
                25.0,
                35.0,
                0.0,
                Measured::new(Some(2300.0), Some(dic), Some(8.040225), None, None),
            )];
            let mut drop = vec![false];
            let f = solve_samples(
                &mut s,
                &mut drop,
                units(ConcUnit::UmolPerKg, Co2Kind::Pco2Uatm, PhScaleName::Total),
                &methods,
                None,
                0,
            );
            assert_eq!(
                f.iter().filter(|x| x.kind == "inconsistent").count(),
                n,
                "{f:?}"
            );
            assert!(s[0].state.is_some() && !drop[0]);
        }
    }
}
