//! The chemistry appendix: every sample of a site, one listing per record file.

use serde_json::{Value, json};

use crate::report::fmt;
use crate::report::model::{SampleRow, SiteReport};

/// The appendix listings of a site: one group per record file (in the order the files first
/// appear), rows in file order.
pub(super) fn sample_files(site: &SiteReport) -> Vec<Value> {
    let mut groups: Vec<(&str, Vec<&SampleRow>)> = Vec::new();
    for s in &site.samples {
        match groups.iter_mut().find(|(file, _)| *file == s.file) {
            Some((_, rows)) => rows.push(s),
            None => groups.push((s.file.as_str(), vec![s])),
        }
    }
    groups
        .into_iter()
        .map(|(file, mut rows)| {
            rows.sort_by_key(|r| r.row);
            sample_group(file, &rows)
        })
        .collect()
}

/// Short names of the measured parameters of a sample ("TA DIC", "pH pCO2").
fn measured_text(s: &SampleRow) -> String {
    s.measured
        .iter()
        .map(|m| match m.as_str() {
            "ta" => "TA",
            "dic" => "DIC",
            "ph_t" => "pH",
            "pco2" => "pCO2",
            "fco2" => "fCO2",
            other => other,
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// The cells of one appendix row, formatted, in column order (see [`APPENDIX_COLUMNS`]).
fn sample_cells(s: &SampleRow) -> [String; 15] {
    let flags = s.flags.join("; ");
    let flags = if s.used {
        flags
    } else if flags.is_empty() {
        "NOT USED".to_string()
    } else {
        format!("NOT USED: {flags}")
    };
    [
        s.row.to_string(),
        s.date.clone(),
        s.station.clone(),
        s.season.clone(),
        fmt::temp(s.temp_c),
        fmt::salinity(s.salinity),
        fmt::pressure(s.pressure_dbar),
        fmt::opt(s.ta, 0),
        fmt::opt(s.dic, 0),
        fmt::opt(s.ph_t, 3),
        fmt::opt(s.pco2, 0),
        fmt::opt(s.omega_ar, 2),
        fmt::opt(s.omega_ca, 2),
        measured_text(s),
        flags,
    ]
}

/// Which columns hold the same text in every row of a listing of more than one row: those are
/// said once above the listing instead of repeated on every line. The line number, the date and
/// the QC flags always stay in the listing.
fn same_in_every_row(cells: &[[String; 15]]) -> [bool; 15] {
    let mut same = [false; 15];
    let Some((first, rest)) = cells.split_first() else {
        return same;
    };
    if rest.is_empty() {
        return same;
    }
    for (k, s) in same.iter_mut().enumerate().take(14).skip(2) {
        *s = rest.iter().all(|row| row[k] == first[k]);
    }
    same
}

/// Appendix columns: (heading, unit line, right-aligned).
const APPENDIX_COLUMNS: [(&str, &str, bool); 15] = [
    ("Line", "", true),
    ("Date and time", "", false),
    ("Station", "", false),
    ("Season", "", false),
    ("T", "°C", true),
    ("S", "", true),
    ("p", "dbar", true),
    ("TA", "µmol/kg", true),
    ("DIC", "µmol/kg", true),
    ("pH", "total", true),
    ("pCO2", "µatm", true),
    ("Ωar", "", true),
    ("Ωca", "", true),
    ("Measured", "", false),
    ("QC flags", "", false),
];

/// One record file's rows for the appendix: the structured rows and the same rows laid out as
/// fixed-width text (a data listing: one padded text per sample typesets quickly even for a
/// year of hourly sensor data), each as [columns up to "Measured", QC flags], with a two-line
/// header of the same shape.
fn sample_group(file: &str, rows: &[&SampleRow]) -> Value {
    let cells: Vec<[String; 15]> = rows.iter().map(|s| sample_cells(s)).collect();
    let n = APPENDIX_COLUMNS.len();
    let mut widths: Vec<usize> = APPENDIX_COLUMNS
        .iter()
        .map(|(h, u, _)| h.chars().count().max(u.chars().count()))
        .collect();
    for row in &cells {
        for (w, c) in widths.iter_mut().zip(row.iter()) {
            *w = (*w).max(c.chars().count());
        }
    }
    let same = same_in_every_row(&cells);
    // Every column but the last (the QC flags, which may wrap in their own cell) and those with
    // the same value in every row padded to a common width; returns [fixed-width part, flags].
    let line = |items: &[&str]| -> [String; 2] {
        let mut out = String::new();
        for (k, item) in items.iter().enumerate().take(n - 1) {
            if same[k] {
                continue;
            }
            let (_, _, right) = APPENDIX_COLUMNS[k];
            let pad = widths[k].saturating_sub(item.chars().count());
            if !out.is_empty() {
                out.push_str("  ");
            }
            if right {
                out.extend(std::iter::repeat_n(' ', pad));
                out.push_str(item);
            } else {
                out.push_str(item);
                out.extend(std::iter::repeat_n(' ', pad));
            }
        }
        [
            out,
            items.get(n - 1).copied().unwrap_or_default().to_string(),
        ]
    };
    let heads: Vec<&str> = APPENDIX_COLUMNS.iter().map(|(h, _, _)| *h).collect();
    let units: Vec<&str> = APPENDIX_COLUMNS.iter().map(|(_, u, _)| *u).collect();
    let lines: Vec<[String; 2]> = cells
        .iter()
        .map(|c| line(&c.iter().map(String::as_str).collect::<Vec<_>>()))
        .collect();
    let structured: Vec<Value> = rows
        .iter()
        .zip(&cells)
        .map(|(s, c)| {
            json!({
                "row": c[0], "date": c[1], "station": c[2], "season": c[3],
                "temp": c[4], "sal": c[5], "p": c[6], "ta": c[7], "dic": c[8], "ph": c[9],
                "pco2": c[10], "omega_ar": c[11], "omega_ca": c[12], "measured": c[13],
                "flags": s.flags.join("; "), "used": s.used,
            })
        })
        .collect();
    // The collapsed columns as one sentence: "Station LG1; p 2.5 dbar".
    let same_text: Vec<String> = APPENDIX_COLUMNS
        .iter()
        .zip(cells.first().into_iter().flatten())
        .zip(&same)
        .filter(|(_, same)| **same)
        .map(|(((head, unit, _), value), _)| match *unit {
            "" | "total" => format!("{head} {value}"),
            unit => format!("{head} {value} {unit}"),
        })
        .collect();
    json!({
        "file": file,
        "count": rows.len().to_string(),
        "same": same_text,
        "header": [line(&heads), line(&units)],
        "lines": lines,
        "rows": structured,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_columns_equal_in_every_row_collapse() {
        let row = |date: &str, t: &str| -> [String; 15] {
            let mut r: [String; 15] = Default::default();
            for (k, c) in r.iter_mut().enumerate() {
                *c = format!("v{k}");
            }
            r[1] = date.to_string();
            r[4] = t.to_string();
            r
        };
        let two = [row("2024-01-01", "27.0"), row("2024-01-02", "27.5")];
        let same = same_in_every_row(&two);
        // Line (0) and date (1) and the QC flags (14) never collapse; T (4) differs; the
        // other eleven columns (2, 3, 5–13) are equal in both rows.
        let collapsed: Vec<usize> = (0..15).filter(|k| same[*k]).collect();
        assert_eq!(collapsed, vec![2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 13]);
        // One row says nothing about what repeats.
        assert!(same_in_every_row(&two[..1]).iter().all(|s| !s));
        assert!(same_in_every_row(&[]).iter().all(|s| !s));
    }
}
