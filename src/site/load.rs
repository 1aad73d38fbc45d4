//! The stages of [`super::load_site_at`]: read every record, drop duplicates, convert units,
//! fit the TA–salinity relationship and solve, summarise, compute the baseline. Each stage
//! adds typed row findings; the run stops after a stage that found an error.

use std::collections::{BTreeMap, HashMap};
use std::ops::Range;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use chrono::{DateTime, Utc};

use super::baseline::{self, Baseline, TaSalinityFit};
use super::findings::{Finding, FindingKind, has_error};
use super::records::{self, Columns, FileUnits, ReadContext, Stations, TaModel};
use super::schema::{self, Co2Kind, ConcUnit, PhScaleName, RecordKind, SiteFile};
use super::validate::Resolved;
use super::{LoadFailure, Pair, RecordSummary, RowFlags, Sample, qc};
use crate::diag::{Diagnostic, Diagnostics, Severity};

/// Reads the site file as UTF-8 text (an error naming the first bad byte otherwise).
pub(super) fn read_site_text(path: &Path) -> Result<String, Diagnostics> {
    let bytes = std::fs::read(path).map_err(|e| {
        Diagnostics::from(
            Diagnostic::error(format!("cannot read the site file: {e}"))
                .with_file(path)
                .with_help(
                    "give the path of a site TOML file (create one with `calcisite init DIR`)",
                ),
        )
    })?;
    String::from_utf8(bytes).map_err(|e| {
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
    })
}

/// The state of one load between stages.
pub(super) struct Run<'a> {
    path: &'a Path,
    site: &'a SiteFile,
    res: &'a Resolved,
    /// Site-level diagnostics so far (validation warnings first).
    diags: Diagnostics,
    samples: Vec<Sample>,
    /// Rows marked for dropping (same indices as `samples`).
    drop: Vec<bool>,
    /// Sample index range of each record file.
    ranges: Vec<Range<usize>>,
    columns: Vec<Option<Columns>>,
    units: Vec<FileUnits>,
    findings: Vec<Finding>,
    ta_fit: Option<TaSalinityFit>,
    /// Per-file notes (assumptions made for a record), listed last.
    notes: Diagnostics,
}

/// True when `smp` is a row of offshore source water under `site`'s marks
/// (`record_paths`: the resolved paths of the record files).
fn is_source_row(site: &SiteFile, record_paths: &[PathBuf], smp: &Sample) -> bool {
    let by_station = site
        .source_water
        .as_ref()
        .and_then(|s| s.station.as_deref())
        .is_some_and(|st| st == &*smp.station);
    by_station
        || site
            .records
            .iter()
            .zip(record_paths)
            .any(|(r, p)| r.source_water && p.as_path() == &*smp.source_file)
}

/// What a finished run gives the loaded site.
pub(super) struct Output {
    pub samples: Vec<Sample>,
    /// Rows of offshore source water, apart from the reef's.
    pub source_samples: Vec<Sample>,
    pub findings: Diagnostics,
    pub qc: Vec<Finding>,
    pub qc_position: usize,
    pub baseline: Baseline,
    pub records: Vec<RecordSummary>,
    pub input_files: Vec<PathBuf>,
}

impl<'a> Run<'a> {
    pub fn new(path: &'a Path, site: &'a SiteFile, res: &'a Resolved, diags: Diagnostics) -> Self {
        Run {
            path,
            site,
            res,
            diags,
            samples: Vec::new(),
            drop: Vec::new(),
            ranges: Vec::new(),
            columns: Vec::new(),
            units: Vec::new(),
            findings: Vec::new(),
            ta_fit: None,
            notes: Diagnostics::new(),
        }
    }

    /// True for a row of offshore source water (a file marked `source_water = true` or the
    /// station named in `[source_water]`): kept apart from the reef's baseline, TA–salinity
    /// fit and outlook.
    fn is_source_row(&self, smp: &Sample) -> bool {
        is_source_row(self.site, &self.res.record_paths, smp)
    }

    fn file(&self, i: usize) -> PathBuf {
        self.res.record_paths.get(i).cloned().unwrap_or_default()
    }

