//! Filling the [`ReportModel`] from the site stage ([`LoadedSite`]) and the outlook stage
//! ([`Outlook`]). Pure data mapping: no numbers are computed here that `check` or `project`
//! do not also give, so the PDF and the machine-readable outputs always agree.

use std::collections::BTreeSet;
use std::path::Path;

use chrono::{Datelike, Timelike};

use super::model::*;
use crate::outlook::Outlook;
use crate::site::LoadedSite;
use crate::site::baseline::Stats;
use crate::site::schema::{MONTH_NAMES, RecordKind};

mod appendix;
mod exposure;
mod from_outlook;
mod thermal;

use from_outlook::{horizons, pathway_list, reader_text, threshold_classes};

/// Per season while counting coverage: solved samples, years, first and last date.
type SeasonTally = (usize, BTreeSet<i32>, Option<String>, Option<String>);

/// The title of a comparison of several sites.
pub const COMPARISON_TITLE: &str =
    "Candidate reef sites compared: carbonate chemistry feasibility screening";

/// One site ready for the report: what `check` loaded and what `project` computed.
pub struct SiteRun<'a> {
    pub loaded: &'a LoadedSite,
    pub outlook: &'a Outlook,
}

/// Options of the report that do not come from the site files.
pub struct BuildOptions {
    /// Include every sample in a chemistry appendix.
    pub appendix: bool,
    /// The command line as typed, for the reproducibility section.
    pub command: Option<String>,
}

