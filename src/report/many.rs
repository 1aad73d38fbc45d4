//! Comparisons of many sites with bounded memory: a site's one-site model reduced to what the
//! ranking and the comparison page read ([`summarise`]), the comparison model assembled from
//! one-site models ([`assemble`]) and the per-site result file of a sharded run
//! ([`ResultFile`]).
//!
//! A comparison of N sites holds N summaries (a few kilobytes each) and only the K sites shown
//! in detail in full. [`assemble`] gives the same model as [`super::build::build_model`] over
//! all sites when every site is kept in full, so a comparison made this way prints what the
//! one-pass builder printed.

use serde::{Deserialize, Serialize};

use super::build::COMPARISON_TITLE;
use super::model::{PathwayInfo, ReportModel, ReportTime, SiteReport};
use super::ranking::KEY_OMEGA_LEVEL;

/// Version of the result-file layout (raised when [`ResultFile`] changes shape).
pub const RESULT_FORMAT: u32 = 1;

/// The name of the reproducibility setting that differs per site (one row each).
const PER_SITE_SETTING: &str = "Constant set (";

/// One site's part of a comparison: its one-site report model and what the comparison takes
/// from the site beyond it.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SiteResult {
    /// Line of the site list (1 = first line), or position on the command line.
    pub line: usize,
    /// The site file as listed.
    pub file: String,
    /// Whether the model's date is the site's own `[report] date` (else its newest sample).
    pub dated_by_user: bool,
    /// Whether ensemble member-years were left unsolved (exit status 3).
    pub partial: bool,
    /// Each pathway's CO2 in the last projected year: the comparison lists the pathways of
    /// every site from the lowest to the highest.
    pub pathway_end_co2: Vec<PathwayEnd>,
    /// The one-site model; its site is a [`summarise`]d one unless kept in full.
    pub model: ReportModel,
}

/// A pathway's atmospheric CO2 in the last projected year.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct PathwayEnd {
    pub id: String,
    pub co2_ppm: f64,
}

/// A listed site that could not be read or projected.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SiteFailure {
    pub line: usize,
    pub file: String,
    /// The diagnostics printed for it (file, line and field).
    pub message: String,
}

/// The result file a shard writes for each of its sites.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ResultFile {
    /// [`RESULT_FORMAT`].
    pub format: u32,
    /// The tool version that wrote it.
    pub tool_version: String,
    /// Hash of the settings the numbers depend on (site list, seed); see the CLI.
    pub settings_hash: String,
    /// The shard that wrote it, e.g. "2/4".
    pub shard: String,
    pub failure: Option<SiteFailure>,
    pub result: Option<SiteResult>,
}

impl ResultFile {
    /// The file as text. TOML keeps every number exactly (floats are written in their shortest
    /// round-trip form, NaN and infinities by name), so a merge sees the numbers of the run.
    pub fn to_text(&self) -> Result<String, String> {
        toml::to_string(self).map_err(|e| format!("cannot serialise a site result: {e}"))
    }

    /// Reads the text of a result file.
    pub fn from_text(text: &str) -> Result<Self, String> {
        toml::from_str(text).map_err(|e| e.to_string())
    }
}

/// A site reduced to what the ranking table, the crossing table and the shared settings read:
/// identity, plan, data basis, coverage, baseline, the limiting season's projection and
/// crossings, and the calcification outlooks, all at the table horizons (and the plan's end
/// year) only. QC findings, samples, local
/// scenarios and the other seasons are left out.
pub fn summarise(site: &SiteReport, horizons: &[i32]) -> SiteReport {
    let season = site.limiting_season().unwrap_or_default().to_string();
    let end = site.plan.end_year;
    let kept = |y: i32| horizons.contains(&y) || Some(y) == end;
    let mut s = site.clone();
    s.qc.clear();
    s.samples.clear();
    s.local_scenarios.clear();
    // The ranking reads the chance below the key level at the plan's end year only.
    s.probabilities
        .retain(|p| p.season == season && Some(p.year) == end && p.threshold == KEY_OMEGA_LEVEL);
    s.projection_rules.clear();
    s.methods.chemistry.clear();
    s.methods.notes.clear();
    for p in &mut s.projection {
        p.seasons.retain(|x| x.season == season);
        for x in &mut p.seasons {
            x.points.retain(|pt| kept(pt.year));
        }
    }
    s.crossings.retain(|c| c.season == season);
    for c in &mut s.calcification {
        for x in &mut c.series {
            x.points.retain(|pt| horizons.contains(&pt.year));
        }
    }
    s
}

