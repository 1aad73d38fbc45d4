//! The site: its description file (TOML), its water-chemistry records (CSV), quality control
//! and the seasonal baseline.
//!
//! Entry point for the rest of the program: [`load_site`]. Everything it returns is in
//! canonical units (µmol/kg, pH total scale, µatm, °C, dbar). The file format is documented
//! field by field in `docs/site-format.md`.
//!
//! The site knows no outlook names: `[projection]` and `[calcification]` are kept as written
//! (with their places in the file, see [`LoadedSite::locate`]) and checked by the outlook.
//!
//! Assumptions stated in every `check` output as notes:
//! * depth in m is taken as the same number of dbar;
//! * rows without measured TA (typically sensor series) take TA from the site's TA–salinity
//!   relationship fitted over the bottle samples with measured TA ([`baseline::TaSalinityFit`]),
//!   paired with pH in preference to the poorly conditioned pH + pCO2 pair;
//! * µmol/L is converted with the TEOS-10 density at the sample's in-situ T, S and pressure.

pub mod baseline;
pub mod brackish;
pub mod dates;
pub mod findings;
pub mod init;
mod load;
pub mod qc;
pub mod records;
pub mod schema;
pub mod spans;
pub mod temperature;
pub mod validate;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use chrono::{DateTime, FixedOffset, Utc};
use serde::Serialize;

pub use baseline::{Baseline, SeasonBaseline, Stats, TaSalinityFit};
pub use findings::{Finding, FindingKind};
pub use records::{Measured, Pair, RowFlags, Sample};
pub use schema::{Season, SiteFile};

use crate::chem::MethodSet;
use crate::diag::{Diagnostic, Diagnostics, Severity};
use schema::RecordKind;

/// A site file with its records read, converted, checked and solved.
#[derive(Clone, Debug, Serialize)]
pub struct LoadedSite {
    /// The site file as given.
    pub path: PathBuf,
    pub site: SiteFile,
    /// Seasons in order; `Sample::season` indexes this list.
    pub seasons: Vec<Season>,
    #[serde(serialize_with = "ser_offset")]
    pub utc_offset: FixedOffset,
    #[serde(skip)]
    pub methods: MethodSet,
    #[serde(skip)]
    pub samples: Vec<Sample>,
    /// Rows of offshore source water (`[source_water]`), kept apart from `samples`: they
    /// feed neither the baseline nor the reef's outlook, only the source-offsets rule.
    #[serde(skip)]
    pub source_samples: Vec<Sample>,
    /// Site-level warnings and notes (errors make [`load_site`] fail instead). Not part of
    /// this type's JSON form: `check --format json` lists them once, at the top level.
    #[serde(skip)]
    pub findings: Diagnostics,
    /// Typed findings about record rows and files (warnings; one per row, ungrouped). Shown
    /// grouped by `check` and the report.
    #[serde(skip)]
    pub qc: Vec<Finding>,
    /// Where the row findings stand among [`LoadedSite::findings`] when both are listed
    /// together (the index of the first site-level finding that follows them).
    #[serde(skip)]
    pub qc_position: usize,
    pub baseline: Baseline,
    /// What each record file contributed.
    pub records: Vec<RecordSummary>,
    /// The site file and every record file, for checksums in reports.
    pub input_files: Vec<PathBuf>,
    /// Where each key of the site file is, for [`LoadedSite::locate`].
    #[serde(skip)]
    source_map: spans::SourceMap,
}

fn ser_offset<S: serde::Serializer>(o: &FixedOffset, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&o.to_string())
}

impl LoadedSite {
    /// Adds line, column and the source line to a diagnostic about a key of this site file
    /// (one with `field` set, e.g. `projection.pathways[1]`, and no line yet), so later stages
    /// can report site-file problems as precisely as `check` does.
    pub fn locate(&self, d: Diagnostic) -> Diagnostic {
        let about_this_file = d.file.as_ref().is_none_or(|f| f == &self.path);
        match (&d.field, d.line, about_this_file) {
            (Some(field), None, true) => {
                let field = field.clone();
                self.source_map.at_path(d.with_file(&self.path), &field)
            }
            _ => d,
        }
    }

