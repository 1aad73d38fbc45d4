//! The outlook stage: CO2 pathways, the projection of each record's carbonate state, the
//! seeded Monte Carlo ensemble, Omega_ar habitat thresholds and the calcification outlook.
//!
//! Entry point: [`run`] takes a plain [`SiteInput`] (records already solved to TA and pCO2) and
//! [`ProjectionSettings`], and returns a typed [`Outlook`] ([`result`]) that [`output`] writes
//! as CSV or JSON and the report reads directly.
//!
//! ```text
//! records ──► anchors (sampling-year atmosphere, disequilibrium)
//! pathways ─► per (record, year): xCO2, warmed T, constants, pCO2_air
//! members ──► draws (record bootstrap, constants, measurement) ──► solved states
//!          ──► quantiles, threshold crossings, probabilities, calcification
//! ```

pub mod calcification;
pub mod ensemble;
pub mod exposure;
pub mod from_site;
pub mod nec;
pub mod output;
pub mod pathways;
pub mod projection;
pub mod result;
pub mod rng;
pub mod scenario;
pub mod site_specs;
pub mod source_match;
pub mod source_water;
pub mod thermal;
pub mod thresholds;
pub mod warming;

use std::fmt;

use crate::chem::MethodSet;

pub use calcification::{CalcificationSettings, Relationship};
pub use ensemble::{
    EnsembleSettings, MeasurementUncertainty, NoProgress, Progress, quantile_sorted, run,
};
pub use from_site::from_loaded_site;
pub use output::{OutputFormat, OutputTable};
pub use pathways::{Observed, Pathway, PathwayError, Ssp};
pub use projection::{
    Disequilibrium, Measurement, ProjectedPoint, ProjectionRecord, SamplingUnit, Start,
    project_record, project_state,
};
pub use result::{
    BelowProbability, Criterion, Crossing, CrossingGroup, CrossingKind, CrossingYears, GroupId,
    Note, Outlook, PathwayId, QuantilePoint, QuantileSeries, Quantiles, Quantity, RelationshipId,
    ScenarioId, TimeBelow,
};
pub use scenario::{LocalScenario, Offsets};
pub use thresholds::HabitatClasses;
pub use warming::Warming;

/// The quantile levels reported, percent.
pub const QUANTILE_LEVELS: [u8; 5] = [5, 25, 50, 75, 95];

/// Default horizon end year.
pub const DEFAULT_END_YEAR: i32 = 2100;
/// Default horizon step, years.
pub const DEFAULT_STEP_YEARS: i32 = 5;

/// Errors of the outlook stage. Messages name the record, pathway, year or setting.
#[derive(Clone, Debug, PartialEq)]
pub enum OutlookError {
    /// A record or setting that cannot be used.
    Input(String),
    /// A pathway problem (unknown name, year not covered, bad user points).
    Pathway(PathwayError),
    /// The chemistry could not be solved.
    Solve {
        record: String,
        pathway: String,
        year: i32,
        message: String,
    },
}

impl fmt::Display for OutlookError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            OutlookError::Input(m) => f.write_str(m),
            OutlookError::Pathway(e) => write!(f, "{e}"),
            OutlookError::Solve {
                record,
                pathway,
                year,
                message,
            } => {
                write!(
                    f,
                    "{record}: projection under {pathway} for {year} failed: {message}"
                )
            }
        }
    }
}

impl std::error::Error for OutlookError {}

impl From<PathwayError> for OutlookError {
    fn from(e: PathwayError) -> Self {
        OutlookError::Pathway(e)
    }
}

/// The site as the outlook needs it.
#[derive(Clone, Debug)]
pub struct SiteInput {
    /// Site name for outputs.
    pub name: String,
    /// Season labels; records refer to them by index.
    pub seasons: Vec<String>,
    /// The records, each solved to TA and seawater pCO2.
    pub records: Vec<ProjectionRecord>,
    /// Station names; [`SamplingUnit::station`] indexes this list.
    pub stations: Vec<String>,
    /// Chemistry method set.
    pub methods: MethodSet,
    /// The observed atmospheric record (default NOAA).
    pub observed: Observed,
}

