//! The report stage: the report model, figures (plotters → SVG), the embedded typesetter and
//! PDF output.
//!
//! Typical use (the CLI does this for `calcisite report`):
//! ```ignore
//! let model: ReportModel = /* filled from the site, baseline and outlook stages */;
//! let options = RenderOptions {
//!     template: TemplateSource::BuiltIn,
//!     pdfa: false,
//!     timestamp_override: report::timestamp_from_env()?,
//!     dated_by_user: true, // the model's timestamp is the site's `[report] date`
//! };
//! let rendered = report::write_pdf(&model, &options, Path::new("site.pdf"))?;
//! report::write_data_json(&model, Path::new("site.json"))?;   // --data-out
//! ```
//! Without the `pdf` feature everything except the typesetting (figures, the view, data output,
//! `--dump-template`) is still available.

pub mod build;
pub mod error;
pub mod figures;
pub mod fmt;
pub mod many;
pub mod model;
pub mod output;
pub mod palette;
pub mod ranking;
pub mod ranking_table;
pub mod templates;
pub mod view;

#[cfg(feature = "pdf")]
pub mod pdf;
#[cfg(feature = "pdf")]
pub mod world;

#[cfg(test)]
pub(crate) mod example;

pub use error::ReportError;
pub use model::*;
pub use output::{data_json_bytes, timestamp_from_env, write_atomic, write_data_json};
#[cfg(feature = "pdf")]
pub use pdf::{RenderOptions, Rendered, render, write_pdf};
pub use templates::dump as dump_templates;
#[cfg(feature = "pdf")]
pub use world::TemplateSource;
