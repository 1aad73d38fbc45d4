//! The seeded Monte Carlo ensemble and the assembly of the outlook.
//!
//! Each member of a season (or of the all-records aggregate) draws, from its own random
//! stream:
//! 1. a record of that season, uniformly with replacement (a bootstrap over records: the
//!    record-to-record variability within the season);
//! 2. shifts of pK0, pK1, pK2, pKB, pKW, pK*sp(aragonite), pK*sp(calcite) and a factor on
//!    total boron, normal with the standard uncertainties of Orr et al. (2018), Mar. Chem.
//!    207:84–107 (`chem::ORR2018`);
//! 3. errors of the record's two measured parameters, normal with the site's standard
//!    uncertainties; the record is then re-solved at its sampling conditions with the member's
//!    constants, giving the member's TA and seawater pCO2 at sampling. (So a record measured
//!    as TA + DIC keeps its measured DIC at the sampling year under every draw of the
//!    constants, while one measured as TA + pCO2 keeps its pCO2.)
//!
//! The member keeps these draws for every pathway, scenario and horizon year. The stream of
//! a member is derived from (seed, season, member) only, never from thread scheduling, so the
//! results do not depend on the number of threads; and because the pathway and scenario are
//! not part of the key, members are paired across pathways and scenarios (common random
//! numbers): differences between pathways or scenarios are not blurred by sampling noise.
//!
//! Work is split into one task per (pathway, season); rayon runs the tasks in parallel and
//! collects them in order.
//!
//! Files: [`settings`] (what the caller chooses, validated once), [`draws`] (one member's
//! random draws and its state at sampling), [`prepare`] (groups, scenarios, anchors and the
//! notes found before running), [`run`] (solving the members and summarising them per task),
//! [`assemble`] (the typed [`super::Outlook`]), [`quantiles`] (order statistics).

pub mod assemble;
pub mod draws;
pub mod prepare;
pub mod quantiles;
pub mod run;
pub mod settings;

#[cfg(test)]
mod tests;

pub use draws::constants_perturbation;
pub use quantiles::{five_quantiles, quantile_sorted};
pub use run::{member_states, run};
pub use settings::{
    DEFAULT_SEED, EnsembleSettings, MAX_MEMBERS, MeasurementUncertainty, NoProgress, Progress,
};

/// Label of the all-records aggregate.
pub const AGGREGATE_LABEL: &str = "annual";

/// Label of the synthetic crossing group built from the lowest season quantile each year.
pub const WORST_SEASON_LABEL: &str = "worst season";

/// Label of the base case (no local scenario).
pub const BASE_SCENARIO: &str = "none";