    /// Reads every record file into samples (values in the files' units).
    pub fn read_all(&mut self, now: DateTime<Utc>) {
        let s = &self.site.site;
        let default_station: Arc<str> = Arc::from(s.name.as_str());
        let mid_depth = 0.5 * (s.depth_min_m + s.depth_max_m);
        let mut stations = Stations::default();
        for (i, spec) in self.site.records.iter().enumerate() {
            let ctx = ReadContext {
                file_index: i,
                path: Arc::from(self.file(i).as_path()),
                spec,
                spec_index: i,
                utc_offset: self.res.utc_offset,
                season_of_month: self.res.season_of_month,
                default_pressure_dbar: spec.depth_m.unwrap_or(mid_depth),
                default_station: default_station.clone(),
                now,
            };
            let start = self.samples.len();
            let cols =
                records::read_record(&ctx, &mut stations, &mut self.samples, &mut self.findings);
            self.ranges.push(start..self.samples.len());
            self.columns.push(cols);
        }
        self.drop = vec![false; self.samples.len()];
        self.units = self
            .site
            .records
            .iter()
            .zip(&self.columns)
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
    }

    /// Fails with every finding so far when any is an error.
    pub fn stop_on_errors(&mut self) -> Result<(), LoadFailure> {
        if !has_error(&self.findings) {
            return Ok(());
        }
        let rows_position = self.diags.len();
        Err(LoadFailure {
            diagnostics: std::mem::take(&mut self.diags),
            rows: self.located_findings(),
            rows_position,
        })
    }

    /// The findings with the cell of each finding that names a quantity but no cell (those
    /// found after unit conversion or solving), so that every row finding points at its cell.
    fn located_findings(&mut self) -> Vec<Finding> {
        let mut findings = std::mem::take(&mut self.findings);
        for f in &mut findings {
            if f.line > 0 && f.cell.is_none() {
                let cols = self.columns.get(f.file_index).and_then(Option::as_ref);
                f.cell = cols.and_then(|c| f.field.as_deref().and_then(|k| c.index_of(k)));
            }
        }
        findings.sort_by_key(|f| (f.severity, f.file_index, f.line));
        findings
    }

    /// Marks later duplicates (same station, time and pressure) for dropping.
    pub fn drop_duplicates(&mut self) {
        let ranges = &self.ranges;
        let file_of = |i: usize| ranges.iter().position(|r| r.contains(&i)).unwrap_or(0);
        let found = qc::duplicates(&self.samples, &mut self.drop, &file_of);
        self.findings.extend(found);
    }

    /// Converts every file's values to the canonical units.
    pub fn convert_all(&mut self) {
        let s = &self.site.site;
        for (i, r) in self.ranges.iter().enumerate() {
            let (Some(u), Some(sl), Some(dl)) = (
                self.units.get(i),
                self.samples.get_mut(r.clone()),
                self.drop.get_mut(r.clone()),
            ) else {
                continue;
            };
            self.findings.extend(records::convert_units(
                sl,
                dl,
                *u,
                s.longitude_deg,
                s.latitude_deg,
                i,
            ));
        }
    }

    /// Fits the TA–salinity relationship over the kept bottle rows, then solves every file.
    pub fn solve_all(&mut self) {
        let kept_bottles: Vec<(f64, f64)> = self
            .samples
            .iter()
            .zip(&self.drop)
            .filter(|(s, d)| !**d && s.kind == RecordKind::Bottle && !self.is_source_row(s))
            .filter_map(|(s, _)| s.measured.ta().map(|ta| (s.salinity, ta)))
            .collect();
        self.ta_fit = TaSalinityFit::fit(&kept_bottles);
        let ta_model = self.ta_fit.map(|f| f.as_model());
        for i in 0..self.ranges.len() {
            self.solve_file(i, ta_model);
        }
    }

