//! The site: its description file (TOML), its water-chemistry records (CSV), quality control
//! and the seasonal baseline.
//!
//! Entry point for the rest of the program: [`load_site`]. Everything it returns is in
//! canonical units (µmol/kg, pH total scale, µatm, °C, dbar). The file format is documented
//! field by field in `docs/site-format.md`.
//!
//! Assumptions stated in every `check` output as notes:
//! * depth in m is taken as the same number of dbar;
//! * rows without measured TA (typically sensor series) take TA from the site's TA–salinity
//!   relationship fitted over the bottle samples with measured TA ([`baseline::TaSalinityFit`]),
//!   paired with pH in preference to the poorly conditioned pH + pCO2 pair;
//! * µmol/L is converted with the TEOS-10 density at the sample's in-situ T, S and pressure.

pub mod baseline;
pub mod dates;
pub mod init;
pub mod qc;
pub mod records;
pub mod schema;
pub mod spans;
pub mod temperature;
pub mod validate;

use std::collections::{BTreeMap, HashMap};
use std::ops::Range;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use chrono::{DateTime, FixedOffset, Utc};
use serde::Serialize;

pub use baseline::{Baseline, SeasonBaseline, Stats, TaSalinityFit};
pub use records::{Measured, Pair, RowFlags, Sample};
pub use schema::{Season, SiteFile};

use crate::chem::MethodSet;
use crate::diag::{Diagnostic, Diagnostics, Severity};
use qc::RowFinding;
use records::{FileUnits, ReadContext, Stations};
use schema::{Co2Kind, ConcUnit, PhScaleName, RecordKind};

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
    /// Warnings and notes (errors make [`load_site`] fail instead). Not part of this type's
    /// JSON form: `check --format json` lists them once, at the top level.
    #[serde(skip)]
    pub findings: Diagnostics,
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
}

fn summarise(sum: &mut RecordSummary, smp: &Sample) {
    sum.rows += 1;
    sum.sub_daily |= smp.has_time;
    if let Some(c) = sum.rows_per_season.get_mut(smp.season) {
        *c += 1;
    }
    sum.first = Some(sum.first.map_or(smp.time, |f| f.min(smp.time)));
    sum.last = Some(sum.last.map_or(smp.time, |l| l.max(smp.time)));
    sum.solved += usize::from(smp.state.is_some());
    sum.ta_estimated += usize::from(smp.ta_estimated);
}

/// Adds the cell position to row findings that name a quantity but no column (those found
/// after unit conversion or solving), so that every row message points at its cell.
fn add_columns(
    mut findings: Vec<RowFinding>,
    columns: &[Option<records::Columns>],
) -> Vec<RowFinding> {
    for f in &mut findings {
        if f.line > 0 && f.column.is_none() {
            let cols = columns.get(f.file).and_then(Option::as_ref);
            f.column = cols.and_then(|c| f.field.as_deref().and_then(|k| c.index_of(k)));
        }
    }
    findings
}

fn error_at(file: &Path, message: String, help: &str) -> Diagnostics {
    Diagnostics::from(Diagnostic::error(message).with_file(file).with_help(help))
}

/// Reads and checks a site file and all its records; solves every sample and computes the
/// baseline. On any error returns every finding (errors and warnings) instead.
pub fn load_site(path: &Path) -> Result<LoadedSite, Diagnostics> {
    load_site_at(path, Utc::now())
}

