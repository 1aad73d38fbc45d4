//! Filling the [`ReportModel`] from the site stage ([`LoadedSite`]) and the outlook stage
//! ([`Outlook`]). Pure data mapping: no numbers are computed here that `check` or `project`
//! do not also give, so the PDF and the machine-readable outputs always agree.

use std::collections::BTreeSet;
use std::path::Path;

use chrono::{Datelike, Timelike};

use super::model::*;
use crate::outlook::output::{CrossingKind, CrossingRow};
use crate::outlook::{Outlook, QUANTILE_LEVELS};
use crate::site::LoadedSite;
use crate::site::baseline::Stats;
use crate::site::schema::MONTH_NAMES;

/// The base case (no local scenario) in outlook rows.
const BASE_SCENARIO: &str = "none";
/// The all-records group of the outlook, used for calcification.
const ANNUAL: &str = crate::outlook::ensemble::AGGREGATE_LABEL;
/// Horizon years shown in the report's tables when the site projects them (the full series
/// stays in the figures and in `--data-out`).
const PREFERRED_HORIZONS: [i32; 5] = [2030, 2040, 2050, 2075, 2100];

/// Per season while counting coverage: solved samples, years, first and last date.
type SeasonTally = (usize, BTreeSet<i32>, Option<String>, Option<String>);

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
        "Candidate reef sites compared: carbonate chemistry feasibility screening".to_string()
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
    for run in runs {
        sites.push(site_report(run, &horizons, opts.appendix)?);
        for (i, path) in run.loaded.input_files.iter().enumerate() {
            let role = if i == 0 { "site file" } else { "records" };
            let f = InputFile::hash(role, path)
                .map_err(|e| format!("{}: cannot read for its checksum: {e}", path.display()))?;
            inputs.push(f);
        }
    }

    let settings = &first.outlook.settings;
    let mut repro_settings = vec![
        setting("Ensemble members", settings.members.to_string()),
        setting("Seed", settings.seed.to_string()),
        setting("Disequilibrium", settings.disequilibrium.clone()),
        setting(
            "Warming",
            if settings.warming { "on" } else { "off" }.to_string(),
        ),
        setting(
            "Constant uncertainties",
            settings.constants_uncertainty.clone(),
        ),
        setting(
            "Measurement uncertainties",
            settings.measurement_uncertainty.clone(),
        ),
        setting("Record variability", settings.record_variability.clone()),
    ];
    for run in runs {
        let m = &run.loaded.methods;
        repro_settings.push(setting(
            &format!("Constant set ({})", run.loaded.site.site.name),
            format!("K1/K2 {}, boron {}, KF {}", m.k1k2, m.boron, m.kf),
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
            "Ocean warming is switched off for these projections: temperatures stay at the \
             measured values. Warming raises Ω_ar slightly but brings thermal stress, which is \
             not assessed here."
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
    })
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

fn threshold_classes(outlook: &Outlook) -> ThresholdClasses {
    ThresholdClasses {
        levels: outlook
            .classes
            .bands
            .iter()
            .filter_map(|b| b.min_omega_ar)
            .collect(),
        labels: outlook
            .classes
            .bands
            .iter()
            .map(|b| b.name.clone())
            .collect(),
        citation: outlook.classes.source.clone(),
    }
}

/// Table horizons: the preferred years the projection has, else up to five of its years
/// spread evenly (always including the last).
fn horizons(years: &[i32]) -> Vec<i32> {
    let preferred: Vec<i32> = PREFERRED_HORIZONS
        .iter()
        .copied()
        .filter(|y| years.contains(y))
        .collect();
    if preferred.len() >= 2 {
        return preferred;
    }
    if years.len() <= 5 {
        return years.to_vec();
    }
    let n = years.len() - 1;
    let mut out: Vec<i32> = (0..5)
        .filter_map(|i| years.get(i * n / 4).copied())
        .collect();
    out.dedup();
    out
}

/// Every pathway of every site, in order of 2100 CO2 (lowest emissions first).
fn pathway_list(runs: &[SiteRun<'_>]) -> Vec<PathwayInfo> {
    let mut seen = BTreeSet::new();
    let mut list: Vec<(f64, PathwayInfo)> = Vec::new();
    for run in runs {
        let years = &run.outlook.settings.horizon_years;
        for p in &run.outlook.pathways {
            if !seen.insert(p.name.clone()) {
                continue;
            }
            let at = |y: i32| {
                years
                    .iter()
                    .position(|&v| v == y)
                    .and_then(|i| p.xco2_ppm.get(i))
            };
            let last = p.xco2_ppm.last().copied().unwrap_or(f64::NAN);
            let description = match (at(2050), years.last()) {
                (Some(v50), Some(&ly)) if ly != 2050 => {
                    Some(format!("{v50:.0} ppm CO2 in 2050, {last:.0} ppm in {ly}"))
                }
                (_, Some(&ly)) => Some(format!("{last:.0} ppm CO2 in {ly}")),
                _ => None,
            };
            list.push((
                last,
                PathwayInfo {
                    id: p.name.clone(),
                    label: p.name.clone(),
                    citation: p.source.clone(),
                    description,
                },
            ));
        }
    }
    list.sort_by(|a, b| a.0.total_cmp(&b.0));
    list.into_iter().map(|(_, p)| p).collect()
}

fn stat(s: &Stats) -> Option<Stat> {
    Some(Stat {
        mean: s.mean?,
        sd: s.sd.unwrap_or(0.0),
        min: s.min?,
        max: s.max?,
    })
}

fn quantiles(q: &[f64; 5]) -> Quantiles {
    debug_assert_eq!(QUANTILE_LEVELS, [5, 25, 50, 75, 95]);
    Quantiles {
        p05: q[0],
        p25: q[1],
        p50: q[2],
        p75: q[3],
        p95: q[4],
    }
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
            let key: String = d
                .message
                .chars()
                .map(|c| if c.is_ascii_digit() { '#' } else { c })
                .collect();
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
                format!(
                    "{} (the first of {} rows)",
                    tidy_numbers(&g.message),
                    g.count
                )
            } else {
                tidy_numbers(&g.message)
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

/// Rounds numbers written with more than six decimals (floating-point noise such as
/// "33.044000000000004" in messages from other stages) to at most six, trailing zeros dropped.
/// Other text is unchanged.
fn tidy_numbers(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let chars: Vec<char> = text.chars().collect();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        if c.is_ascii_digit() && (i == 0 || !chars[i - 1].is_ascii_alphanumeric()) {
            let start = i;
            while i < chars.len() && chars[i].is_ascii_digit() {
                i += 1;
            }
            if i + 1 < chars.len() && chars[i] == '.' && chars[i + 1].is_ascii_digit() {
                let dot = i;
                i += 1;
                while i < chars.len() && chars[i].is_ascii_digit() {
                    i += 1;
                }
                let token: String = chars[start..i].iter().collect();
                if i - dot - 1 > 6
                    && let Ok(v) = token.parse::<f64>()
                {
                    let s = format!("{v:.6}");
                    out.push_str(s.trim_end_matches('0').trim_end_matches('.'));
                } else {
                    out.push_str(&token);
                }
            } else {
                out.extend(&chars[start..i]);
            }
            continue;
        }
        out.push(c);
        i += 1;
    }
    out
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

/// A relationship's name for readers, from its citation: "Chan & Connolly (2013)", or the first
/// author and "et al." for three or more authors ("Silverman et al. (2009)"); the identifier
/// when the citation does not start with "Authors (year)".
fn relationship_name(id: &str, citation: &str) -> String {
    let Some((authors, rest)) = citation.split_once(" (") else {
        return id.to_string();
    };
    let year: String = rest.chars().take_while(char::is_ascii_digit).collect();
    if year.len() != 4 || !rest[year.len()..].starts_with(')') || authors.trim().is_empty() {
        return id.to_string();
    }
    let authors = if authors.contains(',') {
        let first = authors.split(',').next().unwrap_or(authors).trim();
        format!("{first} et al.")
    } else {
        authors.trim().to_string()
    };
    format!("{authors} ({year})")
}

/// "Ω_ar 1–5", or "Ω_ar ≥ 1" when the fitted range has no upper end.
fn omega_range_text((lo, hi): (f64, f64)) -> String {
    match (lo.is_finite(), hi.is_finite()) {
        (true, true) => format!("Ω_ar {lo}–{hi}"),
        (true, false) => format!("Ω_ar ≥ {lo}"),
        (false, true) => format!("Ω_ar ≤ {hi}"),
        (false, false) => "any Ω_ar".to_string(),
    }
}

/// A relationship's formula as plain text from the outlook stage ("G = k x (Omega_ar - 1)")
/// written with the report's symbols ("G = k × (Ω_ar − 1)").
fn formula_text(text: &str) -> String {
    text.replace("Omega_ar", "Ω_ar")
        .replace("Omega_b", "Ω_b")
        .replace("Omega", "Ω")
        .replace(" x ", " × ")
        .replace(" - ", " − ")
        .replace("= -", "= −")
        .replace("<=", "≤")
        .replace(">=", "≥")
        .replace("degC", "°C")
}

fn display_path(p: &Path) -> String {
    p.display().to_string()
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

    // Coverage.
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
    let coverage = Coverage {
        record_files: loaded
            .records
            .iter()
            .map(|r| display_path(&r.path))
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
                    n_records: rows_per_season(i),
                    n_used: slot.map_or(0, |s| s.0),
                    n_years: slot.map_or(0, |s| s.1.len()),
                    first_date: slot.and_then(|s| s.2.clone()),
                    last_date: slot.and_then(|s| s.3.clone()),
                }
            })
            .collect(),
    };

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

    // Seasonal baseline.
    let baseline: Vec<SeasonBaseline> = loaded
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
        .collect();

    // Projection per pathway and season (base case).
    let season_labels: Vec<String> = loaded.seasons.iter().map(|s| s.name.clone()).collect();
    let projection: Vec<PathwayProjection> = outlook
        .pathways
        .iter()
        .map(|p| PathwayProjection {
            pathway: p.name.clone(),
            seasons: season_labels
                .iter()
                .filter_map(|season| {
                    let omega = outlook.series(&p.name, BASE_SCENARIO, season, "omega_ar");
                    if omega.is_empty() {
                        return None;
                    }
                    let ph = outlook.series(&p.name, BASE_SCENARIO, season, "ph_t");
                    Some(SeasonSeries {
                        season: season.clone(),
                        points: omega
                            .iter()
                            .map(|(year, q)| ProjectionPoint {
                                year: *year,
                                omega_ar: quantiles(q),
                                ph_t: ph
                                    .iter()
                                    .find(|(y, _)| y == year)
                                    .map(|(_, q)| quantiles(q)),
                            })
                            .collect(),
                    })
                })
                .collect(),
        })
        .collect();

    let last_year = outlook
        .settings
        .horizon_years
        .last()
        .copied()
        .unwrap_or(2100);
    let crossing_year =
        |y: Option<i32>| y.map_or(CrossingYear::NotBy(last_year), CrossingYear::Year);
    let crossings: Vec<Crossing> = outlook
        .crossings
        .iter()
        .filter(|c: &&CrossingRow| {
            c.scenario == BASE_SCENARIO
                && c.kind == CrossingKind::OmegaArBelow
                && season_labels.contains(&c.season)
        })
        .map(|c| {
            let [early, median, late] = c.first_year;
            Crossing {
                pathway: c.pathway.clone(),
                season: c.season.clone(),
                threshold: c.threshold,
                median: if c.met_at_baseline {
                    CrossingYear::AlreadyBelow
                } else {
                    crossing_year(median)
                },
                early: if c.met_at_baseline {
                    CrossingYear::AlreadyBelow
                } else {
                    crossing_year(early)
                },
                late: crossing_year(late),
            }
        })
        .collect();

    let probabilities: Vec<BelowProbability> = outlook
        .probabilities
        .iter()
        .filter(|p| p.scenario == BASE_SCENARIO && season_labels.contains(&p.season))
        .map(|p| BelowProbability {
            pathway: p.pathway.clone(),
            year: p.year,
            season: p.season.clone(),
            threshold: p.threshold_omega_ar,
            percent: p.prob_below_pct,
        })
        .collect();

    // Calcification outlook: relative change over all records, per relationship.
    let baseline_rate = outlook.calcification_baseline_kg_m2_yr;
    // Absolute net calcification at the last year, per relationship (site-specific, so it goes
    // to the site's method notes rather than into the relationship's description).
    let mut absolute_notes: Vec<String> = Vec::new();
    let calcification: Vec<CalcificationOutlook> = outlook
        .relationships
        .iter()
        .map(|rel| {
            let quantity = format!("calc_change_pct_{}", rel.id);
            let absolute = format!("net_calc_kg_m2_yr_{}", rel.id);
            let series: Vec<CalcSeries> = outlook
                .pathways
                .iter()
                .map(|p| CalcSeries {
                    pathway: p.name.clone(),
                    points: outlook
                        .rows
                        .iter()
                        .filter(|r| {
                            r.pathway == p.name
                                && r.scenario == BASE_SCENARIO
                                && r.season == ANNUAL
                                && r.quantity == quantity
                        })
                        .map(|r| CalcPoint {
                            year: r.year,
                            value: quantiles(&r.q),
                            extrapolated: r.outside_fit_pct.is_some_and(|pct| pct > 0.0),
                        })
                        .collect(),
                })
                .collect();
            let mut last_year = None;
            let at_last: Vec<String> = outlook
                .pathways
                .iter()
                .filter_map(|p| {
                    let s = outlook.series(&p.name, BASE_SCENARIO, ANNUAL, &absolute);
                    let (y, q) = s.last()?;
                    last_year = Some(*y);
                    Some(format!("{} {:.2}", p.name, q[2]))
                })
                .collect();
            let temp = rel
                .temp_range_c
                .map(|(a, b)| format!(", {a}–{b} °C"))
                .unwrap_or_default();
            let name = relationship_name(rel.id, rel.source);
            if let Some(y) = last_year
                && !at_last.is_empty()
            {
                absolute_notes.push(format!("{name}: {} in {y}", at_last.join(", ")));
            }
            CalcificationOutlook {
                relationship: name,
                citation: rel.source.to_string(),
                unit: CalcUnit::PercentChange,
                valid_range: format!("{}{temp}", omega_range_text(rel.omega_range)),
                baseline: None,
                series,
                note: Some(format!(
                    "{} ({}). Source status: {}. Identifier in site files and in the tables \
                     of calcisite project: {}.",
                    formula_text(rel.form_text),
                    formula_text(rel.scope),
                    rel.status,
                    rel.id,
                )),
            }
        })
        .collect();

    // Local scenarios: the limiting-season median at the table horizons, beside the base case.
    let limiting = baseline
        .iter()
        .min_by(|a, b| a.omega_ar.mean.total_cmp(&b.omega_ar.mean))
        .map(|b| b.season.clone());
    let local_scenarios: Vec<LocalScenario> = outlook
        .scenarios
        .iter()
        .filter(|s| s.name != BASE_SCENARIO)
        .map(|s| {
            let season = limiting.clone().unwrap_or_else(|| ANNUAL.to_string());
            let mut rows = Vec::new();
            for p in &outlook.pathways {
                let with = outlook.series(&p.name, &s.name, &season, "omega_ar");
                let base = outlook.series(&p.name, BASE_SCENARIO, &season, "omega_ar");
                for &y in horizons {
                    if let Some((_, q)) = with.iter().find(|(yy, _)| *yy == y) {
                        rows.push(ScenarioRow {
                            pathway: p.name.clone(),
                            year: y,
                            season: season.clone(),
                            omega_ar: quantiles(q),
                            reference_median: base
                                .iter()
                                .find(|(yy, _)| *yy == y)
                                .map(|(_, q)| q[2]),
                        });
                    }
                }
            }
            let offsets: Vec<String> = s
                .offsets
                .iter()
                .map(|(season, ta, dic)| {
                    format!("{season}: TA {ta:+} µmol/kg, DIC {dic:+} µmol/kg")
                })
                .collect();
            LocalScenario {
                name: s.name.clone(),
                description: offsets.join("; "),
                rows,
            }
        })
        .collect();

    // Methods.
    let chemistry: Vec<MethodEntry> = loaded
        .methods
        .citations()
        .into_iter()
        .map(|(quantity, citation)| MethodEntry {
            method: citation.split(" (").next().unwrap_or(&citation).to_string(),
            quantity,
            citation,
        })
        .collect();
    let st = &outlook.settings;
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
    if !absolute_notes.is_empty() {
        notes.push(format!(
            "Net calcification at the baseline rate of {baseline_rate:.2} kg CaCO₃ m⁻² yr⁻¹ \
             (see Projection settings), ensemble median in kg CaCO₃ m⁻² yr⁻¹: {}.",
            absolute_notes.join("; ")
        ));
    }
    notes.extend(outlook.notes.iter().map(|n| tidy_numbers(n)));
    let methods = Methods {
        chemistry,
        projection: vec![
            setting("Observed CO2", st.observed_co2_source.clone()),
            setting("Disequilibrium", st.disequilibrium.clone()),
            setting("Warming", if st.warming { "on" } else { "off" }.to_string()),
            setting(
                "Ensemble",
                format!("{} members, seed {}", st.members, st.seed),
            ),
            setting("Constant uncertainties", st.constants_uncertainty.clone()),
            setting(
                "Measurement uncertainties",
                st.measurement_uncertainty.clone(),
            ),
            setting("Record variability", st.record_variability.clone()),
            setting(
                "Baseline calcification",
                format!(
                    "{:.2} kg CaCO₃ m⁻² yr⁻¹ ({})",
                    baseline_rate, outlook.calcification_baseline_source
                ),
            ),
        ],
        notes,
    };

    let samples = if appendix {
        loaded
            .samples
            .iter()
            .map(|s| {
                let st = s.state.as_ref();
                let mut measured = Vec::new();
                // Names as documented on `SampleRow::measured`.
                for (name, v) in [
                    ("ta", s.measured.ta()),
                    ("dic", s.measured.dic()),
                    ("ph_t", s.measured.ph_t()),
                    ("pco2", s.measured.pco2()),
                    ("fco2", s.measured.fco2()),
                ] {
                    if v.is_some() {
                        measured.push(name.to_string());
                    }
                }
                let mut flags: Vec<String> =
                    s.flags.labels().iter().map(|l| l.to_string()).collect();
                if s.ta_estimated {
                    flags.push("TA from TA–S fit".to_string());
                }
                SampleRow {
                    file: s
                        .source_file
                        .file_name()
                        .map(|f| f.to_string_lossy().into_owned())
                        .unwrap_or_default(),
                    row: s.line as u64,
                    date: s.time.format("%Y-%m-%d %H:%M").to_string(),
                    station: s.station.to_string(),
                    season: loaded
                        .seasons
                        .get(s.season)
                        .map(|x| x.name.clone())
                        .unwrap_or_default(),
                    temp_c: s.temp_c,
                    salinity: s.salinity,
                    pressure_dbar: s.pressure_dbar,
                    ta: st.map(|x| x.ta),
                    dic: st.map(|x| x.dic),
                    ph_t: st.map(|x| x.ph_t),
                    pco2: st.map(|x| x.pco2),
                    omega_ar: st.map(|x| x.omega_ar),
                    omega_ca: st.map(|x| x.omega_ca),
                    measured,
                    flags,
                    used: s.is_used(),
                }
            })
            .collect()
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
        calcification,
        local_scenarios,
        thermal: None,
        methods,
        samples,
    })
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

    #[test]
    fn relationship_names_come_from_the_citation() {
        assert_eq!(
            relationship_name(
                "chan2013",
                "Chan & Connolly (2013), Global Change Biology 19:282"
            ),
            "Chan & Connolly (2013)"
        );
        assert_eq!(
            relationship_name(
                "s2009",
                "Silverman, Lazar, Cao, Caldeira & Erez (2009), GRL 36"
            ),
            "Silverman et al. (2009)"
        );
        assert_eq!(relationship_name("x", "no year here"), "x");
        assert_eq!(relationship_name("x", "Someone (in press)"), "x");
        assert_eq!(omega_range_text((1.0, f64::INFINITY)), "Ω_ar ≥ 1");
        assert_eq!(omega_range_text((1.0, 5.0)), "Ω_ar 1–5");
        assert_eq!(
            formula_text("G = k x (Omega_ar - 1); G = 0 for Omega_ar <= 1, 5-37 degC"),
            "G = k × (Ω_ar − 1); G = 0 for Ω_ar ≤ 1, 5-37 °C"
        );
    }

    #[test]
    fn floating_point_noise_is_rounded_away() {
        assert_eq!(
            tidy_numbers("temp_c 33.044000000000004 °C is outside 9–33 °C (station LG1, 2.5 m)"),
            "temp_c 33.044 °C is outside 9–33 °C (station LG1, 2.5 m)"
        );
        assert_eq!(
            tidy_numbers("x 1.123456789 and v2.0000001"),
            "x 1.123457 and v2.0000001"
        );
        assert_eq!(tidy_numbers("lines 3–5, 9."), "lines 3–5, 9.");
    }

    #[test]
    fn table_horizons() {
        let every5: Vec<i32> = (2025..=2100).step_by(5).collect();
        assert_eq!(horizons(&every5), vec![2030, 2040, 2050, 2075, 2100]);
        assert_eq!(horizons(&[2027, 2033]), vec![2027, 2033]);
        assert_eq!(
            horizons(&[2031, 2041, 2051, 2061, 2071, 2081, 2091]),
            vec![2031, 2041, 2061, 2071, 2091]
        );
    }
}