    /// Year of the last sample (for default horizon years), or the current year if none.
    pub fn last_sample_year(&self) -> i32 {
        use chrono::Datelike;
        self.samples
            .iter()
            .map(|s| s.time.year())
            .max()
            .unwrap_or_else(|| Utc::now().year())
    }

    /// Rows left out of the baseline and the outlook because their salinity is below the
    /// site's floor (they stay in [`LoadedSite::samples`] for the per-sample list).
    pub fn left_out(&self) -> impl Iterator<Item = &Sample> {
        self.samples
            .iter()
            .filter(|s| s.flags.contains(RowFlags::BELOW_SALINITY_FLOOR))
    }

    /// Number of findings (site-level and row) of `severity`.
    pub fn count(&self, severity: Severity) -> usize {
        self.findings.count(severity) + self.qc.iter().filter(|f| f.severity == severity).count()
    }
}

/// What one record file contributed after QC.
#[derive(Clone, Debug, Serialize)]
pub struct RecordSummary {
    pub path: PathBuf,
    pub kind: RecordKind,
    /// Rows kept after QC.
    pub rows: usize,
    /// Rows with a solved carbonate state.
    pub solved: usize,
    /// Rows whose TA was estimated from salinity.
    pub ta_estimated: usize,
    #[serde(serialize_with = "records::ser_opt_time")]
    pub first: Option<DateTime<FixedOffset>>,
    #[serde(serialize_with = "records::ser_opt_time")]
    pub last: Option<DateTime<FixedOffset>>,
    /// Whether rows carry a time of day.
    pub sub_daily: bool,
    /// Kept rows per season (same order as the site's seasons).
    pub rows_per_season: Vec<usize>,
    /// How many rows were solved from each pair (label → count).
    pub pairs: BTreeMap<String, usize>,
    /// Kept rows below the site's salinity floor (not in the baseline or the outlook).
    pub below_salinity_floor: usize,
    /// The conversions applied to this file's values on reading (not part of `check`'s JSON,
    /// which gives the units in the site file).
    #[serde(skip)]
    pub conversions: Conversions,
}

/// The conversions a record file's values went through to reach the canonical units; each
/// applies to every row that has the value.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Conversions {
    /// Unit of the file's TA column (µmol/L and mmol/kg are converted to µmol/kg).
    pub ta: schema::ConcUnit,
    /// Unit of the file's DIC column.
    pub dic: schema::ConcUnit,
    /// Scale of the file's pH column (other scales are converted to the total scale).
    pub ph_scale: schema::PhScaleName,
    /// The CO2 column holds xCO2 (ppm, dry air), converted to pCO2.
    pub xco2: bool,
    /// Depths in m were taken as pressures in dbar.
    pub depth_as_pressure: bool,
}

/// Why a site could not be loaded: site-level diagnostics and typed row findings (errors
/// and the warnings found with them), kept apart so that whoever shows them can group rows.
#[derive(Clone, Debug, Default)]
pub struct LoadFailure {
    pub diagnostics: Diagnostics,
    pub rows: Vec<Finding>,
    /// Where the row findings stand among the diagnostics (as [`LoadedSite::qc_position`]).
    pub rows_position: usize,
}

impl From<Diagnostics> for LoadFailure {
    fn from(diagnostics: Diagnostics) -> Self {
        let rows_position = diagnostics.len();
        LoadFailure {
            diagnostics,
            rows: Vec::new(),
            rows_position,
        }
    }
}

