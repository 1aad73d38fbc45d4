//! Typed quality-control findings about record rows and record files.
//!
//! The site stage records *what* it found (severity, kind, file, line, cell, field and the
//! numbers involved) one finding per row; it never groups findings or summarises them. Where
//! findings are shown (`check` on the terminal, the report) they are grouped and worded for
//! that reader, from these typed fields, without reading numbers back out of message text.

use std::path::Path;
use std::sync::Arc;

use serde::{Serialize, Serializer};

use crate::diag::{Diagnostic, Severity};

/// What a finding is about. The kebab-case name is part of `check --format json`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum FindingKind {
    /// The file (or its header) could not be read.
    Unreadable,
    /// A column mapped in the site file is missing, or a required column is absent.
    MissingColumn,
    /// The same header twice.
    DuplicateColumn,
    /// The row has another number of cells than the header.
    CellCount,
    /// A cell is not a number.
    NonNumeric,
    /// A text cell is not UTF-8.
    NonUtf8,
    /// The date cell cannot be read.
    BadDate,
    /// The date lies after the clock.
    FutureDate,
    /// A value lies outside the physical limits.
    OutOfRange,
    /// The row has no temperature or no salinity.
    MissingTs,
    /// Dates earlier than the station's previous row.
    OutOfOrder,
    /// Same station, time and pressure as an earlier row.
    Duplicate,
    /// No solvable pair of carbonate quantities.
    NoPair,
    /// The solver failed on the row's pair.
    SolveFailed,
    /// Measured and calculated values disagree beyond tolerance.
    Inconsistent,
    /// Temperature or salinity outside the constant set's fitted range.
    MethodRange,
    /// Estimated TA extrapolated outside the TA–salinity fit's salinity range.
    TaFitRange,
    /// Dates out of order as read, in order with day and month swapped.
    DateFormat,
    /// Salinity below the site's floor: the row is left out of the baseline and the outlook.
    BelowSalinityFloor,
}

impl FindingKind {
    /// The kebab-case name (as in JSON).
    pub fn as_str(self) -> &'static str {
        match self {
            FindingKind::Unreadable => "unreadable",
            FindingKind::MissingColumn => "missing-column",
            FindingKind::DuplicateColumn => "duplicate-column",
            FindingKind::CellCount => "cell-count",
            FindingKind::NonNumeric => "non-numeric",
            FindingKind::NonUtf8 => "non-utf8",
            FindingKind::BadDate => "bad-date",
            FindingKind::FutureDate => "future-date",
            FindingKind::OutOfRange => "out-of-range",
            FindingKind::MissingTs => "missing-ts",
            FindingKind::OutOfOrder => "out-of-order",
            FindingKind::Duplicate => "duplicate",
            FindingKind::NoPair => "no-pair",
            FindingKind::SolveFailed => "solve-failed",
            FindingKind::Inconsistent => "inconsistent",
            FindingKind::MethodRange => "method-range",
            FindingKind::TaFitRange => "ta-fit-range",
            FindingKind::DateFormat => "date-format",
            FindingKind::BelowSalinityFloor => "below-salinity-floor",
        }
    }
}

/// A number a finding is about, with its name and unit (e.g. `salinity` 0.7, or the
/// `valid_min` of a range).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Value {
    pub name: &'static str,
    pub value: f64,
    /// Unit as printed ("" for dimensionless quantities).
    pub unit: &'static str,
}

impl Value {
    pub fn new(name: &'static str, value: f64, unit: &'static str) -> Self {
        Value { name, value, unit }
    }
}

/// One finding about a row (or a whole file, with `line` 0 or the header line).
#[derive(Clone, Debug, Serialize)]
pub struct Finding {
    pub severity: Severity,
    pub kind: FindingKind,
    /// Index into the site's record list (`[[records]]` order).
    #[serde(skip)]
    pub file_index: usize,
    /// The record file.
    #[serde(serialize_with = "ser_path")]
    pub file: Arc<Path>,
    /// 1-based line; 0 when the finding is about the whole file.
    pub line: usize,
    /// 0-based index of the CSV cell, when the finding is about one cell.
    pub cell: Option<usize>,
    /// The quantity or column (e.g. `salinity`, `Sal (salinity)`) or site-file key.
    pub field: Option<String>,
    /// Another line the finding refers to (the earlier row of a duplicate or of a station's
    /// out-of-order date).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub other_line: Option<usize>,
    /// The numbers involved (value, limits, measured and calculated values ...).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub values: Vec<Value>,
    /// What was found on this one row, as a sentence.
    pub message: String,
    pub help: Option<String>,
}

fn ser_path<S: Serializer>(p: &Arc<Path>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&p.display().to_string())
}

impl Finding {
    /// A finding of `kind` about `line` of record `file_index` (no cell, field or values yet).
    pub fn new(
        severity: Severity,
        kind: FindingKind,
        file_index: usize,
        file: Arc<Path>,
        line: usize,
        message: impl Into<String>,
    ) -> Self {
        Finding {
            severity,
            kind,
            file_index,
            file,
            line,
            cell: None,
            field: None,
            other_line: None,
            values: Vec::new(),
            message: message.into(),
            help: None,
        }
    }
    pub fn with_cell(mut self, cell: Option<usize>) -> Self {
        self.cell = cell;
        self
    }
    pub fn with_field(mut self, field: impl Into<String>) -> Self {
        self.field = Some(field.into());
        self
    }
    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }
    pub fn with_values(mut self, values: Vec<Value>) -> Self {
        self.values = values;
        self
    }
    pub fn with_other_line(mut self, line: usize) -> Self {
        self.other_line = Some(line);
        self
    }
    /// This one finding as a diagnostic (file, line, field, message, help; no source line).
    pub fn to_diagnostic(&self) -> Diagnostic {
        let mut d = Diagnostic::new(self.severity, self.message.clone()).with_file(&*self.file);
        if let Some(f) = &self.field {
            d = d.with_field(f.clone());
        }
        if let Some(h) = &self.help {
            d = d.with_help(h.clone());
        }
        if self.line > 0 {
            d = d.with_line(self.line);
        }
        d
    }

    /// The value named `name`, if the finding carries one.
    pub fn value(&self, name: &str) -> Option<f64> {
        self.values.iter().find(|v| v.name == name).map(|v| v.value)
    }
}

/// True when any finding is an error.
pub fn has_error(findings: &[Finding]) -> bool {
    findings.iter().any(|f| f.severity == Severity::Error)
}