    fn solve_file(&mut self, i: usize, ta_model: Option<TaModel>) {
        let (Some(r), Some(u), Some(Some(cols)), Some(spec)) = (
            self.ranges.get(i).cloned(),
            self.units.get(i).copied(),
            self.columns.get(i),
            self.site.records.get(i),
        ) else {
            return;
        };
        let file = self.file(i);
        if cols.carbonate_columns() == 1 && cols.has_ta() {
            self.notes.push(
                Diagnostic::note(
                    "this record has TA only: its rows feed the TA statistics and the TA–salinity relationship, and are not solved",
                )
                .with_file(&file),
            );
            return;
        }
        if !cols.has_ta() && cols.carbonate_columns() == 1 && ta_model.is_none() {
            self.findings.push(
                Finding::new(
                    Severity::Error,
                    FindingKind::NoPair,
                    i,
                    Arc::from(file.as_path()),
                    0,
                    format!(
                        "this record has only one carbonate quantity and the site has fewer than {} bottle samples with TA for a TA–salinity relationship",
                        baseline::MIN_TA_FIT_SAMPLES
                    ),
                )
                .with_field(format!("records[{i}]"))
                .with_help("add a bottle record with TA and salinity from the same site, or a second carbonate column"),
            );
            return;
        }
        let has_depth = has_depth_column(cols, spec);
        let has_pressure = spec.columns.pressure_dbar.is_some()
            || cols.headers.iter().any(|h| h == "pressure_dbar");
        let (Some(sl), Some(dl)) = (self.samples.get_mut(r.clone()), self.drop.get_mut(r)) else {
            return;
        };
        self.findings.extend(records::solve_samples(
            sl,
            dl,
            u,
            &self.res.methods,
            ta_model,
            i,
        ));
        self.file_notes(&file, spec, u, has_depth, has_pressure);
    }

    /// Notes on the assumptions made for one record file.
    fn file_notes(
        &mut self,
        file: &Path,
        spec: &schema::RecordSpec,
        u: FileUnits,
        has_depth: bool,
        has_pressure: bool,
    ) {
        let s = &self.site.site;
        let mid_depth = 0.5 * (s.depth_min_m + s.depth_max_m);
        let notes = &mut self.notes;
        if has_depth {
            notes.push(
                Diagnostic::note("depths in m are taken as the same number of dbar (1 m ≈ 1 dbar)")
                    .with_file(file),
            );
        } else if !has_pressure {
            let d = spec.depth_m.unwrap_or(mid_depth);
            notes.push(
                Diagnostic::note(format!(
                    "the record has no depth or pressure column: every row is taken at {d} m ({d} dbar){}",
                    if spec.depth_m.is_some() { "" } else { ", the middle of the site's depth range" }
                ))
                .with_file(file),
            );
        }
        let conc_l = [u.ta, u.dic, u.silicate, u.phosphate].contains(&ConcUnit::UmolPerL);
        if conc_l {
            notes.push(
                Diagnostic::note("µmol/L values were converted to µmol/kg with the TEOS-10 density at each sample's temperature, salinity and pressure")
                    .with_file(file),
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
                    .with_file(file),
            );
        }
        if u.co2 == Co2Kind::Xco2Ppm {
            notes.push(
                Diagnostic::note("xCO2 (ppm, dry air) was converted to pCO2 at 1 atm with the water vapour pressure of Weiss & Price (1980)")
                    .with_file(file),
            );
        }
    }

    /// Flags rows below the salinity floor (left out of baseline and outlook) and brackish
    /// rows; adds the site-level finding about brackish water.
    pub fn apply_salinity_floor(&mut self) {
        let floor = self.site.baseline.salinity_floor();
        let ranges = &self.ranges;
        let file_of = |i: usize| ranges.iter().position(|r| r.contains(&i)).unwrap_or(0);
        let (rows, site) =
            super::brackish::apply(&mut self.samples, &self.drop, floor, &file_of, self.path);
        self.findings.extend(rows);
        if let Some(d) = site {
            self.diags.push(d);
        }
    }