/// [`load_site`] with the clock given (dates after `now` are errors).
pub fn load_site_at(path: &Path, now: DateTime<Utc>) -> Result<LoadedSite, Diagnostics> {
    let bytes = std::fs::read(path).map_err(|e| {
        error_at(
            path,
            format!("cannot read the site file: {e}"),
            "give the path of a site TOML file (create one with `calcisite init DIR`)",
        )
    })?;
    let text = String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        let bytes = e.as_bytes();
        let before = bytes.get(..at).unwrap_or_default();
        let line = 1 + before.iter().filter(|b| **b == b'\n').count();
        let start = before.iter().rposition(|b| *b == b'\n').map_or(0, |p| p + 1);
        let line_bytes = bytes.get(start..).unwrap_or_default();
        let line_bytes = line_bytes.split(|b| *b == b'\n').next().unwrap_or_default();
        let column = 1 + String::from_utf8_lossy(bytes.get(start..at).unwrap_or_default())
            .chars()
            .count();
        let byte = bytes.get(at).copied().unwrap_or(0);
        Diagnostics::from(
            Diagnostic::error(format!(
                "the site file is not UTF-8 text (byte 0x{byte:02X} at line {line}, column {column})"
            ))
            .with_file(path)
            .at(line, column)
            .with_snippet(String::from_utf8_lossy(line_bytes).trim_end().to_string())
            .with_help(
                "save the file as UTF-8 (a byte like this usually means the file was saved as Latin-1 or Windows-1252)",
            ),
        )
    })?;
    let (site, map) = spans::parse_site_text(path, &text)?;
    let (resolved, mut diags) = validate::validate(path, &site, &map);
    let Some(res) = resolved else {
        return Err(diags);
    };

    let s = &site.site;
    let default_station: Arc<str> = Arc::from(s.name.as_str());
    let mid_depth = 0.5 * (s.depth_min_m + s.depth_max_m);
    let mut stations = Stations::default();
    let mut samples: Vec<Sample> = Vec::new();
    let mut findings: Vec<RowFinding> = Vec::new();
    let mut ranges: Vec<Range<usize>> = Vec::new();
    let mut columns = Vec::new();
    for (i, spec) in site.records.iter().enumerate() {
        let rp = res.record_paths.get(i).cloned().unwrap_or_default();
        let ctx = ReadContext {
            file_index: i,
            path: Arc::from(rp.as_path()),
            spec,
            spec_index: i,
            utc_offset: res.utc_offset,
            season_of_month: res.season_of_month,
            default_pressure_dbar: spec.depth_m.unwrap_or(mid_depth),
            default_station: default_station.clone(),
            now,
        };
        let start = samples.len();
        let cols = records::read_record(&ctx, &mut stations, &mut samples, &mut findings);
        ranges.push(start..samples.len());
        columns.push(cols);
    }
    let files = res.record_paths.clone();
    let has_error = |f: &[RowFinding]| f.iter().any(|x| x.severity == Severity::Error);
    let fail = |findings: Vec<RowFinding>, mut diags: Diagnostics| {
        diags.extend(qc::to_diagnostics(add_columns(findings, &columns), &files));
        Err(diags)
    };
    if has_error(&findings) {
        return fail(findings, diags);
    }

    let mut drop = vec![false; samples.len()];
    let file_of = |i: usize| ranges.iter().position(|r| r.contains(&i)).unwrap_or(0);
    findings.extend(qc::duplicates(&samples, &mut drop, &file_of));

    let units: Vec<FileUnits> = site
        .records
        .iter()
        .zip(&columns)
        .map(|(r, c)| FileUnits {
            ta: r.units.ta,
            dic: r.units.dic,
            silicate: r.units.silicate,
            phosphate: r.units.phosphate,
            ph: r.units.ph,
            co2: c.as_ref().map_or(Co2Kind::Pco2Uatm, |c| c.co2_kind),
            drop_out_of_range: r.on_out_of_range == schema::OutOfRange::Drop,
        })
        .collect();
    for (i, r) in ranges.iter().enumerate() {
        let (Some(u), Some(sl), Some(dl)) = (
            units.get(i),
            samples.get_mut(r.clone()),
            drop.get_mut(r.clone()),
        ) else {
            continue;
        };
        findings.extend(records::convert_units(
            sl,
            dl,
            *u,
            s.longitude_deg,
            s.latitude_deg,
            i,
        ));
    }
    if has_error(&findings) {
        return fail(findings, diags);
    }

    // The TA–salinity relationship from bottle rows (kept ones only).
    let kept_bottles: Vec<(f64, f64)> = samples
        .iter()
        .zip(&drop)
        .filter(|(s, d)| !**d && s.kind == RecordKind::Bottle)
        .filter_map(|(s, _)| s.measured.ta().map(|ta| (s.salinity, ta)))
        .collect();
    let ta_fit = TaSalinityFit::fit(&kept_bottles);
    let ta_model = ta_fit.map(|f| f.as_model());

    let mut notes = Diagnostics::new();
    for (i, (r, cols)) in ranges.iter().zip(&columns).enumerate() {
        let (Some(u), Some(cols), Some(spec)) = (units.get(i), cols.as_ref(), site.records.get(i))
        else {
            continue;
        };
        let file = files.get(i).cloned().unwrap_or_default();
        if cols.carbonate_columns() == 1 && cols.has_ta() {
            notes.push(
                Diagnostic::note(
                    "this record has TA only: its rows feed the TA statistics and the TA–salinity relationship, and are not solved",
                )
                .with_file(&file),
            );
            continue;
        }
        if !cols.has_ta() && cols.carbonate_columns() == 1 && ta_model.is_none() {
            findings.push(RowFinding {
                kind: "no-pair",
                severity: Severity::Error,
                file: i,
                line: 0,
                column: None,
                field: Some(format!("records[{i}]")),
                message: format!(
                    "this record has only one carbonate quantity and the site has fewer than {} bottle samples with TA for a TA–salinity relationship",
                    baseline::MIN_TA_FIT_SAMPLES
                ),
                help: Some("add a bottle record with TA and salinity from the same site, or a second carbonate column".to_string()),
            });
            continue;
        }
        let (Some(sl), Some(dl)) = (samples.get_mut(r.clone()), drop.get_mut(r.clone())) else {
            continue;
        };
        findings.extend(records::solve_samples(
            sl,
            dl,
            *u,
            &res.methods,
            ta_model,
            i,
        ));
        if cols.headers.iter().any(|h| h == "depth_m") || spec.columns.depth_m.is_some() {
            notes.push(
                Diagnostic::note("depths in m are taken as the same number of dbar (1 m ≈ 1 dbar)")
                    .with_file(&file),
            );
        } else if spec.columns.pressure_dbar.is_none()
            && !cols.headers.iter().any(|h| h == "pressure_dbar")
        {
            let d = spec.depth_m.unwrap_or(mid_depth);
            notes.push(
                Diagnostic::note(format!(
                    "the record has no depth or pressure column: every row is taken at {d} m ({d} dbar){}",
                    if spec.depth_m.is_some() { "" } else { ", the middle of the site's depth range" }
                ))
                .with_file(&file),
            );
        }
        let conc_l = [u.ta, u.dic, u.silicate, u.phosphate].contains(&ConcUnit::UmolPerL);
        if conc_l {
            notes.push(
                Diagnostic::note("µmol/L values were converted to µmol/kg with the TEOS-10 density at each sample's temperature, salinity and pressure")
                    .with_file(&file),
            );
        }
        if u.ph != PhScaleName::Total {
            let name = match u.ph {
                PhScaleName::Sws => "seawater (SWS)",
                PhScaleName::Free => "free",
                PhScaleName::Nbs => "NBS",
                PhScaleName::Total => "total",
            };
            notes.push(
                Diagnostic::note(format!("pH was converted from the {name} scale to the total scale at each sample's temperature, salinity and pressure"))
                    .with_file(&file),
            );
        }
        if u.co2 == Co2Kind::Xco2Ppm {
            notes.push(
                Diagnostic::note("xCO2 (ppm, dry air) was converted to pCO2 at 1 atm with the water vapour pressure of Weiss & Price (1980)")
                    .with_file(&file),
            );
        }
    }
    if has_error(&findings) {
        return fail(findings, diags);
    }
    // Record summaries (of the rows kept).
    let mut summaries: Vec<RecordSummary> = site
        .records
        .iter()
        .zip(&files)
        .map(|(r, p)| RecordSummary {
            path: p.clone(),
            kind: r.kind,
            rows: 0,
            solved: 0,
            ta_estimated: 0,
            first: None,
            last: None,
            sub_daily: false,
            rows_per_season: vec![0; res.seasons.len()],
            pairs: BTreeMap::new(),
        })
        .collect();
    for (sum, r) in summaries.iter_mut().zip(&ranges) {
        let (Some(sl), Some(dl)) = (samples.get(r.clone()), drop.get(r.clone())) else {
            continue;
        };
        let mut pairs: HashMap<(Pair, bool), usize> = HashMap::new();
        for smp in sl.iter().zip(dl).filter(|(_, d)| !**d).map(|(s, _)| s) {
            summarise(sum, smp);
            if let (Some(p), Some(_)) = (smp.pair, smp.state) {
                *pairs.entry((p, smp.ta_estimated)).or_insert(0) += 1;
            }
        }
        for ((p, est), n) in pairs {
            let label = if est {
                format!("{} (TA from salinity)", p.label())
            } else {
                p.label().to_string()
            };
            sum.pairs.insert(label, n);
        }
    }
    records::retain_kept(&mut samples, &drop);

    let baseline = baseline::compute(
        &samples,
        &res.seasons,
        res.utc_offset,
        ta_fit,
        &site.baseline,
    );

    // Seasons with too few solved samples (one warning naming them all).
    let thin: Vec<String> = baseline
        .seasons
        .iter()
        .filter(|sb| sb.n_solved < qc::MIN_SEASON_SAMPLES)
        .map(|sb| format!("{} ({})", sb.name, sb.n_solved))
        .collect();
    if !thin.is_empty() {
        diags.push(
            Diagnostic::warning(format!(
                "{} of {} seasons have fewer than {} solved samples, so their statistics are uncertain: {}",
                thin.len(),
                baseline.seasons.len(),
                qc::MIN_SEASON_SAMPLES,
                thin.join(", ")
            ))
            .with_file(path)
            .with_field("seasons")
            .with_help("add samples for these seasons, or define fewer, longer seasons in [seasons]"),
        );
    }
    diags.extend(qc::to_diagnostics(add_columns(findings, &columns), &files));
    let n_est: usize = summaries.iter().map(|s| s.ta_estimated).sum();
    if let (Some(f), true) = (ta_fit, n_est > 0) {
        let how = f.describe_model();
        diags.push(
            Diagnostic::note(format!(
                "assumption: {n_est} rows without measured TA take TA from the site's bottle samples: {how}"
            ))
            .with_file(path),
        );
    }
    if site.baseline.net_calcification_kg_m2_yr.is_none() {
        diags.push(
            Diagnostic::note(format!(
                "no net calcification given in [baseline]; using {} kg CaCO3 m⁻² yr⁻¹ ({})",
                schema::DEFAULT_NET_CALCIFICATION_KG_M2_YR,
                schema::DEFAULT_NET_CALCIFICATION_SOURCE
            ))
            .with_file(path)
            .with_field("baseline.net_calcification_kg_m2_yr"),
        );
    }
    diags.extend(notes);
    if diags.has_errors() {
        return Err(diags);
    }
    let mut input_files = vec![path.to_path_buf()];
    input_files.extend(files);
    Ok(LoadedSite {
        path: path.to_path_buf(),
        site,
        seasons: res.seasons,
        utc_offset: res.utc_offset,
        methods: res.methods,
        samples,
        findings: diags,
        baseline,
        records: summaries,
        input_files,
        source_map: map,
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

    /// Loads and expects failure; returns the first error.
    fn first_error(toml: &str, csv: &str) -> (Diagnostic, String) {
        let (_dir, p) = site_with(toml, csv);
        let ds = match load_site_at(&p, now()) {
            Ok(_) => panic!("accepted bad input"),
            Err(ds) => ds,
        };
        let e = ds
            .iter()
            .find(|d| d.is_error())
            .cloned()
            .unwrap_or_else(|| panic!("no error in {ds}"));
        (e, ds.to_string())
    }

    fn ends_with_file(d: &Diagnostic, name: &str) -> bool {
        d.file.as_ref().is_some_and(|f| f.ends_with(name))
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
    fn toml_syntax_error_names_file_line_and_column() {
        let bad = GOOD_SITE.replace("latitude_deg = -8.0", "latitude_deg = = -8.0");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(e.message.contains("TOML syntax error"), "{all}");
        assert!(ends_with_file(&e, "site.toml"));
        assert_eq!(e.line, Some(3), "{all}");
        assert!(e.column.is_some(), "{all}");
    }

    #[test]
    fn unknown_key_suggests_the_right_one() {
        let bad = GOOD_SITE.replace("latitude_deg", "latitud_deg");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(ends_with_file(&e, "site.toml"), "{all}");
        assert!(e.message.contains("unknown key `latitud_deg`"), "{all}");
        assert_eq!(e.line, Some(3), "{all}");
        assert_eq!(e.field.as_deref(), Some("site.latitud_deg"), "{all}");
        assert!(
            e.help
                .as_deref()
                .unwrap_or("")
                .contains("did you mean `latitude_deg`?"),
            "{all}"
        );
    }

    #[test]
    fn wrong_type_names_field_and_expected_type() {
        let bad = GOOD_SITE.replace("depth_max_m = 5.0", "depth_max_m = \"five\"");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(ends_with_file(&e, "site.toml"), "{all}");
        assert!(e.message.contains("wrong type"), "{all}");
        assert_eq!(e.line, Some(6), "{all}");
        assert_eq!(e.field.as_deref(), Some("site.depth_max_m"), "{all}");
        assert!(
            e.help.as_deref().unwrap_or("").contains("a number"),
            "{all}"
        );
    }

    #[test]
    fn latitude_200_is_out_of_range() {
        let bad = GOOD_SITE.replace("latitude_deg = -8.0", "latitude_deg = 200");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(ends_with_file(&e, "site.toml"), "{all}");
        assert_eq!((e.line, e.column), (Some(3), Some(16)), "{all}");
        assert_eq!(e.field.as_deref(), Some("site.latitude_deg"));
        assert!(
            e.help
                .as_deref()
                .unwrap_or("")
                .contains("between -90 and 90"),
            "{all}"
        );
        assert!(all.contains("3 | latitude_deg = 200\n"), "{all}");
        assert!(all.contains("|                ^^^\n"), "{all}");
    }

    #[test]
    fn negative_depth_is_refused() {
        let bad = GOOD_SITE.replace("depth_min_m = 1.0", "depth_min_m = -2.0");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(ends_with_file(&e, "site.toml"), "{all}");
        assert_eq!(e.line, Some(5), "{all}");
        assert_eq!(e.field.as_deref(), Some("site.depth_min_m"));
        assert!(
            e.help
                .as_deref()
                .unwrap_or("")
                .contains("between 0 and 1000"),
            "{all}"
        );
    }

    #[test]
    fn missing_record_file() {
        let bad = GOOD_SITE.replace("bottles.csv", "bottels.csv");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(e.message.contains("bottels.csv` does not exist"), "{all}");
        assert_eq!(e.line, Some(10), "{all}");
        assert_eq!(e.field.as_deref(), Some("records[0].path"));
        assert!(ends_with_file(&e, "site.toml"));
    }

    #[test]
    fn missing_mapped_column_points_at_the_csv_header() {
        let bad = format!("{GOOD_SITE}\n[records.columns]\nta = \"Alkalinity\"\n");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(
            e.message.contains("column `Alkalinity` (mapped to `ta`"),
            "{all}"
        );
        assert!(ends_with_file(&e, "bottles.csv"), "{all}");
        assert_eq!(e.line, Some(1), "{all}");
        assert_eq!(e.field.as_deref(), Some("records[0].columns.ta"));
        assert!(e.help.as_deref().unwrap_or("").contains("`ta`"), "{all}");
    }

    #[test]
    fn non_numeric_cell_names_line_column_and_field() {
        let csv = GOOD_CSV.replace("2352,2012", "23x52,2012");
        let (e, all) = first_error(GOOD_SITE, &csv);
        assert!(e.message.contains("`23x52` is not a number"), "{all}");
        assert!(ends_with_file(&e, "bottles.csv"));
        assert_eq!((e.line, e.column), (Some(3), Some(26)), "{all}");
        assert_eq!(e.field.as_deref(), Some("ta"));
    }

    #[test]
    fn impossible_date() {
        let csv = GOOD_CSV.replace("2024-01-12", "2024-02-30");
        let (e, all) = first_error(GOOD_SITE, &csv);
        assert!(ends_with_file(&e, "bottles.csv"), "{all}");
        assert!(e.message.contains("February 2024 has 29 days"), "{all}");
        assert_eq!((e.line, e.column), (Some(4), Some(1)), "{all}");
        assert_eq!(e.field.as_deref(), Some("date"));
    }

    #[test]
    fn unknown_unit_lists_valid_units() {
        let bad = format!("{GOOD_SITE}\n[records.units]\nta = \"umol/g\"\n");
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(ends_with_file(&e, "site.toml"), "{all}");
        assert!(e.message.contains("unknown value \"umol/g\""), "{all}");
        assert_eq!((e.line, e.column), (Some(14), Some(6)), "{all}");
        assert_eq!(e.field.as_deref(), Some("records[0].units.ta"), "{all}");
        assert!(
            e.help.as_deref().unwrap_or("").contains("`umol/kg`"),
            "{all}"
        );
    }

    #[test]
    fn every_row_error_is_listed() {
        let csv = GOOD_CSV
            .replace("27.0", "abc")
            .replace("2024-01-11", "11/01/2024");
        let (_dir, p) = site_with(GOOD_SITE, &csv);
        let ds = load_site_at(&p, now()).err().unwrap_or_default();
        assert_eq!(ds.count(Severity::Error), 2, "{ds}");
        let lines: Vec<_> = ds
            .iter()
            .filter(|d| d.is_error())
            .filter_map(|d| d.line)
            .collect();
        assert_eq!(lines, vec![2, 3]);
    }

    #[test]
    fn future_dates_and_duplicates() {
        let csv = GOOD_CSV.replace("2024-01-12", "2026-01-12");
        let (e, all) = first_error(GOOD_SITE, &csv);
        assert!(e.message.contains("in the future"), "{all}");
        assert_eq!(e.line, Some(4));

        let dup = format!("{GOOD_CSV}2024-01-11,A,27.1,35.3,3,2352,2012\n");
        let (_dir, p) = site_with(GOOD_SITE, &dup);
        let ls = load_site_at(&p, now()).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ls.samples.len(), 3);
        let d = ls
            .findings
            .iter()
            .find(|d| d.message.contains("duplicate of line 3"))
            .unwrap_or_else(|| panic!("{}", ls.findings));
        assert_eq!(d.line, Some(5));
    }

    #[test]
    fn seasons_must_cover_each_month_once_and_keep_file_order() {
        let bad = format!(
            "{GOOD_SITE}\n[seasons]\nwet = [11, 12, 1, 2, 3, 4]\ndry = [5, 6, 7, 8, 9, 11]\n"
        );
        let (e, all) = first_error(&bad, GOOD_CSV);
        assert!(
            e.message
                .contains("Nov is in season `wet` and again in `dry`"),
            "{all}"
        );
        assert_eq!((e.line, e.column), (Some(15), Some(23)), "{all}");
        assert!(all.contains("Oct"), "{all}");

        let ok = format!(
            "{GOOD_SITE}\n[seasons]\nwet = [11, 12, 1, 2, 3, 4]\ndry = [\"May\", \"Jun\", 7, 8, 9, 10]\n"
        );
        let (_dir, p) = site_with(&ok, GOOD_CSV);
        let ls = load_site_at(&p, now()).unwrap_or_else(|e| panic!("{e}"));
        let names: Vec<_> = ls.seasons.iter().map(|s| s.name.as_str()).collect();
        assert_eq!(names, ["wet", "dry"]);
        assert!(ls.samples.iter().all(|s| s.season == 0));
    }

    #[test]
    fn unknown_pathway_and_method_get_suggestions() {
        let bad = format!(
            "{GOOD_SITE}\n[projection]\npathways = [\"SSP2-45\"]\n\n[chemistry]\nk1k2 = \"lueker200\"\n"
        );
        let (_dir, p) = site_with(&bad, GOOD_CSV);
        let ds = load_site_at(&p, now()).err().unwrap_or_default();
        let all = ds.to_string();
        assert!(
            all.contains("unknown pathway `SSP2-45`") && all.contains("did you mean `SSP2-4.5`?"),
            "{all}"
        );
        assert!(
            all.contains("unknown method `lueker200`")
                && all.contains("did you mean `lueker2000`?"),
            "{all}"
        );
        assert_eq!(ds.count(Severity::Error), 2);
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
