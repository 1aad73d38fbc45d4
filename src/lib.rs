//! calcisite: screening-level carbonate chemistry and aragonite-saturation outlooks for
//! candidate coral-reef restoration sites.
//!
//! The library mirrors the command-line stages (see `DEVELOPERS.md`):
//!
//! * [`chem`]: the marine carbonate system (constants, pressure corrections, pH scales, solvers);
//! * [`site`]: the site description (TOML), record files (CSV), quality control, seasonal baseline;
//! * [`outlook`]: CO2 pathways, the Monte Carlo projection, thresholds, calcification outlook;
//! * [`report`]: the report model, figures and the embedded typesetter that writes the PDF.
//!
//! `main.rs` only parses arguments and prints.

pub mod chem;
pub mod cli;
pub mod diag;
pub mod fsio;
pub mod numfmt;
pub mod outlook;
pub mod report;
pub mod site;
