//! Rows of low salinity: the site's salinity floor (rows below it are left out of the
//! baseline and the outlook, and stay in the per-sample appendix) and brackish rows, whose
//! Omega_ar rests on constant sets fitted for seawater.
//!
//! Rule for brackish water: a row used for the baseline with S below [`BRACKISH_SALINITY`]
//! carries the `brackish` flag. When such rows are at least [`BRACKISH_SITE_SHARE`] of the
//! rows used, the site gets a warning; when fewer, a note.

use std::path::Path;

use super::findings::{Finding, FindingKind, Value};
use super::records::{RowFlags, Sample};
use crate::diag::{Diagnostic, Severity};

/// Salinity below which a row counts as brackish: 20, near the lower end of the salinity
/// range of the default K1, K2 set (Lueker et al. 2000: S 19–43, the chemistry module's
/// fitted range) and of the seawater ionic medium the constant sets assume (common practice).
pub const BRACKISH_SALINITY: f64 = 20.0;
/// Share of the used rows from which the brackish rows earn a site-level warning (common
/// practice: one row in ten changes a seasonal mean noticeably).
pub const BRACKISH_SITE_SHARE: f64 = 0.1;

/// Flags rows below the salinity `floor` (with a warning per row) and brackish rows; returns
/// the row findings and the site-level finding about brackish water, if any. `drop` marks
/// rows already dropped (they are skipped).
pub(crate) fn apply(
    samples: &mut [Sample],
    drop: &[bool],
    floor: f64,
    file_of: &dyn Fn(usize) -> usize,
    site_file: &Path,
) -> (Vec<Finding>, Option<Diagnostic>) {
    let mut found = Vec::new();
    let (mut used, mut brackish) = (0usize, 0usize);
    for (i, s) in samples.iter_mut().enumerate() {
        if drop.get(i).copied().unwrap_or(true) {
            continue;
        }
        if s.salinity < floor {
            s.flags.insert(RowFlags::BELOW_SALINITY_FLOOR);
            found.push(
                Finding::new(
                    Severity::Warning,
                    FindingKind::BelowSalinityFloor,
                    file_of(i),
                    s.source_file.clone(),
                    s.line,
                    format!(
                        "salinity {} is below the site's floor of {floor}; the row is left out of the baseline and the outlook (kept in the per-sample list)",
                        s.salinity
                    ),
                )
                .with_field("salinity")
                .with_values(vec![
                    Value::new("salinity", s.salinity, ""),
                    Value::new("salinity_floor", floor, ""),
                ])
                .with_help("set [baseline] salinity_floor to change the floor (docs/site-format.md)"),
            );
            continue;
        }
        if s.state.is_none() {
            continue;
        }
        used += 1;
        if s.salinity < BRACKISH_SALINITY {
            s.flags.insert(RowFlags::BRACKISH);
            brackish += 1;
        }
    }
    if brackish == 0 {
        return (found, None);
    }
    let share = brackish as f64 / used.max(1) as f64;
    let severity = if share >= BRACKISH_SITE_SHARE {
        Severity::Warning
    } else {
        Severity::Note
    };
    let d = Diagnostic::new(
        severity,
        format!(
            "{brackish} of {used} rows used ({:.0} %) are brackish (salinity below {BRACKISH_SALINITY}): the constant sets are fitted for seawater and total calcium is scaled with salinity, so Omega_ar of fresh or brackish water is indicative at best and an artefact near S = 0; these rows carry the flag `brackish`",
            100.0 * share
        ),
    )
    .with_file(site_file)
    .with_help("treat Omega_ar of these rows as indicative; a calcium measurement and constants fitted for estuarine water would be needed for more");
    (found, Some(d))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{self, Conditions, Constants, Input, MethodSet};
    use crate::site::records::Measured;
    use crate::site::records::test_util::sample;

    /// A row with a solved state (the state's numbers do not matter here).
    fn solved(s: f64) -> Sample {
        let mut x = sample(25.0, s, 0.0, Measured::default());
        let cond = Conditions {
            temp_c: 25.0,
            salinity: 35.0,
            pressure_dbar: 0.0,
            silicate: 0.0,
            phosphate: 0.0,
        };
        let k = Constants::new(&cond, &MethodSet::default());
        x.state = chem::solve_pair(Input::Ta(2300.0), Input::Dic(2000.0), &k).ok();
        assert!(x.state.is_some());
        x
    }

    /// One row below the floor of 5, three brackish rows of ten used (30 % ≥ 10 %): a
    /// warning for the site, a finding for the floor row, flags on each.
    #[test]
    fn floor_and_brackish_rows() {
        let mut v: Vec<Sample> = [0.7, 12.0, 15.0, 19.9]
            .into_iter()
            .chain(std::iter::repeat_n(35.0, 7))
            .map(solved)
            .collect();
        let drop = vec![false; v.len()];
        let (found, site) = apply(&mut v, &drop, 5.0, &|_| 0, Path::new("site.toml"));
        assert_eq!(found.len(), 1);
        assert_eq!(found[0].kind, FindingKind::BelowSalinityFloor);
        assert_eq!(found[0].value("salinity"), Some(0.7));
        assert!(v[0].flags.contains(RowFlags::BELOW_SALINITY_FLOOR) && !v[0].is_used());
        assert!(v[1].flags.contains(RowFlags::BRACKISH) && v[1].is_used());
        assert!(!v[5].flags.contains(RowFlags::BRACKISH));
        let site = site.unwrap_or_else(|| panic!("no site finding"));
        assert_eq!(site.severity, Severity::Warning);
        assert!(
            site.message.starts_with("3 of 10 rows used (30 %)"),
            "{}",
            site.message
        );
    }
}
