//! The one pipeline every command runs: load → check → outlook → report model.
//!
//! ```text
//! site.toml ──load_checked──► Checked { loaded, input, settings }   (check stops here)
//!           ──project───────► SiteRun { loaded, outlook }           (project stops here)
//!           ──report_model──► ReportModel                           (report renders it)
//! ```
//!
//! Each step returns typed values or a typed failure; nothing here prints. The commands in
//! `cli/` word and print what they receive, and map a [`RunStatus`] to the exit status in
//! one place ([`RunStatus::exit_code`]).

use std::path::Path;

use crate::diag::{Diagnostic, Diagnostics};
use crate::outlook::{self, Outlook, Progress, ProjectionSettings, SiteInput, thermal};
use crate::site::temperature::{ThermalSource, load_thermal};
use crate::site::{LoadFailure, LoadedSite, load_site};

/// Command-line overrides of the site file's ensemble settings.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Overrides {
    pub seed: Option<u64>,
    pub members: Option<usize>,
    pub threads: Option<usize>,
}

/// A site that passed every check the outlook and the report will make.
#[derive(Debug)]
pub struct Checked {
    pub loaded: LoadedSite,
    /// The validated projection settings (overrides applied).
    pub settings: ProjectionSettings,
    /// The temperature record, prepared for the thermal outlook, when the site has one.
    pub thermal: Option<thermal::site::PreparedHeat>,
}

/// A projected site.
#[derive(Debug)]
pub struct SiteRun {
    pub loaded: LoadedSite,
    pub outlook: Outlook,
}

/// Why a site stopped in the pipeline.
#[derive(Debug)]
pub enum Failure {
    /// The site file or its records could not be read or are invalid (QC findings kept).
    Load(LoadFailure),
    /// The outlook could not run (e.g. no record could be solved under a pathway).
    Outlook(outlook::OutlookError),
}

/// Loads a site and runs every check that `project` and `report` depend on, through the
/// same code they use: the site file, the records and QC, and the outlook's own validation
/// of the projection settings. A site that passes here projects.
pub fn load_checked(path: &Path, overrides: Overrides) -> Result<Checked, Failure> {
    let loaded = load_site(path).map_err(Failure::Load)?;
    // Settings only: the per-record inputs are built when projecting, so that `check` on a
    // million-row series does not hold a second copy of it.
    match outlook::from_site::projection_settings(&loaded) {
        Ok(mut settings) => {
            if let Some(seed) = overrides.seed {
                settings.ensemble.seed = seed;
            }
            if let Some(m) = overrides.members {
                settings.ensemble.members = m;
            }
            settings.ensemble.threads = overrides.threads;
            let mut loaded = loaded;
            let thermal = match load_thermal_checked(&loaded) {
                Ok(t) => t,
                Err(ds) => return Err(Failure::Load(settings_failure(loaded, ds))),
            };
            if let Some(ThermalSource::Logger { path, .. }) = thermal.as_ref().map(|t| &t.source) {
                loaded.input_files.push(path.clone());
            }
            Ok(Checked {
                loaded,
                settings,
                thermal,
            })
        }
        Err(ds) => Err(Failure::Load(settings_failure(loaded, ds))),
    }
}

/// The site's temperature record, read and checked so that the thermal outlook will run:
/// problems name the logger file's line or the site file's `thermal.*` field.
fn load_thermal_checked(
    loaded: &LoadedSite,
) -> Result<Option<thermal::site::PreparedHeat>, Diagnostics> {
    let record = load_thermal(
        &loaded.path,
        loaded.site.thermal.as_ref(),
        loaded.utc_offset,
        &loaded.samples,
    )?;
    let Some(record) = record else {
        return Ok(None);
    };
    let e = match thermal::site::prepare(&record) {
        Ok(prepared) => return Ok(Some(prepared)),
        Err(e) => e,
    };
    let file = match &record.source {
        ThermalSource::Logger { path, .. } => path.clone(),
        ThermalSource::SensorRecords { .. } => loaded.path.clone(),
    };
    let line = match e {
        thermal::HeatError::NotIncreasing { index }
        | thermal::HeatError::OutOfRange { index, .. } => {
            record.readings.get(index).map(|r| r.line)
        }
        _ => None,
    };
    let mut d = Diagnostic::error(format!("thermal-stress record: {e}")).with_file(file);
    if let Some(line) = line {
        d = d.with_line(line);
    } else if record.stated_mmm.is_none() {
        d = d.with_help(
            "a year or more of daily or sub-daily temperatures, or [thermal] mmm_c with mmm_source and mmm_base_period",
        );
    }
    Err(Diagnostics::from(d))
}

