//! The chemistry appendix: its opening (tool version, input files with their digests, constant
//! set, conversions, the `--data-out` file) and every sample of a site, one listing per record
//! file: bottle samples row by row, sensor series as daily summaries (their rows are in the
//! `--data-out` file).

use serde_json::{Value, json};

use crate::report::fmt;
use crate::report::model::{ReportModel, RowFlag, SampleRow, SiteReport};

/// The letter of each row flag and what it means, in [`RowFlag`] order (the key printed on
/// every appendix page).
pub(super) const FLAG_KEY: [(RowFlag, &str, &str); 12] = [
    (
        RowFlag::DepthAsPressure,
        "D",
        "depth in m taken as pressure in dbar",
    ),
    (
        RowFlag::PerLitre,
        "L",
        "TA or DIC converted from µmol/L to µmol/kg (TEOS-10 in-situ density)",
    ),
    (RowFlag::MmolPerKg, "K", "TA or DIC converted from mmol/kg"),
    (RowFlag::PhScale, "S", "pH converted to the total scale"),
    (RowFlag::Xco2, "X", "xCO₂ converted to pCO₂"),
    (
        RowFlag::TaEstimated,
        "E",
        "TA estimated from the site's TA–salinity relationship",
    ),
    (
        RowFlag::TaFitExtrapolated,
        "R",
        "salinity outside the range of that relationship",
    ),
    (
        RowFlag::PhCo2Pair,
        "P",
        "solved from pH with pCO₂/fCO₂ (poorly conditioned)",
    ),
    (
        RowFlag::Inconsistent,
        "I",
        "measured and calculated values disagree",
    ),
    (RowFlag::Brackish, "B", "brackish: Ω_ar indicative only"),
    (
        RowFlag::BelowSalinityFloor,
        "F",
        "below the site's salinity floor",
    ),
    (RowFlag::NotUsed, "N", "not used in the baseline or outlook"),
];

fn letter(f: RowFlag) -> &'static str {
    FLAG_KEY
        .iter()
        .find(|(k, _, _)| *k == f)
        .map_or("?", |(_, l, _)| *l)
}

/// "D L S": the letters of a row's flags.
fn letters(flags: &[RowFlag]) -> String {
    flags
        .iter()
        .map(|f| letter(*f))
        .collect::<Vec<_>>()
        .join(" ")
}

/// The opening of the appendix: what a reader needs to trace every number back to its inputs.
pub(super) fn opening(model: &ReportModel) -> Value {
    let sites: Vec<Value> = model
        .sites
        .iter()
        .map(|s| {
            json!({
                "name": s.name,
                "constants": s.methods.chemistry.iter()
                    .map(|m| json!({ "quantity": m.quantity, "citation": m.citation }))
                    .collect::<Vec<_>>(),
                "files": s.record_files.iter().map(|f| json!({
                    "path": f.path,
                    "kind": if f.sensor { "sensor series" } else { "bottle samples" },
                    "conversions": if f.conversions.is_empty() {
                        "none (values in the canonical units)".to_string()
                    } else {
                        f.conversions.iter()
                            .map(|c| format!("{} ({})", key_text(*c), letter(*c)))
                            .collect::<Vec<_>>().join("; ")
                    },
                })).collect::<Vec<_>>(),
                "estimated_ta": s.samples.iter().filter(|r| r.flags.contains(&RowFlag::TaEstimated)).count().to_string(),
            })
        })
        .collect();
    json!({
        "tool": format!("{} {}", model.tool.name, model.tool.version),
        "inputs": model.reproducibility.inputs.iter().map(|f| json!({
            "role": f.role, "path": f.path, "sha256": f.sha256, "bytes": f.bytes.to_string(),
        })).collect::<Vec<_>>(),
        "data_out": model.data_out.as_ref().map(|d| json!({ "name": d.name, "sha256": d.sha256 })),
        "sites": sites,
        "key": FLAG_KEY.iter().map(|(_, l, m)| json!({ "code": l, "meaning": m }))
            .collect::<Vec<_>>(),
    })
}

fn key_text(f: RowFlag) -> &'static str {
    FLAG_KEY
        .iter()
        .find(|(k, _, _)| *k == f)
        .map_or("", |(_, _, m)| *m)
}

/// The appendix listings of a site: one group per record file (in the order the files first
/// appear), rows in file order; a sensor series as one summary line per station and day.
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
            let sensor = site.record_files.iter().any(|f| f.path == file && f.sensor);
            if sensor {
                daily_group(file, &rows)
            } else {
                sample_group(file, &rows)
            }
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

/// A listing column: heading, unit line, right-aligned, may be said once above the listing
/// when it is the same in every row.
type Column = (&'static str, &'static str, bool, bool);

/// Sample columns (the last, the flags, wraps in its own cell).
const SAMPLE_COLUMNS: [Column; 15] = [
    ("Line", "", true, false),
    ("Date and time", "", false, false),
    ("Station", "", false, true),
    ("Season", "", false, true),
    ("T", "°C", true, true),
    ("S", "", true, true),
    ("p", "dbar", true, true),
    ("TA", "µmol/kg", true, true),
    ("DIC", "µmol/kg", true, true),
    ("pH", "total", true, true),
    ("pCO2", "µatm", true, true),
    ("Ωar", "", true, true),
    ("Ωca", "", true, true),
    ("Measured", "", false, true),
    ("Flags", "", false, false),
];