/// The comparison of the given sites (in the order given), as
/// [`super::build::build_model`] makes it from the same sites: the shared parts from the first
/// site, pathways from every site from the lowest CO2 to the highest, the newest date, every
/// input file. `summary_only`: indices of the sites held as summaries. One result gives its
/// own one-site model with `command`.
pub fn assemble(
    results: Vec<SiteResult>,
    command: Option<String>,
    summary_only: Vec<usize>,
) -> Result<ReportModel, String> {
    let dated = results
        .iter()
        .find(|r| r.dated_by_user)
        .map(|r| r.model.timestamp);
    let newest = results.iter().map(|r| r.model.timestamp).max();
    let timestamp: ReportTime = dated.or(newest).ok_or("no site to report on")?;
    let pathways = pathway_union(&results);
    let n = results.len();
    let mut iter = results.into_iter();
    let first = iter.next().ok_or("no site to report on")?;
    let mut model = first.model;
    model.reproducibility.command = command;
    model.summary_only = summary_only;
    if n == 1 {
        return Ok(model);
    }
    model.title = COMPARISON_TITLE.to_string();
    model.timestamp = timestamp;
    model.pathways = pathways;
    let mut per_site: Vec<_> = model
        .reproducibility
        .settings
        .iter()
        .filter(|s| s.name.starts_with(PER_SITE_SETTING))
        .cloned()
        .collect();
    model
        .reproducibility
        .settings
        .retain(|s| !s.name.starts_with(PER_SITE_SETTING));
    for r in iter {
        if model.subtitle.is_some() && model.subtitle != r.model.subtitle {
            model.subtitle = None;
        }
        model.sites.extend(r.model.sites);
        model
            .reproducibility
            .inputs
            .extend(r.model.reproducibility.inputs);
        per_site.extend(
            r.model
                .reproducibility
                .settings
                .into_iter()
                .filter(|s| s.name.starts_with(PER_SITE_SETTING)),
        );
    }
    model.reproducibility.settings.extend(per_site);
    Ok(model)
}