/// The settings' diagnostics located in the site file, followed by the site's own findings.
fn settings_failure(site: LoadedSite, ds: Diagnostics) -> LoadFailure {
    let mut all: Diagnostics = ds.into_iter().map(|d| site.locate(d)).collect();
    let position = all.len();
    all.extend(site.findings.iter().cloned());
    LoadFailure {
        diagnostics: all,
        rows: site.qc,
        rows_position: position + site.qc_position,
    }
}

/// Runs the outlook of a checked site.
pub fn project(checked: Checked, progress: &dyn Progress) -> Result<SiteRun, Failure> {
    let input: SiteInput = outlook::from_site::site_input(&checked.loaded);
    // The heat outlook needs nothing of the chemistry's: the two run side by side.
    let (chemistry, heat) = rayon::join(
        || outlook::run(&input, &checked.settings, progress),
        || {
            checked
                .thermal
                .as_ref()
                .map(|prepared| thermal::site::site_heat(prepared, &checked.settings))
        },
    );
    let mut outlook = chemistry.map_err(Failure::Outlook)?;
    outlook.heat = heat;
    Ok(SiteRun {
        loaded: checked.loaded,
        outlook,
    })
}

/// The report model of projected sites, in the order given.
pub fn report_model(
    runs: &[SiteRun],
    options: &crate::report::build::BuildOptions,
) -> Result<crate::report::ReportModel, String> {
    let borrowed: Vec<crate::report::build::SiteRun<'_>> = runs
        .iter()
        .map(|r| crate::report::build::SiteRun {
            loaded: &r.loaded,
            outlook: &r.outlook,
        })
        .collect();
    crate::report::build::build_model(&borrowed, options)
}

/// How a run ended, for the exit status.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum RunStatus {
    /// Everything was computed (warnings allowed).
    Complete,
    /// Some rows or ensemble member-years could not be solved; everything else was written.
    Partial,
    /// An input could not be read or is invalid; nothing was written.
    InputError,
}

impl RunStatus {
    /// The status of a projected site: partial when member-years were left unsolved.
    pub fn of_outlook(outlook: &Outlook) -> RunStatus {
        if outlook.unsolved_member_years() > 0 {
            RunStatus::Partial
        } else {
            RunStatus::Complete
        }
    }

    /// The worst of several statuses (a report is partial when any site is).
    pub fn worst(statuses: impl IntoIterator<Item = RunStatus>) -> RunStatus {
        statuses.into_iter().max().unwrap_or(RunStatus::Complete)
    }

    /// The exit status (README, "Exit status"): 0 complete, 1 input error, 3 partial.
    pub fn exit_code(self) -> i32 {
        match self {
            RunStatus::Complete => 0,
            RunStatus::InputError => 1,
            RunStatus::Partial => 3,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exit_codes_follow_the_readme_table() {
        // The README's exit-status table: 0 success, 1 input error, 3 partial results.
        assert_eq!(RunStatus::Complete.exit_code(), 0);
        assert_eq!(RunStatus::InputError.exit_code(), 1);
        assert_eq!(RunStatus::Partial.exit_code(), 3);
        assert_eq!(
            RunStatus::worst([RunStatus::Complete, RunStatus::Partial]),
            RunStatus::Partial
        );
        assert_eq!(RunStatus::worst([]), RunStatus::Complete);
    }
}
