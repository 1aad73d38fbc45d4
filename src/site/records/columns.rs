//! Header mapping: which cell of a record file holds which quantity.

use super::reading::ReadContext;
use crate::diag::Severity;
use crate::site::findings::{Finding, FindingKind};
use crate::site::schema::Co2Kind;
use crate::site::spans::did_you_mean;

/// Column positions of one record file.
#[derive(Clone, Debug, Default)]
pub(crate) struct Columns {
    pub(super) date: usize,
    pub(super) time: Option<usize>,
    pub(super) station: Option<usize>,
    pub(super) temp: Option<usize>,
    pub(super) sal: Option<usize>,
    pub(super) depth: Option<usize>,
    pub(super) pres: Option<usize>,
    pub(super) ta: Option<usize>,
    pub(super) dic: Option<usize>,
    pub(super) ph: Option<usize>,
    pub(super) co2: Option<usize>,
    pub(super) si: Option<usize>,
    pub(super) po4: Option<usize>,
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
    out: &mut Vec<Finding>,
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
    let unique = |i: usize, out: &mut Vec<Finding>| -> Option<usize> {
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
        out.push(
            ctx.finding(
                Severity::Error,
                FindingKind::DuplicateColumn,
                header_line,
                format!(
                    "the header of {} has `{name}` more than once (columns {})",
                    ctx.path.display(),
                    cols.join(", ")
                ),
            )
            .with_cell(Some(i))
            .with_field(format!("records[{}].columns.{key}", ctx.spec_index))
            .with_help(format!(
                "rename or remove the extra `{name}` columns so that the {key} values are in one column"
            )),
        );
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
        out.push(
            ctx.finding(
                Severity::Error,
                FindingKind::MissingColumn,
                header_line,
                format!(
                    "column `{name}` (mapped to `{key}` in the site file) is not in the header of {}",
                    ctx.path.display()
                ),
            )
            .with_field(format!("records[{}].columns.{key}", ctx.spec_index))
            .with_help(help),
        );
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
    out: &mut Vec<Finding>,
) -> Option<Columns> {
    let m = &ctx.spec.columns;
    let u = &ctx.spec.units;
    let before = out.len();
    let f = |mapped: &Option<String>, defaults: &[&str], key: &str, out: &mut Vec<Finding>| {
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
        out.push(
            ctx.finding(
                Severity::Error,
                FindingKind::MissingColumn,
                header_line,
                message,
            )
            .with_field(format!("records[{}].columns.{field}", ctx.spec_index))
            .with_help(format!("{help}; headers in the file: {header_text}")),
        );
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
