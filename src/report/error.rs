//! Errors of the report stage.

use std::path::{Path, PathBuf};

/// Something that stopped a report from being written.
#[derive(Debug)]
pub enum ReportError {
    /// The model is inconsistent (e.g. threshold classes out of order).
    Model(String),
    /// A figure could not be drawn.
    Figure(String),
    /// The embedded fonts are incomplete (a build problem, not a user error).
    Fonts(String),
    /// The template did not compile; the text holds the rendered diagnostics with file, line,
    /// column and hints.
    Template(String),
    /// `--template DIR` is unusable.
    TemplateDir { path: PathBuf, message: String },
    /// PDF export failed (e.g. a PDF/A rule was violated).
    Pdf(String),
    /// Reading or writing a file failed.
    Io {
        action: &'static str,
        path: PathBuf,
        source: std::io::Error,
    },
    /// `SOURCE_DATE_EPOCH` is set but unusable.
    Timestamp(String),
    /// An action was refused to protect existing files.
    Refused(String),
}

impl ReportError {
    pub(crate) fn io(action: &'static str, path: &Path, source: std::io::Error) -> Self {
        ReportError::Io {
            action,
            path: path.to_path_buf(),
            source,
        }
    }
}

impl std::fmt::Display for ReportError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ReportError::Model(m) => write!(f, "report data: {m}"),
            ReportError::Figure(m) => write!(f, "{m}"),
            ReportError::Fonts(m) => write!(f, "embedded fonts: {m}"),
            ReportError::Template(d) => write!(f, "the report template did not compile:\n{d}"),
            ReportError::TemplateDir { path, message } => {
                write!(f, "template directory {}: {message}", path.display())
            }
            ReportError::Pdf(m) => write!(f, "PDF export: {m}"),
            ReportError::Io {
                action,
                path,
                source,
            } => {
                write!(f, "cannot {action} {}: {source}", path.display())
            }
            ReportError::Timestamp(m) => write!(f, "{m}"),
            ReportError::Refused(m) => write!(f, "{m}"),
        }
    }
}

impl std::error::Error for ReportError {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match self {
            ReportError::Io { source, .. } => Some(source),
            _ => None,
        }
    }
}

impl From<super::figures::FigureError> for ReportError {
    fn from(e: super::figures::FigureError) -> Self {
        ReportError::Figure(e.to_string())
    }
}