/// Build the report model for one site or a comparison of several.
pub fn build_model(runs: &[SiteRun<'_>], opts: &BuildOptions) -> Result<ReportModel, String> {
    let first = runs.first().ok_or("no site to report on")?;
    let first_site = &first.loaded.site;
    let title = if runs.len() == 1 {
        first_site.report.title.clone().unwrap_or_else(|| {
            format!(
                "Carbonate chemistry feasibility screening: {}",
                first_site.site.name
            )
        })
    } else {
        COMPARISON_TITLE.to_string()
    };
    // One site: its region. Several: their common region, if they share one (the site names
    // are listed on the first page anyway).
    let subtitle = if runs.len() == 1 {
        first_site.site.region.clone()
    } else {
        let region = first_site.site.region.clone();
        region.filter(|r| {
            runs.iter()
                .all(|x| x.loaded.site.site.region.as_ref() == Some(r))
        })
    };

    let timestamp = report_time(runs)?;
    let thresholds = threshold_classes(first.outlook);
    let horizons = horizons(&first.outlook.settings.horizon_years);
    let pathways = pathway_list(runs);

    let mut sites = Vec::with_capacity(runs.len());
    let mut inputs = Vec::new();
    // Site files are named relative to the first site file's folder (as in the command line),
    // every other input relative to its own site file (as written there).
    let first_folder = folder_of(&first.loaded.path);
    for run in runs {
        sites.push(site_report(run, &horizons, opts.appendix)?);
        let folder = folder_of(&run.loaded.path);
        let logger = run.outlook.heat.as_ref().and_then(|h| match &h.source {
            crate::site::temperature::ThermalSource::Logger { path, .. } => Some(path),
            crate::site::temperature::ThermalSource::SensorRecords { .. } => None,
        });
        for (i, path) in run.loaded.input_files.iter().enumerate() {
            let role = if i == 0 {
                "site file"
            } else if Some(path) == logger {
                "temperature logger"
            } else {
                "records"
            };
            let mut f = InputFile::hash(role, path)
                .map_err(|e| format!("{}: cannot read for its checksum: {e}", path.display()))?;
            f.path = shown_path(if i == 0 { first_folder } else { folder }, path);
            inputs.push(f);
        }
    }

    let settings = &first.outlook.settings;
    let mut repro_settings = vec![
        setting("Ensemble members", settings.members.to_string()),
        setting("Seed", settings.seed.to_string()),
        setting("Disequilibrium", settings.disequilibrium.clone()),
        setting("Warming", from_outlook::warming_text(first.outlook)),
        setting(
            "Constant uncertainties",
            settings.constants_uncertainty.clone(),
        ),
        setting(
            "Measurement uncertainties",
            measurement_text(first.loaded, &settings.measurement_uncertainty),
        ),
        setting("Record variability", settings.record_variability.clone()),
    ];
    // The outlook's texts in the report's symbols and units (as under Methods).
    for s in &mut repro_settings {
        s.value = reader_text(&s.value);
    }
    for run in runs {
        // The selectable fits by their citations (the site file's identifiers are not words
        // for readers).
        let chosen: Vec<String> = run
            .loaded
            .methods
            .citations()
            .into_iter()
            .filter(|(quantity, _)| ["K1, K2", "Total boron", "KF"].contains(&quantity.as_str()))
            .map(|(quantity, citation)| format!("{quantity} {citation}"))
            .collect();
        repro_settings.push(setting(
            &format!("Constant set ({})", run.loaded.site.site.name),
            chosen.join("; "),
        ));
    }

    let mut extra_limitations = vec![
        "Projections hold each record's alkalinity and salinity at their measured values \
         (plus any local scenario); changes in river input, reef metabolism or circulation \
         over the decades are not modelled."
            .to_string(),
        "Atmospheric CO2 follows global-mean pathways; the site's air–sea disequilibrium is \
         assumed to persist as measured."
            .to_string(),
    ];
    if !settings.warming {
        extra_limitations.push(
            "Ocean warming is switched off for the chemistry projections: temperatures stay at \
             the measured values. Warming raises Ω_ar (by about +0.2 to +0.3 by 2100 under the \
             high pathways, half a habitat class), lowers calcification in the \
             temperature-dependent rate law, and the thermal-stress outlook still adds it."
                .to_string(),
        );
    }

    Ok(ReportModel {
        title,
        subtitle,
        prepared_for: first_site
            .report
            .prepared_for
            .clone()
            .filter(|s| !s.is_empty()),
        prepared_by: first_site
            .report
            .prepared_by
            .clone()
            .filter(|s| !s.is_empty()),
        tool: ToolInfo {
            name: "calcisite".to_string(),
            version: env!("CARGO_PKG_VERSION").to_string(),
        },
        timestamp,
        thresholds,
        horizons,
        pathways,
        sites,
        ranking_pathway: None,
        extra_limitations,
        reproducibility: Reproducibility {
            command: opts.command.clone(),
            inputs,
            settings: repro_settings,
            seed: settings.seed,
            ensemble_members: settings.members,
        },
        include_appendix: opts.appendix,
        data_out: None,
        summary_only: Vec::new(),
    })
}

/// The measurement-uncertainty setting in the report's words, saying so when the site uses the
/// built-in pH or pCO2 uncertainty (values recalled, not checked against a published source).
fn measurement_text(loaded: &LoadedSite, outlook_text: &str) -> String {
    let given = &loaded.site.uncertainty;
    let built_in = crate::site::schema::UncertaintySpec::default();
    let mut unchecked = Vec::new();
    if (given.ph - built_in.ph).abs() < 1e-12 {
        unchecked.push(format!("pH uncertainty of {}", built_in.ph));
    }
    if (given.pco2_pct - built_in.pco2_pct).abs() < 1e-12 {
        unchecked.push(format!("pCO₂/fCO₂ uncertainty of {} %", built_in.pco2_pct));
    }
    let text = reader_text(outlook_text);
    if unchecked.is_empty() {
        text
    } else {
        format!(
            "{text}. The built-in {} were not checked against a published source.",
            unchecked.join(" and ")
        )
    }
}

/// The folder of a site file ("." for a bare file name).
fn folder_of(site: &Path) -> &Path {
    site.parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."))
}

/// A file as the report names it: relative to `folder`, never with a folder of this machine.
fn shown_path(folder: &Path, path: &Path) -> String {
    crate::fsio::relative_to(folder, path).display().to_string()
}

fn setting(name: &str, value: String) -> Setting {
    Setting {
        name: name.to_string(),
        value,
    }
}

/// The report date: the first site's `[report] date`, else the newest sample time (UTC),
/// so that the same inputs always give the same date.
fn report_time(runs: &[SiteRun<'_>]) -> Result<ReportTime, String> {
    if let Some(date) = runs.iter().find_map(|r| r.loaded.site.report.date.clone()) {
        let d = chrono::NaiveDate::parse_from_str(date.trim(), "%Y-%m-%d").map_err(|_| {
            format!("[report] date = {date:?} is not a date of the form YYYY-MM-DD")
        })?;
        return ReportTime::from_ymd(d.year(), d.month() as u8, d.day() as u8)
            .ok_or_else(|| format!("[report] date = {date:?} is out of range"));
    }
    let newest = runs
        .iter()
        .flat_map(|r| r.loaded.samples.iter().map(|s| s.time.to_utc()))
        .max()
        .ok_or("the sites have no samples to date the report by")?;
    Ok(ReportTime {
        year: newest.year(),
        month: newest.month() as u8,
        day: newest.day() as u8,
        hour: newest.hour() as u8,
        minute: newest.minute() as u8,
        second: newest.second() as u8,
    })
}

fn stat(s: &Stats) -> Option<Stat> {
    Some(Stat {
        mean: s.mean?,
        sd: s.sd.unwrap_or(0.0),
        min: s.min?,
        max: s.max?,
    })
}

fn months_text(months: &[u32]) -> String {
    months
        .iter()
        .filter_map(|m| MONTH_NAMES.get((*m as usize).wrapping_sub(1)))
        .copied()
        .collect::<Vec<_>>()
        .join(", ")
}

/// Findings grouped by kind: the first message of each group stands for it, with the number of
/// rows and, per file, their line numbers (runs of consecutive lines shortened). Site-level
/// findings group by their message with the numbers masked; typed row findings
/// (`LoadedSite::qc`) group by severity, kind and field, so a long sensor series gives one
/// line per kind of finding.
fn grouped_findings(loaded: &LoadedSite) -> Vec<QcFinding> {
    let folder = folder_of(&loaded.path);
    let display_path = |p: &Path| shown_path(folder, p);
    struct Group {
        key: String,
        level: QcLevel,
        message: String,
        /// (file, lines) in order of first appearance.
        files: Vec<(Option<String>, Vec<usize>)>,
        count: usize,
    }
    fn add(
        groups: &mut Vec<Group>,
        key: String,
        severity: crate::diag::Severity,
        message: &str,
        file: Option<String>,
        line: Option<usize>,
    ) {
        let level = match severity {
            crate::diag::Severity::Error | crate::diag::Severity::Warning => QcLevel::Warning,
            crate::diag::Severity::Note => QcLevel::Note,
        };
        let i = match groups.iter().position(|g| g.key == key) {
            Some(i) => i,
            None => {
                groups.push(Group {
                    key,
                    level,
                    message: message.to_string(),
                    files: Vec::new(),
                    count: 0,
                });
                groups.len() - 1
            }
        };
        if let Some(g) = groups.get_mut(i) {
            g.count += 1;
            match g.files.iter_mut().find(|(f, _)| *f == file) {
                Some((_, l)) => l.extend(line),
                None => g.files.push((file, line.into_iter().collect())),
            }
        }
    }
    let mut groups: Vec<Group> = Vec::new();
    let site = loaded.findings.as_slice();
    let (before, after) = site.split_at(loaded.qc_position.min(site.len()));
    let site_level = |groups: &mut Vec<Group>, ds: &[crate::diag::Diagnostic]| {
        for d in ds {
            // Site-level diagnostics are few and each says something of its own: only
            // repeats of the very same finding (same severity, field and words) are merged.
            // Nothing here reads numbers or meaning out of the message.
            let key = format!(
                "site:{:?}:{}:{}",
                d.severity,
                d.field.as_deref().unwrap_or(""),
                d.message
            );
            let file = d.file.as_deref().map(display_path);
            add(groups, key, d.severity, &d.message, file, d.line);
        }
    };
    site_level(&mut groups, before);
    for f in &loaded.qc {
        let key = format!(
            "row:{:?}:{}:{}",
            f.severity,
            f.kind.as_str(),
            f.field.as_deref().unwrap_or("")
        );
        let line = (f.line > 0).then_some(f.line);
        add(
            &mut groups,
            key,
            f.severity,
            &f.message,
            Some(display_path(&f.file)),
            line,
        );
    }
    site_level(&mut groups, after);
    groups
        .into_iter()
        .map(|g| {
            let places: Vec<String> = g
                .files
                .iter()
                .filter_map(|(f, lines)| match (f, lines.is_empty()) {
                    (Some(f), true) => Some(f.clone()),
                    (Some(f), false) => Some(format!("{f}: {}", line_ranges(lines))),
                    (None, _) => None,
                })
                .collect();
            let location = (!places.is_empty()).then(|| places.join("; "));
            let message = if g.count > 1 {
                format!("{} (the first of {} rows)", g.message.clone(), g.count)
            } else {
                g.message.clone()
            };
            QcFinding {
                level: g.level,
                count: g.count,
                message,
                location,
            }
        })
        .collect()
}

/// "12, 40–52, 60" from sorted or unsorted line numbers; at most six runs, then "…".
fn line_ranges(lines: &[usize]) -> String {
    let mut v = lines.to_vec();
    v.sort_unstable();
    v.dedup();
    let mut runs: Vec<(usize, usize)> = Vec::new();
    for l in v {
        match runs.last_mut() {
            Some((_, end)) if *end + 1 == l => *end = l,
            _ => runs.push((l, l)),
        }
    }
    let shown: Vec<String> = runs
        .iter()
        .take(6)
        .map(|&(a, b)| {
            if a == b {
                format!("line {a}")
            } else {
                format!("lines {a}–{b}")
            }
        })
        .collect();
    let more = if runs.len() > 6 {
        format!(" and {} more runs", runs.len() - 6)
    } else {
        String::new()
    };
    format!("{}{more}", shown.join(", "))
}

fn site_report(run: &SiteRun<'_>, horizons: &[i32], appendix: bool) -> Result<SiteReport, String> {
    let loaded = run.loaded;
    let outlook = run.outlook;
    let info = &loaded.site.site;
    let id = loaded
        .path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| info.name.clone());
    let coverage = coverage(loaded);

    // QC findings, grouped by kind (the message with its numbers masked) and file, so that
    // a long sensor series gives one line per kind of finding with its row count and lines.
    let qc = grouped_findings(loaded);
    let mut qc = qc;
    let unsolved = loaded.samples.iter().filter(|s| s.state.is_none()).count();
    if unsolved > 0 {
        qc.push(QcFinding {
            level: QcLevel::Excluded,
            count: unsolved,
            message: "rows kept in the record but not solved (no usable carbonate pair)".into(),
            location: None,
        });
    }

    let baseline = season_baselines(loaded);

    // The outlook, base case: per pathway and season, then calcification over all records.
    let season_labels: Vec<String> = loaded.seasons.iter().map(|s| s.name.clone()).collect();
    let projection = from_outlook::projection(outlook, &season_labels);
    let crossings = from_outlook::crossings(outlook);
    let probabilities = from_outlook::probabilities(outlook);
    let time_below = from_outlook::time_below(outlook);
    let (calcification, absolute_notes) = from_outlook::calcification(outlook);
    // Local scenarios: the limiting season's median at the table horizons.
    let limiting = baseline
        .iter()
        .min_by(|a, b| a.omega_ar.mean.total_cmp(&b.omega_ar.mean))
        .and_then(|b| {
            season_labels
                .iter()
                .position(|s| *s == b.season)
                .map(|i| (i, b.season.as_str()))
        });
    let local_scenarios = from_outlook::local_scenarios(outlook, limiting, horizons);
    let methods = methods(loaded, outlook, &absolute_notes);
    let samples = if appendix {
        appendix::sample_rows(loaded)
    } else {
        Vec::new()
    };

    let depth = if info.depth_min_m == info.depth_max_m {
        Some(info.depth_max_m)
    } else {
        Some((info.depth_min_m + info.depth_max_m) / 2.0)
    };
    Ok(SiteReport {
        id,
        name: info.name.clone(),
        location: info.region.clone(),
        latitude: Some(info.latitude_deg),
        longitude: Some(info.longitude_deg),
        depth_m: depth,
        habitat: Some(match &info.habitat {
            Some(h) => format!("{h}; {}–{} m", info.depth_min_m, info.depth_max_m),
            None => format!("{}–{} m", info.depth_min_m, info.depth_max_m),
        }),
        data_notice: loaded.site.report.notice.clone(),
        coverage,
        qc,
        baseline,
        limiting_season: None,
        projection,
        crossings,
        probabilities,
        time_below,
        calcification,
        local_scenarios,
        thermal: thermal::thermal(outlook),
        projection_rules: from_outlook::projection_rules(outlook),
        exposure: exposure::exposure(outlook),
        methods,
        record_files: appendix::record_files(loaded),
        samples,
        plan: plan(loaded),
        data_basis: data_basis(loaded),
    })
}

/// The site file's restoration plan and coral cover.
fn plan(loaded: &LoadedSite) -> SitePlan {
    let p = &loaded.site.plan;
    SitePlan {
        start_year: p.project_start_year,
        end_year: p.project_end_year,
        target_groups: p.target_groups.clone(),
        outplanting_area_m2: p.outplanting_area_m2,
        coral_cover_fraction: loaded.site.baseline.coral_cover_fraction,
    }
}

/// The records used, by kind, with the years they cover and how their TA was obtained.
fn data_basis(loaded: &LoadedSite) -> DataBasis {
    let mut b = DataBasis::default();
    for s in loaded.samples.iter().filter(|s| s.is_used()) {
        if s.kind == RecordKind::Sensor {
            b.sensor_used += 1;
        } else {
            b.bottle_used += 1;
        }
        let y = s.time.year();
        b.first_year = Some(b.first_year.map_or(y, |f| f.min(y)));
        b.last_year = Some(b.last_year.map_or(y, |l| l.max(y)));
        if s.ta_estimated {
            b.ta_estimated += 1;
        } else if s.measured.ta().is_some() {
            b.ta_measured += 1;
        }
    }
    b
}

/// Data coverage of the site's records, overall and per season.
fn coverage(loaded: &LoadedSite) -> Coverage {
    let mut stations = BTreeSet::new();
    let mut first = None;
    let mut last = None;
    let n_seasons = loaded.seasons.len();
    let mut per_season: Vec<SeasonTally> = vec![(0, BTreeSet::new(), None, None); n_seasons];
    let mut sorted_times: Vec<_> = loaded.samples.iter().map(|s| s.time).collect();
    sorted_times.sort();
    for s in &loaded.samples {
        stations.insert(s.station.to_string());
        let date = s.time.format("%Y-%m-%d").to_string();
        if first.as_ref().is_none_or(|f: &String| date < *f) {
            first = Some(date.clone());
        }
        if last.as_ref().is_none_or(|l: &String| date > *l) {
            last = Some(date.clone());
        }
        if let Some(slot) = per_season.get_mut(s.season) {
            if s.state.is_some() {
                slot.0 += 1;
            }
            slot.1.insert(s.time.year());
            if slot.2.as_ref().is_none_or(|f| date < *f) {
                slot.2 = Some(date.clone());
            }
            if slot.3.as_ref().is_none_or(|l| date > *l) {
                slot.3 = Some(date);
            }
        }
    }
    let rows_per_season = |i: usize| -> usize {
        loaded
            .records
            .iter()
            .map(|r| r.rows_per_season.get(i).copied().unwrap_or(0))
            .sum()
    };
    Coverage {
        record_files: loaded
            .records
            .iter()
            .map(|r| shown_path(folder_of(&loaded.path), &r.path))
            .collect(),
        n_records: loaded.records.iter().map(|r| r.rows).sum(),
        n_used: loaded.samples.iter().filter(|s| s.state.is_some()).count(),
        first_date: first.unwrap_or_default(),
        last_date: last.unwrap_or_default(),
        stations: stations.into_iter().collect(),
        seasons: loaded
            .seasons
            .iter()
            .enumerate()
            .map(|(i, season)| {
                let slot = per_season.get(i);
                SeasonCoverage {
                    season: season.name.clone(),
                    months: months_text(&season.months),
                    month_numbers: season.months.clone(),
                    n_records: rows_per_season(i),
                    n_used: slot.map_or(0, |s| s.0),
                    n_years: slot.map_or(0, |s| s.1.len()),
                    first_date: slot.and_then(|s| s.2.clone()),
                    last_date: slot.and_then(|s| s.3.clone()),
                }
            })
            .collect(),
    }
}

/// Per-season statistics of the records.
fn season_baselines(loaded: &LoadedSite) -> Vec<SeasonBaseline> {
    loaded
        .baseline
        .seasons
        .iter()
        .filter_map(|b| {
            Some(SeasonBaseline {
                season: b.name.clone(),
                n: b.n_solved,
                omega_ar: stat(&b.omega_ar)?,
                ph_t: stat(&b.ph_t)?,
                temp_c: stat(&b.temp_c)?,
                salinity: stat(&b.salinity),
                ta: stat(&b.ta_umol_kg),
                dic: stat(&b.dic_umol_kg),
                pco2: stat(&b.pco2_uatm),
                omega_ca: stat(&b.omega_ca),
            })
        })
        .collect()
}

/// The methods of one site: the chemistry's citations, the projection settings and notes.
fn methods(loaded: &LoadedSite, outlook: &Outlook, absolute_notes: &[String]) -> Methods {
    let chemistry: Vec<MethodEntry> = loaded
        .methods
        .method_citations()
        .into_iter()
        .map(|c| MethodEntry {
            quantity: c.quantity.to_string(),
            method: c.method.to_string(),
            citation: c.citation.to_string(),
        })
        .collect();
    let mut notes: Vec<String> = Vec::new();
    if let Some(fit) = &loaded.baseline.ta_salinity {
        let estimated = loaded.samples.iter().filter(|s| s.ta_estimated).count();
        notes.push(if estimated > 0 {
            format!(
                "{estimated} rows without measured TA take TA from the site's bottle samples: {}.",
                fit.describe_model()
            )
        } else {
            format!(
                "TA–salinity regression of the bottle samples: TA = {:.1} + {:.2}·S µmol/kg (n {}, r² {:.2}, S {:.2}–{:.2}); every row has measured TA, so it is not used.",
                fit.intercept_umol_kg, fit.slope, fit.n, fit.r2, fit.salinity_min, fit.salinity_max
            )
        });
    }
    notes.push(
        "Depths in metres are taken as that many decibars of hydrostatic pressure.".to_string(),
    );
    notes.extend(from_outlook::notes(outlook, absolute_notes));
    Methods {
        chemistry,
        projection: from_outlook::settings(outlook)
            .into_iter()
            .map(|s| match s.name.as_str() {
                "Measurement uncertainties" => setting(
                    &s.name,
                    measurement_text(loaded, &outlook.settings.measurement_uncertainty),
                ),
                _ => s,
            })
            .collect(),
        notes,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_runs_are_shortened() {
        assert_eq!(line_ranges(&[5, 3, 4, 9]), "lines 3–5, line 9");
        let many: Vec<usize> = (0..20).map(|i| i * 3).collect();
        assert!(line_ranges(&many).ends_with("and 14 more runs"));
    }
}
