//! The seeded Monte Carlo ensemble and the assembly of the outlook.
//!
//! The ensemble answers how well a season's time-weighted mean state is known in each year
//! (uncertainty); how much of the time the water lies below a level (variability) is taken
//! from the records themselves. Each member of a season (or of the all-records aggregate)
//! is one plausible value of the season's mean:
//! 1. every record is projected on its own with central constants and the pathway's central
//!    warming ([`central`]), at every horizon year and every fifth year in between;
//! 2. the member resamples the season's station-days with replacement (a bootstrap of the
//!    mean; consecutive days of a sensor series in blocks, [`units`]) and takes the
//!    time-weighted mean of the resampled station-days;
//! 3. to that mean it adds the effect of its own draws, propagated through the season's
//!    representative record (the one nearest the mean): shifts of pK0, pK1, pK2, pKB, pKW,
//!    pK*sp (aragonite, calcite) and a factor on total boron with the standard uncertainties
//!    of Orr et al. (2018), Mar. Chem. 207:84–107 (`chem::ORR2018`); errors of the measured
//!    pair divided by √(station-days) (the error of a mean of independent measurements), the
//!    record re-solved from its measured pair with the member's constants; and the member's
//!    multiple of the pathway's warming (0.70–1.41, [`crate::outlook::warming`]) through the
//!    representative record's sensitivity to temperature (a central difference of ±0.5 °C).
//!    This first-order propagation through one record is exact for the constants of that
//!    record and close for the season (checked against direct solves in the tests).
//!
//! Annual values between the computed years are interpolated linearly for crossing years.
//! A member's constants and warming are shared by every season and pathway (stream
//! (seed, member)), its bootstrap draw by every pathway (stream (seed, season, member)):
//! members are paired across pathways and scenarios (common random numbers) and the limiting
//! season of a member is its lowest season mean in each year. Streams depend on nothing
//! else, so results do not depend on the number of threads.
//!
//! Work is split into one task per (pathway, season); rayon runs the tasks in parallel and
//! collects them in order.
//!
//! Files: [`settings`] (what the caller chooses, validated once), [`units`] (station-days
//! and the bootstrap), [`central`] (every record projected on its own), [`draws`] (the
//! constants' draws and a record re-solved with a member's draws), [`prepare`] (groups,
//! scenarios, anchors, computed years and the notes found before running), [`run`] (the
//! members and their summary per task), [`assemble`] (the typed [`super::Outlook`]: series,
//! crossing years, chances and shares below), [`quantiles`] (order statistics), `exposure`
//! (the exposure metrics of sensor series, from the records each projected on its own),
//! `means` (the bootstrap-weighted means, every member's inner loop).

pub mod assemble;
pub mod central;
pub mod draws;
mod exposure;
mod means;
pub mod prepare;
pub mod quantiles;
pub mod rules;
pub mod run;
pub mod settings;
pub mod units;

#[cfg(test)]
mod exposure_tests;
#[cfg(test)]
mod mean_tests;
#[cfg(test)]
mod tests;

pub use draws::constants_perturbation;
pub use quantiles::{five_quantiles, quantile_sorted};
pub use run::run;
pub use settings::{
    DEFAULT_SEED, EnsembleSettings, MAX_MEMBERS, MeasurementUncertainty, NoProgress, Progress,
};

/// Label of the all-records aggregate.
pub const AGGREGATE_LABEL: &str = "annual";

/// Label of the synthetic crossing group built from the lowest season quantile each year.
pub const WORST_SEASON_LABEL: &str = "worst season";

/// Label of the base case (no local scenario).
pub const BASE_SCENARIO: &str = "none";
