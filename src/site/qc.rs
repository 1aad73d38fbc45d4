//! Quality control of record rows: findings per row with file and line, grouped so that a
//! problem repeated on many rows of a large series is listed once in detail per few rows and
//! then as line ranges, never silently.
//!
//! Severities and what happens to the row (also in docs/site-format.md):
//!
//! | finding | severity | row |
//! |---|---|---|
//! | mapped column missing, no date/temperature/salinity/carbonate column | error | (file) |
//! | cell not a number, impossible or unreadable date, wrong cell count | error | — |
//! | date in the future | error | — |
//! | value outside physical limits | error, or warning with `on_out_of_range = "drop"` | dropped |
//! | no temperature or salinity on the row | warning | dropped |
//! | duplicate (same station, time and pressure as an earlier row) | warning | later row dropped |
//! | date earlier than the station's previous row | warning | kept |
//! | no solvable pair of carbonate quantities | warning | kept (T/S statistics only) |
//! | solver failed | warning | kept without carbonate state |
//! | measured − calculated beyond tolerance (≥ 3 quantities measured) | warning | kept |
//! | T or S outside the constant set's fitted range | warning | kept |
//! | salinity outside the TA–salinity fit range (estimated TA) | warning | kept |
//! | fewer than [`MIN_SEASON_SAMPLES`] solved samples in a season | warning | — |

use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::io::{BufRead, BufReader};
use std::path::PathBuf;

use super::records::Sample;
use crate::diag::{Diagnostic, Diagnostics, Severity};

/// A season with fewer solved samples than this gets a warning: its statistics (and any
/// projection from them) rest on too few samples. Common practice (a minimum of 3 for a mean
/// and standard deviation).
pub const MIN_SEASON_SAMPLES: usize = 3;

/// Findings of one kind in one file reported in full before the rest are summarised.
pub const SHOWN_PER_GROUP: usize = 10;

/// One finding about a row (or a file, with `line` 0 or the header line).
#[derive(Clone, Debug)]
pub(crate) struct RowFinding {
    /// Groups findings of the same kind (e.g. "non-numeric", "duplicate").
    pub kind: &'static str,
    pub severity: Severity,
    /// Index into the record file list.
    pub file: usize,
    /// 1-based line; 0 when the finding is about the whole file.
    pub line: usize,
    /// 0-based index of the CSV cell, for the column position.
    pub column: Option<usize>,
    pub field: Option<String>,
    pub message: String,
    pub help: Option<String>,
}