/// One pathway with its warming (used only when [`ProjectionSettings::warming`] is on).
#[derive(Clone, Debug, PartialEq)]
pub struct PathwaySpec {
    /// The pathway.
    pub pathway: Pathway,
    /// Its SST change.
    pub warming: Warming,
}

impl PathwaySpec {
    /// A pathway with its default warming.
    pub fn with_default_warming(pathway: Pathway, observed: &Observed) -> PathwaySpec {
        let warming = Warming::default_for(&pathway, observed);
        PathwaySpec { pathway, warming }
    }
}

/// Everything the projection needs besides the site.
#[derive(Clone, Debug)]
pub struct ProjectionSettings {
    /// Pathways, in output order.
    pub pathways: Vec<PathwaySpec>,
    /// Whether the pathways' SST changes are applied.
    pub warming: bool,
    /// Horizon years, strictly increasing.
    pub years: Vec<i32>,
    /// How the disequilibrium is carried forward.
    pub mode: Disequilibrium,
    /// Local TA/DIC scenarios; each is run in addition to the base case (no offsets) with the
    /// same ensemble draws, so differences show what the local measure changes.
    pub scenarios: Vec<LocalScenario>,
    /// The Monte Carlo ensemble.
    pub ensemble: EnsembleSettings,
    /// Omega_ar habitat classes.
    pub classes: HabitatClasses,
    /// Calcification relationships and baseline rate.
    pub calcification: CalcificationSettings,
    /// Field NEC relationships with the site's cover, habitat choice and measured NEC
    /// ([`nec::NecSettings`]), evaluated per member like the calcification relationships.
    pub nec: nec::NecSettings,
}

impl ProjectionSettings {
    /// Defaults for a site: the five SSPs with their warming applied (on, as in the site file's
    /// `[projection] warming` default and the README), the default horizon after
    /// the latest sampling year, ratio mode, no scenario, 1,000 members with seed 1, the
    /// Guinotte et al. (2003) classes and the built-in calcification relationships.
    pub fn defaults_for(site: &SiteInput) -> ProjectionSettings {
        let start = site
            .records
            .iter()
            .map(|r| r.sample_year)
            .max()
            .unwrap_or(2024);
        ProjectionSettings {
            pathways: Pathway::all_ssps()
                .into_iter()
                .map(|p| PathwaySpec::with_default_warming(p, &site.observed))
                .collect(),
            warming: true,
            years: horizon_years(start, DEFAULT_END_YEAR, DEFAULT_STEP_YEARS),
            mode: Disequilibrium::Ratio,
            scenarios: Vec::new(),
            ensemble: EnsembleSettings::default(),
            classes: thresholds::guinotte_2003(),
            calcification: CalcificationSettings::default(),
            nec: nec::NecSettings::for_site(None, None, None),
        }
    }
}

/// Horizon years after the latest sampling year `after`: every year divisible by `step`
/// that is later than `after`, up to `end` (e.g. after 2024: 2025, 2030, ..., 2100, the same
/// rule as the site file's default). A non-positive step gives `[end]`; `end <= after`
/// gives an empty list.
pub fn horizon_years(after: i32, end: i32, step: i32) -> Vec<i32> {
    if end <= after {
        return Vec::new();
    }
    if step <= 0 {
        return vec![end];
    }
    let mut years = Vec::new();
    let mut y = (after.div_euclid(step) + 1) * step;
    while y <= end {
        years.push(y);
        y += step;
    }
    years
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn horizon_defaults() {
        let y = horizon_years(2024, 2100, 5);
        assert_eq!(y.first(), Some(&2025));
        assert_eq!(y.last(), Some(&2100));
        assert_eq!(y.len(), 16);
        assert_eq!(horizon_years(2025, 2100, 5).first(), Some(&2030));
        assert!(horizon_years(2100, 2100, 5).is_empty());
        assert_eq!(horizon_years(2024, 2050, 0), vec![2050]);
    }
}