    /// What each record file contributed (kept rows only).
    pub fn summaries(&self) -> Vec<RecordSummary> {
        let mut summaries: Vec<RecordSummary> = self
            .site
            .records
            .iter()
            .zip(&self.res.record_paths)
            .enumerate()
            .map(|(i, (r, p))| RecordSummary {
                path: p.clone(),
                kind: r.kind,
                rows: 0,
                solved: 0,
                ta_estimated: 0,
                first: None,
                last: None,
                sub_daily: false,
                rows_per_season: vec![0; self.res.seasons.len()],
                pairs: BTreeMap::new(),
                below_salinity_floor: 0,
                conversions: self.conversions(i, r),
            })
            .collect();
        for (sum, r) in summaries.iter_mut().zip(&self.ranges) {
            let (Some(sl), Some(dl)) = (self.samples.get(r.clone()), self.drop.get(r.clone()))
            else {
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
        summaries
    }

    /// The conversions applied to record file `i` (as its notes in [`Run::file_notes`] say).
    fn conversions(&self, i: usize, spec: &schema::RecordSpec) -> super::Conversions {
        let u = self.units.get(i).copied();
        let depth = match self.columns.get(i) {
            Some(Some(cols)) => has_depth_column(cols, spec),
            _ => false,
        };
        super::Conversions {
            ta: u.map_or(ConcUnit::UmolPerKg, |u| u.ta),
            dic: u.map_or(ConcUnit::UmolPerKg, |u| u.dic),
            ph_scale: u.map_or(PhScaleName::Total, |u| u.ph),
            xco2: u.is_some_and(|u| u.co2 == Co2Kind::Xco2Ppm),
            depth_as_pressure: depth,
        }
    }

    /// Drops the marked rows, computes the baseline and gathers the site-level findings.
    pub fn finish(mut self, summaries: Vec<RecordSummary>) -> Result<Output, LoadFailure> {
        let mut samples = std::mem::take(&mut self.samples);
        records::retain_kept(&mut samples, &self.drop);
        let (source_samples, samples): (Vec<Sample>, Vec<Sample>) =
            samples.into_iter().partition(|smp| self.is_source_row(smp));
        let baseline = baseline::compute(
            &samples,
            &self.res.seasons,
            self.res.utc_offset,
            self.ta_fit,
            &self.site.baseline,
        );
        let mut diags = std::mem::take(&mut self.diags);
        if let Some(w) = thin_seasons(&baseline, self.path) {
            diags.push(w);
        }
        let qc_position = diags.len();
        let qc = self.located_findings();
        let n_est: usize = summaries.iter().map(|s| s.ta_estimated).sum();
        if let (Some(f), true) = (self.ta_fit, n_est > 0) {
            let how = f.describe_model();
            diags.push(
                Diagnostic::note(format!(
                    "assumption: {n_est} rows without measured TA take TA from the site's bottle samples: {how}"
                ))
                .with_file(self.path),
            );
        }
        if self.site.baseline.net_calcification_kg_m2_yr.is_none() {
            diags.push(
                Diagnostic::note(
                    "no measured net calcification in [baseline]: the outlook gives calcification as a relative change only, not as a rate for this site",
                )
                .with_help("give net_calcification_kg_m2_yr with its source (e.g. an alkalinity-anomaly or census study of the site) for absolute rates")
                .with_file(self.path)
                .with_field("baseline.net_calcification_kg_m2_yr"),
            );
        }
        diags.extend(std::mem::take(&mut self.notes));
        if diags.has_errors() || has_error(&qc) {
            return Err(LoadFailure {
                diagnostics: diags,
                rows: qc,
                rows_position: qc_position,
            });
        }
        let mut input_files = vec![self.path.to_path_buf()];
        input_files.extend(self.res.record_paths.iter().cloned());
        Ok(Output {
            samples,
            source_samples,
            findings: diags,
            qc,
            qc_position,
            baseline,
            records: summaries,
            input_files,
        })
    }
}

/// Whether a record file gives depths (in m, taken as dbar).
fn has_depth_column(cols: &Columns, spec: &schema::RecordSpec) -> bool {
    cols.headers.iter().any(|h| h == "depth_m") || spec.columns.depth_m.is_some()
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
    sum.below_salinity_floor += usize::from(smp.flags.contains(RowFlags::BELOW_SALINITY_FLOOR));
}

/// One warning naming every season with too few solved samples.
fn thin_seasons(baseline: &Baseline, path: &Path) -> Option<Diagnostic> {
    let thin: Vec<String> = baseline
        .seasons
        .iter()
        .filter(|sb| sb.n_solved < qc::MIN_SEASON_SAMPLES)
        .map(|sb| format!("{} ({})", sb.name, sb.n_solved))
        .collect();
    if thin.is_empty() {
        return None;
    }
    Some(
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
    )
}