/// The cells of one sample row, formatted, in [`SAMPLE_COLUMNS`] order.
fn sample_cells(s: &SampleRow) -> Vec<String> {
    vec![
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
        letters(&s.flags),
    ]
}

/// One bottle file's rows for the appendix.
fn sample_group(file: &str, rows: &[&SampleRow]) -> Value {
    let cells: Vec<Vec<String>> = rows.iter().map(|s| sample_cells(s)).collect();
    let mut v = listing(&SAMPLE_COLUMNS, &cells);
    v["file"] = json!(file);
    v["count"] = json!(format!("{} samples", rows.len()));
    v
}

/// Daily summary columns of a sensor series.
const DAILY_COLUMNS: [Column; 14] = [
    ("Date", "", false, false),
    ("Station", "", false, true),
    ("Season", "", false, true),
    ("n", "rows", true, false),
    ("Ωar", "min", true, false),
    ("", "mean", true, false),
    ("", "max", true, false),
    ("pH", "min", true, false),
    ("total", "mean", true, false),
    ("", "max", true, false),
    ("T °C", "min", true, false),
    ("", "mean", true, false),
    ("", "max", true, false),
    ("Flags", "", false, false),
];

/// Minimum, mean and maximum of some values, formatted with `f` (dashes when there are none).
fn min_mean_max(values: &[f64], f: fn(f64) -> String) -> [String; 3] {
    if values.is_empty() {
        return [fmt::MISSING, fmt::MISSING, fmt::MISSING].map(str::to_string);
    }
    let min = values.iter().copied().fold(f64::INFINITY, f64::min);
    let max = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let mean = values.iter().sum::<f64>() / values.len() as f64;
    [f(min), f(mean), f(max)]
}

/// The flags of a day: each letter, with the number of rows in parentheses when not every row
/// of the day has it ("D E R(12)").
fn day_flags(rows: &[&SampleRow]) -> String {
    let mut out = Vec::new();
    for (flag, l, _) in FLAG_KEY {
        let n = rows.iter().filter(|r| r.flags.contains(&flag)).count();
        if n == rows.len() {
            out.push(l.to_string());
        } else if n > 0 {
            out.push(format!("{l}({n})"));
        }
    }
    out.join(" ")
}

/// The summary line of one station's day: statistics over the rows used.
fn day_cells(rows: &[&SampleRow]) -> Vec<String> {
    let used: Vec<&&SampleRow> = rows.iter().filter(|r| r.used).collect();
    let omega: Vec<f64> = used.iter().filter_map(|r| r.omega_ar).collect();
    let ph: Vec<f64> = used.iter().filter_map(|r| r.ph_t).collect();
    let temp: Vec<f64> = used.iter().map(|r| r.temp_c).collect();
    let first = rows.first();
    let mut cells = vec![
        first
            .map(|r| r.date.chars().take(10).collect())
            .unwrap_or_default(),
        first.map(|r| r.station.clone()).unwrap_or_default(),
        first.map(|r| r.season.clone()).unwrap_or_default(),
        rows.len().to_string(),
    ];
    cells.extend(min_mean_max(&omega, fmt::omega));
    cells.extend(min_mean_max(&ph, fmt::ph));
    cells.extend(min_mean_max(&temp, fmt::temp));
    cells.push(day_flags(rows));
    cells
}

/// One sensor series as daily summaries: one line per station and local date (as recorded),
/// in order of first appearance.
fn daily_group(file: &str, rows: &[&SampleRow]) -> Value {
    let mut days: Vec<((String, &str), Vec<&SampleRow>)> = Vec::new();
    for &r in rows {
        let key = (
            r.date.chars().take(10).collect::<String>(),
            r.station.as_str(),
        );
        // Rows of a day are usually together: look from the end.
        match days.iter_mut().rev().find(|(k, _)| *k == key) {
            Some((_, group)) => group.push(r),
            None => days.push((key, vec![r])),
        }
    }
    let cells: Vec<Vec<String>> = days.iter().map(|(_, g)| day_cells(g)).collect();
    let mut v = listing(&DAILY_COLUMNS, &cells);
    v["file"] = json!(file);
    v["count"] = json!(format!(
        "{} rows as {} daily summaries (n, minimum, mean and maximum of the rows used; every \
         row is in the data file named above)",
        rows.len(),
        days.len()
    ));
    v
}

/// Which columns hold the same text in every row of a listing of more than one row: those are
/// said once above the listing instead of repeated on every line (only columns marked so).
fn same_in_every_row(columns: &[Column], cells: &[Vec<String>]) -> Vec<bool> {
    let mut same = vec![false; columns.len()];
    let Some((first, rest)) = cells.split_first() else {
        return same;
    };
    if rest.is_empty() {
        return same;
    }
    for (k, s) in same.iter_mut().enumerate() {
        *s = columns[k].3 && rest.iter().all(|row| row.get(k) == first.get(k));
    }
    same
}