/// Every site's pathways, each once (as its first site describes it), ordered by their CO2 in
/// the last projected year (a stable order: equal values keep the order met).
fn pathway_union(results: &[SiteResult]) -> Vec<PathwayInfo> {
    let mut list: Vec<(f64, PathwayInfo)> = Vec::new();
    for r in results {
        for p in &r.model.pathways {
            if list.iter().any(|(_, q)| q.id == p.id) {
                continue;
            }
            let end = r
                .pathway_end_co2
                .iter()
                .find(|e| e.id == p.id)
                .map_or(f64::NAN, |e| e.co2_ppm);
            list.push((end, p.clone()));
        }
    }
    list.sort_by(|a, b| a.0.total_cmp(&b.0));
    list.into_iter().map(|(_, p)| p).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    fn one_site(model: &ReportModel, i: usize, line: usize) -> SiteResult {
        let mut m = model.clone();
        m.sites = vec![model.sites[i].clone()];
        m.reproducibility.settings.push(crate::report::Setting {
            name: format!("Constant set ({})", model.sites[i].name),
            value: "K1/K2 x".into(),
        });
        SiteResult {
            line,
            file: format!("site{line}.toml"),
            dated_by_user: false,
            partial: false,
            pathway_end_co2: m
                .pathways
                .iter()
                .enumerate()
                .map(|(k, p)| PathwayEnd {
                    id: p.id.clone(),
                    co2_ppm: 400.0 + 100.0 * k as f64,
                })
                .collect(),
            model: m,
        }
    }

    #[test]
    fn a_result_file_keeps_every_number_exactly() {
        // Values with no short decimal form, a NaN (a one-value standard deviation) and an
        // infinity must come back bit for bit.
        let model = example_model(1);
        let mut r = one_site(&model, 0, 1);
        r.model.sites[0].baseline[0].omega_ar.sd = f64::NAN;
        r.model.sites[0].baseline[0].omega_ar.mean = 0.1 + 0.2; // 0.30000000000000004
        r.model.sites[0].baseline[0].omega_ar.max = f64::INFINITY;
        r.model.sites[0].baseline[0].omega_ar.min = 1.0 / 3.0;
        let file = ResultFile {
            format: RESULT_FORMAT,
            tool_version: "0.1.0".into(),
            settings_hash: "abc".into(),
            shard: "1/1".into(),
            failure: None,
            result: Some(r.clone()),
        };
        let text = file.to_text().unwrap();
        let back = ResultFile::from_text(&text).unwrap();
        let b = &back.result.unwrap().model.sites[0].baseline[0].omega_ar;
        assert!(b.sd.is_nan());
        assert_eq!(b.mean.to_bits(), (0.1f64 + 0.2).to_bits());
        assert_eq!(b.max, f64::INFINITY);
        assert_eq!(b.min.to_bits(), (1.0f64 / 3.0).to_bits());
        // And the whole file reads back to the same text.
        let again = ResultFile::from_text(&text).unwrap().to_text().unwrap();
        assert_eq!(again, text);
    }

    #[test]
    fn a_summary_keeps_what_the_ranking_reads() {
        use crate::report::ranking::rank_sites;
        let model = example_model(3);
        let mut summarised = model.clone();
        for s in &mut summarised.sites {
            *s = summarise(s, &model.horizons);
        }
        let keys = |m: &ReportModel| {
            rank_sites(m)
                .iter()
                .map(|e| (e.site, e.rank, e.end, e.last_median, e.now_min))
                .collect::<Vec<_>>()
        };
        assert_eq!(keys(&summarised), keys(&model));
        // Only the limiting season's series is kept, at the horizon years and the plan's end
        // year only.
        let s = &summarised.sites[0];
        let season = s.limiting_season().unwrap();
        assert!(s.projection.iter().all(|p| p.seasons.len() == 1
            && p.seasons[0].season == season
            && p.seasons[0].points.len() <= model.horizons.len() + 1));
        assert!(s.samples.is_empty() && s.qc.is_empty());
    }

    #[test]
    fn assembling_one_site_models_lists_every_site_input_and_pathway_once() {
        let model = example_model(3);
        let results: Vec<SiteResult> = (0..3).map(|i| one_site(&model, i, i + 1)).collect();
        let shared = model.reproducibility.settings.len();
        let m = assemble(
            results,
            Some("calcisite report --site-list x".into()),
            vec![2],
        )
        .unwrap();
        assert_eq!(m.title, COMPARISON_TITLE);
        assert_eq!(m.sites.len(), 3);
        assert_eq!(m.pathways.len(), model.pathways.len());
        // The shared settings once, then one constant-set row per site: 3 more rows.
        assert_eq!(m.reproducibility.settings.len(), shared + 3);
        assert!(
            m.reproducibility.settings[shared..]
                .iter()
                .all(|s| s.name.starts_with(PER_SITE_SETTING))
        );
        assert_eq!(m.summary_only, vec![2]);
        assert!(!m.in_detail(2) && m.in_detail(0));
    }

    #[test]
    fn pathways_are_ordered_by_their_end_co2() {
        let model = example_model(2);
        let mut a = one_site(&model, 0, 1);
        // Reverse the CO2 of the first site's pathways: the order must follow the numbers.
        for e in &mut a.pathway_end_co2 {
            e.co2_ppm = -e.co2_ppm;
        }
        let b = one_site(&model, 1, 2);
        let ids: Vec<String> = pathway_union(&[a, b]).into_iter().map(|p| p.id).collect();
        let mut expected: Vec<String> = model.pathways.iter().map(|p| p.id.clone()).collect();
        expected.reverse();
        assert_eq!(ids, expected);
    }
}
