//! Quality control of record rows across files (duplicates) and the QC constants. Row
//! findings are typed ([`super::findings::Finding`]), one per row; they are grouped and worded
//! where they are shown (`check`, the report).
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

use super::findings::{Finding, FindingKind};
use super::records::Sample;
use crate::diag::Severity;

/// A season with fewer solved samples than this gets a warning: its statistics (and any
/// projection from them) rest on too few samples. Common practice (a minimum of 3 for a mean
/// and standard deviation).
pub const MIN_SEASON_SAMPLES: usize = 3;

/// Finds rows with the same station, time and pressure as an earlier row (in file order);
/// the later row is marked dropped. `file_of` gives the record-file index of a sample index.
pub(crate) fn duplicates(
    samples: &[Sample],
    drop: &mut [bool],
    file_of: &dyn Fn(usize) -> usize,
) -> Vec<Finding> {
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
            out.push(
                Finding::new(
                    Severity::Warning,
                    FindingKind::Duplicate,
                    file_of(b),
                    sb.source_file.clone(),
                    sb.line,
                    format!(
                        "duplicate of {where_} (same station `{}`, time {} and pressure {} dbar); row dropped",
                        sb.station,
                        sb.time.to_rfc3339(),
                        sb.pressure_dbar
                    ),
                )
                .with_other_line(sa.line)
                .with_help("keep one row per station, time and depth; average replicates before import"),
            );
        }
    }
    out
}