impl LoadFailure {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.has_errors() || findings::has_error(&self.rows)
    }

    /// Every finding as a diagnostic, one per row (not grouped, no source line), in order.
    pub fn to_diagnostics(&self) -> Diagnostics {
        let mut out = Diagnostics::new();
        let (before, after) = self
            .diagnostics
            .as_slice()
            .split_at(self.rows_position.min(self.diagnostics.len()));
        out.extend(before.iter().cloned());
        out.extend(self.rows.iter().map(Finding::to_diagnostic));
        out.extend(after.iter().cloned());
        out
    }

    /// [`LoadFailure::to_diagnostics`] rendered (tests and tools; `check` groups rows).
    pub fn render(&self, colour: bool) -> String {
        self.to_diagnostics().render(colour)
    }
}

impl std::fmt::Display for LoadFailure {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.render(false))
    }
}

/// Reads and checks a site file and all its records; solves every sample and computes the
/// baseline. On any error returns every finding (errors and warnings) instead.
pub fn load_site(path: &Path) -> Result<LoadedSite, LoadFailure> {
    load_site_at(path, Utc::now())
}

/// [`load_site`] with the clock given (dates after `now` are errors).
pub fn load_site_at(path: &Path, now: DateTime<Utc>) -> Result<LoadedSite, LoadFailure> {
    let text = load::read_site_text(path)?;
    let (site, map) = spans::parse_site_text(path, &text)?;
    let (resolved, diags) = validate::validate(path, &site, &map);
    let Some(res) = resolved else {
        return Err(diags.into());
    };
    let mut run = load::Run::new(path, &site, &res, diags);
    run.read_all(now);
    run.stop_on_errors()?;
    run.drop_duplicates();
    run.convert_all();
    run.stop_on_errors()?;
    run.solve_all();
    run.stop_on_errors()?;
    run.apply_salinity_floor();
    let summaries = run.summaries();
    let out = run.finish(summaries)?;
    Ok(LoadedSite {
        path: path.to_path_buf(),
        seasons: res.seasons,
        utc_offset: res.utc_offset,
        methods: res.methods,
        samples: out.samples,
        source_samples: out.source_samples,
        findings: out.findings,
        qc: out.qc,
        qc_position: out.qc_position,
        baseline: out.baseline,
        records: out.records,
        input_files: out.input_files,
        source_map: map,
        site,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::fs;

    const GOOD_SITE: &str = r#"[site]
name = "Test reef"
latitude_deg = -8.0
longitude_deg = -127.0
depth_min_m = 1.0
depth_max_m = 5.0
utc_offset = "-08:00"

[[records]]
path = "bottles.csv"
kind = "bottle"
"#;

    const GOOD_CSV: &str = "date,station,temp_c,salinity,depth_m,ta,dic\n\
        2024-01-10,A,27.0,35.2,3,2350,2010\n\
        2024-01-11,A,27.1,35.3,3,2352,2012\n\
        2024-01-12,A,27.2,35.1,3,2348,2008\n";

    fn site_with(toml: &str, csv: &str) -> (tempfile::TempDir, PathBuf) {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let p = dir.path().join("site.toml");
        fs::write(&p, toml).unwrap_or_else(|e| panic!("{e}"));
        fs::write(dir.path().join("bottles.csv"), csv).unwrap_or_else(|e| panic!("{e}"));
        (dir, p)
    }

    fn now() -> DateTime<Utc> {
        DateTime::parse_from_rfc3339("2025-06-01T00:00:00Z")
            .map(|d| d.with_timezone(&Utc))
            .unwrap_or_else(|e| panic!("{e}"))
    }

    #[test]
    fn good_site_loads() {
        let (_dir, p) = site_with(GOOD_SITE, GOOD_CSV);
        let ls = load_site_at(&p, now()).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ls.samples.len(), 3);
        assert!(
            ls.samples
                .iter()
                .all(|s| s.state.is_some() && s.pair == Some(Pair::TaDic))
        );
        assert_eq!(ls.seasons.len(), 12);
        assert_eq!(ls.baseline.seasons[0].n_solved, 3);
        assert_eq!(ls.input_files.len(), 2);
        // The 11 empty calendar months are named in one warning.
        assert_eq!(ls.findings.count(Severity::Warning), 1);
        let w = ls
            .findings
            .iter()
            .find(|d| d.severity == Severity::Warning)
            .map(|d| d.message.clone())
            .unwrap_or_default();
        assert!(
            w.starts_with("11 of 12 seasons have fewer than 3") && w.contains("Feb (0)"),
            "{w}"
        );
    }

    #[test]
    fn duplicates_are_dropped_with_a_typed_finding() {
        let dup = format!("{GOOD_CSV}2024-01-11,A,27.1,35.3,3,2352,2012\n");
        let (_dir, p) = site_with(GOOD_SITE, &dup);
        let ls = load_site_at(&p, now()).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ls.samples.len(), 3);
        // Line 5 repeats line 3 (station, time and pressure): one typed warning, row dropped.
        let d: Vec<&Finding> = ls
            .qc
            .iter()
            .filter(|f| f.kind == FindingKind::Duplicate)
            .collect();
        assert_eq!(d.len(), 1, "{:?}", ls.qc);
        assert_eq!((d[0].line, d[0].other_line), (5, Some(3)));
        assert_eq!(d[0].severity, Severity::Warning);
        assert!(
            d[0].message.contains("duplicate of line 3"),
            "{}",
            d[0].message
        );
    }

    #[test]
    fn named_seasons_keep_file_order() {
        let ok = format!(
            "{GOOD_SITE}\n[seasons]\nwet = [11, 12, 1, 2, 3, 4]\ndry = [\"May\", \"Jun\", 7, 8, 9, 10]\n"
        );
        let (_dir, p) = site_with(&ok, GOOD_CSV);
        let ls = load_site_at(&p, now()).unwrap_or_else(|e| panic!("{e}"));
        let names: Vec<_> = ls.seasons.iter().map(|s| s.name.as_str()).collect();
        assert_eq!(names, ["wet", "dry"]);
        assert!(ls.samples.iter().all(|s| s.season == 0));
    }

    /// The demo lab file (headers mapped, TA in µmol/L, pH on the SWS scale, day-first dates)
    /// holds the same bottles as the canonical file. Both were written by demo-data/generate.py
    /// with the PyPI packages gsw 3.6.23 (TEOS-10 density) and PyCO2SYS 1.8.3.4 (pH_SWS), so
    /// converting and solving the lab file must give back the canonical TA and DIC: TA within
    /// 0.1 µmol/kg (rounding to 0.1 µmol/L), DIC within 0.5 µmol/kg (pH rounded to 4 decimals).
    #[test]
    fn demo_lab_file_reproduces_the_canonical_bottles() {
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let lab = load_site_at(&root.join("sites/tala-vesi-pass.toml"), now())
            .unwrap_or_else(|e| panic!("{e}"));
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let canon_toml = dir.path().join("canon.toml");
        let csv = root.join("demo-data/upwelling-bottles.csv");
        fs::write(
            &canon_toml,
            GOOD_SITE.replace("bottles.csv", &csv.display().to_string()),
        )
        .unwrap_or_else(|e| panic!("{e}"));
        let canon = load_site_at(&canon_toml, now()).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(lab.samples.len(), 36);
        assert_eq!(canon.samples.len(), 36);
        for (a, b) in lab.samples.iter().zip(&canon.samples) {
            assert_eq!(a.station, b.station);
            assert_eq!(a.time.date_naive(), b.time.date_naive());
            let (ta_lab, ta_can) = (
                a.measured.ta().unwrap_or(0.0),
                b.measured.ta().unwrap_or(0.0),
            );
            assert!(
                (ta_lab - ta_can).abs() < 0.1,
                "line {}: TA {ta_lab} vs {ta_can}",
                a.line
            );
            let (sa, sb) = (
                a.state.unwrap_or_else(|| panic!("unsolved")),
                b.state.unwrap_or_else(|| panic!("unsolved")),
            );
            assert!(
                (sa.dic - sb.dic).abs() < 0.5,
                "line {}: DIC {} vs {}",
                a.line,
                sa.dic,
                sb.dic
            );
        }
    }
}