/// Turns row findings into diagnostics: sorted by severity, file and line; at most
/// [`SHOWN_PER_GROUP`] per (file, kind, field, severity) in full, with the offending line and
/// a caret under the cell; the rest as one diagnostic listing every line.
pub(crate) fn to_diagnostics(mut findings: Vec<RowFinding>, files: &[PathBuf]) -> Diagnostics {
    findings.sort_by_key(|f| (f.severity, f.file, f.line));
    let mut groups: Vec<(Vec<RowFinding>, Vec<usize>)> = Vec::new();
    let mut index: HashMap<(Severity, usize, &'static str, Option<String>), usize> = HashMap::new();
    for f in findings {
        let key = (f.severity, f.file, f.kind, f.field.clone());
        let gi = *index.entry(key).or_insert_with(|| {
            groups.push((Vec::new(), Vec::new()));
            groups.len() - 1
        });
        if let Some((shown, rest)) = groups.get_mut(gi) {
            if shown.len() < SHOWN_PER_GROUP {
                shown.push(f);
            } else {
                rest.push(f.line);
            }
        }
    }
    // Source lines needed for snippets, read once per file.
    let mut wanted: BTreeMap<usize, BTreeSet<usize>> = BTreeMap::new();
    for (shown, _) in &groups {
        for f in shown {
            if f.line > 0 {
                wanted.entry(f.file).or_default().insert(f.line);
            }
        }
    }
    let texts = read_lines(&wanted, files);
    let mut out = Diagnostics::new();
    for (shown, rest) in groups {
        let Some(first) = shown.first().cloned() else {
            continue;
        };
        for f in shown {
            let file = files.get(f.file).cloned().unwrap_or_default();
            let mut d = Diagnostic::new(f.severity, f.message).with_file(&file);
            if let Some(field) = f.field {
                d = d.with_field(field);
            }
            if let Some(h) = f.help {
                d = d.with_help(h);
            }
            if f.line > 0 {
                d = d.with_line(f.line);
                if let Some(text) = texts.get(&(f.file, f.line)) {
                    if let Some((col, width)) = f.column.and_then(|c| cell_position(text, c)) {
                        d = d.with_column(col).with_width(width);
                    }
                    d = d.with_snippet(text.clone());
                }
            }
            out.push(d);
        }
        if !rest.is_empty() {
            let file = files.get(first.file).cloned().unwrap_or_default();
            let mut d = Diagnostic::new(
                first.severity,
                format!(
                    "{} more {} like the one above ({}) on lines {}",
                    rest.len(),
                    if rest.len() == 1 { "row" } else { "rows" },
                    first.kind,
                    line_ranges(&rest)
                ),
            )
            .with_file(&file);
            if let Some(field) = first.field {
                d = d.with_field(field);
            }
            out.push(d);
        }
    }
    out
}

fn read_lines(
    wanted: &BTreeMap<usize, BTreeSet<usize>>,
    files: &[PathBuf],
) -> HashMap<(usize, usize), String> {
    let mut out = HashMap::new();
    for (&fi, lines) in wanted {
        let (Some(path), Some(&last)) = (files.get(fi), lines.last()) else {
            continue;
        };
        let Ok(f) = std::fs::File::open(path) else {
            continue;
        };
        let mut r = BufReader::new(f);
        let mut buf = Vec::new();
        let mut n = 0;
        while n < last {
            buf.clear();
            match r.read_until(b'\n', &mut buf) {
                Ok(0) | Err(_) => break,
                Ok(_) => {}
            }
            n += 1;
            if lines.contains(&n) {
                let s = String::from_utf8_lossy(&buf);
                let s = s
                    .trim_end_matches(['\n', '\r'])
                    .trim_start_matches('\u{feff}');
                out.insert((fi, n), s.to_string());
            }
        }
    }
    out
}

/// 1-based character column and width of the `idx`-th comma-separated cell of `line`
/// (quote-aware).
pub(crate) fn cell_position(line: &str, idx: usize) -> Option<(usize, usize)> {
    let mut cell = 0;
    let mut start = 0usize; // char index of current cell start
    let mut in_quotes = false;
    let mut pos = 0usize;
    for c in line.chars() {
        match c {
            '"' => in_quotes = !in_quotes,
            ',' if !in_quotes => {
                if cell == idx {
                    return Some((start + 1, (pos - start).max(1)));
                }
                cell += 1;
                start = pos + 1;
            }
            _ => {}
        }
        pos += 1;
    }
    (cell == idx).then(|| (start + 1, (pos - start).max(1)))
}

/// `3, 5–9, 12` from a list of line numbers; very long lists are cut after 100 ranges with
/// the count of the rest.
pub(crate) fn line_ranges(lines: &[usize]) -> String {
    let mut v = lines.to_vec();
    v.sort_unstable();
    v.dedup();
    let mut parts = Vec::new();
    let mut i = 0;
    while i < v.len() {
        let a = v[i];
        let mut b = a;
        while i + 1 < v.len() && v[i + 1] == b + 1 {
            i += 1;
            b = v[i];
        }
        parts.push(if a == b {
            a.to_string()
        } else {
            format!("{a}–{b}")
        });
        i += 1;
    }
    const MAX_RANGES: usize = 100;
    if parts.len() > MAX_RANGES {
        let more: usize = parts.len() - MAX_RANGES;
        parts.truncate(MAX_RANGES);
        format!("{} and {more} further ranges", parts.join(", "))
    } else {
        parts.join(", ")
    }
}

/// Finds rows with the same station, time and pressure as an earlier row (in file order);
/// the later row is marked dropped. `file_of` gives the record-file index of a sample index.
pub(crate) fn duplicates(
    samples: &[Sample],
    drop: &mut [bool],
    file_of: &dyn Fn(usize) -> usize,
) -> Vec<RowFinding> {
    let mut idx: Vec<usize> = (0..samples.len())
        .filter(|&i| !drop.get(i).copied().unwrap_or(true))
        .collect();
    let key = |i: usize| {
        let s = &samples[i];
        (&*s.station, s.time, s.pressure_dbar.to_bits())
    };
    // A stable sort keeps file order among equal keys and is near-linear on series that are
    // already in time order (the usual case for sensor exports).
    idx.sort_by(|&a, &b| key(a).cmp(&key(b)));
    let mut out = Vec::new();
    for w in idx.windows(2) {
        let (a, b) = (w[0], w[1]);
        if key(a) == key(b) {
            if let Some(d) = drop.get_mut(b) {
                *d = true;
            }
            let (sa, sb) = (&samples[a], &samples[b]);
            let same_file = file_of(a) == file_of(b);
            let where_ = if same_file {
                format!("line {}", sa.line)
            } else {
                format!("{}:{}", sa.source_file.display(), sa.line)
            };
            out.push(RowFinding {
                kind: "duplicate",
                severity: Severity::Warning,
                file: file_of(b),
                line: sb.line,
                column: None,
                field: None,
                message: format!(
                    "duplicate of {where_} (same station `{}`, time {} and pressure {} dbar); row dropped",
                    sb.station,
                    sb.time.to_rfc3339(),
                    sb.pressure_dbar
                ),
                help: Some("keep one row per station, time and depth; average replicates before import".to_string()),
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_compress_and_cut() {
        assert_eq!(line_ranges(&[9, 3, 5, 6, 7, 12]), "3, 5–7, 9, 12");
        let many: Vec<usize> = (0..500).map(|i| i * 2).collect();
        let s = line_ranges(&many);
        assert!(s.ends_with("and 400 further ranges"), "{s}");
    }

    #[test]
    fn cell_positions_respect_quotes() {
        let line = "2024-01-01,\"a,b\",8.1x,35";
        assert_eq!(cell_position(line, 0), Some((1, 10)));
        assert_eq!(cell_position(line, 2), Some((18, 4)));
        assert_eq!(cell_position(line, 3), Some((23, 2)));
        assert_eq!(cell_position(line, 4), None);
    }
}