/// A listing laid out as fixed-width text (one padded text per row typesets quickly even for
/// long files), each line as [the columns but the last, the last (flags)], with a two-line
/// header of the same shape; columns the same in every row become one sentence.
fn listing(columns: &[Column], cells: &[Vec<String>]) -> Value {
    let n = columns.len();
    let mut widths: Vec<usize> = columns
        .iter()
        .map(|(h, u, _, _)| h.chars().count().max(u.chars().count()))
        .collect();
    for row in cells {
        for (w, c) in widths.iter_mut().zip(row.iter()) {
            *w = (*w).max(c.chars().count());
        }
    }
    let same = same_in_every_row(columns, cells);
    let line = |items: &[&str]| -> [String; 2] {
        let mut out = String::new();
        for (k, item) in items.iter().enumerate().take(n - 1) {
            if same[k] {
                continue;
            }
            let right = columns[k].2;
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
    let heads: Vec<&str> = columns.iter().map(|c| c.0).collect();
    let units: Vec<&str> = columns.iter().map(|c| c.1).collect();
    let lines: Vec<[String; 2]> = cells
        .iter()
        .map(|c| line(&c.iter().map(String::as_str).collect::<Vec<_>>()))
        .collect();
    // The collapsed columns as one sentence: "Station LG1; p 2.5 dbar".
    let same_text: Vec<String> = columns
        .iter()
        .zip(cells.first().into_iter().flatten())
        .zip(&same)
        .filter(|(_, same)| **same)
        .map(|(((head, unit, _, _), value), _)| match *unit {
            "" | "total" => format!("{head} {value}"),
            unit => format!("{head} {value} {unit}"),
        })
        .collect();
    json!({
        "same": same_text,
        "header": [line(&heads), line(&units)],
        "lines": lines,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_columns_equal_in_every_row_collapse() {
        let row = |date: &str, t: &str| -> Vec<String> {
            let mut r: Vec<String> = (0..15).map(|k| format!("v{k}")).collect();
            r[1] = date.to_string();
            r[4] = t.to_string();
            r
        };
        let two = [row("2024-01-01", "27.0"), row("2024-01-02", "27.5")];
        let same = same_in_every_row(&SAMPLE_COLUMNS, &two);
        // Line (0) and date (1) and the flags (14) never collapse; T (4) differs; the
        // other eleven columns (2, 3, 5–13) are equal in both rows.
        let collapsed: Vec<usize> = (0..15).filter(|k| same[*k]).collect();
        assert_eq!(collapsed, vec![2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 13]);
        // One row says nothing about what repeats.
        assert!(
            same_in_every_row(&SAMPLE_COLUMNS, &two[..1])
                .iter()
                .all(|s| !s)
        );
        assert!(same_in_every_row(&SAMPLE_COLUMNS, &[]).iter().all(|s| !s));
    }

    fn row(date: &str, omega: f64, used: bool, flags: Vec<RowFlag>) -> SampleRow {
        SampleRow {
            file: "s.csv".into(),
            row: 2,
            date: date.into(),
            station: "A".into(),
            season: "dry".into(),
            temp_c: 27.0 + omega,
            salinity: 35.0,
            pressure_dbar: 2.0,
            ta: None,
            dic: None,
            ph_t: Some(8.0),
            pco2: None,
            omega_ar: Some(omega),
            omega_ca: None,
            measured: vec![],
            flags,
            used,
        }
    }

    #[test]
    fn a_day_summarises_the_rows_used_and_counts_partial_flags() {
        use RowFlag::*;
        let rows = [
            row(
                "2024-05-01 00:00",
                3.0,
                true,
                vec![DepthAsPressure, TaEstimated],
            ),
            row(
                "2024-05-01 01:00",
                4.0,
                true,
                vec![DepthAsPressure, TaEstimated, TaFitExtrapolated],
            ),
            row(
                "2024-05-01 02:00",
                9.0,
                false,
                vec![DepthAsPressure, TaEstimated, NotUsed],
            ),
        ];
        let refs: Vec<&SampleRow> = rows.iter().collect();
        let c = day_cells(&refs);
        // Worked by hand: Ω_ar of the two rows used, 3.0 and 4.0 (the unused 9.0 left out):
        // min 3.00, mean 3.50, max 4.00; T = 27 + Ω_ar: 30.0, 30.5, 31.0.
        assert_eq!(c[..4], ["2024-05-01", "A", "dry", "3"]);
        assert_eq!(c[4..7], ["3.00", "3.50", "4.00"]);
        assert_eq!(c[10..13], ["30.0", "30.5", "31.0"]);
        assert_eq!(c[13], "D E R(1) N(1)");
    }

    #[test]
    fn every_flag_has_one_letter_and_a_meaning() {
        let mut letters: Vec<&str> = FLAG_KEY.iter().map(|(_, l, _)| *l).collect();
        letters.sort();
        letters.dedup();
        assert_eq!(letters.len(), FLAG_KEY.len());
        assert!(FLAG_KEY.iter().all(|(_, _, m)| !m.is_empty()));
    }
}
