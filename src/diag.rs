//! Diagnostics shared by every stage: one finding about the user's input (a site file, a record
//! file, a flag), with where it is (file, 1-based line and column, the TOML field or CSV column),
//! what is wrong and what would be valid.
//!
//! Rendering follows the layout of good compiler tooling:
//!
//! ```text
//! error: latitude 200 is outside the valid range
//!  --> site.toml:3:16, field `site.latitude_deg`
//!   |
//! 3 | latitude_deg = 200
//!   |                ^^^
//!   = help: latitude must be between -90 and 90 degrees
//! ```
//!
//! No colour is used unless the caller asks for it ([`colour_wanted`]), and the `NO_COLOR`
//! convention (<https://no-color.org>) always switches it off.

use std::fmt;
use std::path::{Path, PathBuf};

use serde::Serialize;

/// How serious a finding is. Errors stop a run; warnings are reported and the run goes on;
/// notes explain an assumption that was made.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Error,
    Warning,
    Note,
}

impl Severity {
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Note => "note",
        }
    }
}

impl fmt::Display for Severity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// One finding. Build it with [`Diagnostic::error`], [`Diagnostic::warning`] or
/// [`Diagnostic::note`] and the `with_*` / [`Diagnostic::at`] helpers.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Diagnostic {
    pub severity: Severity,
    /// The file the finding is about, as the user named it (or as resolved from the site file).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub file: Option<PathBuf>,
    /// 1-based line number in `file`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub line: Option<usize>,
    /// 1-based column (in characters) in `line`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub column: Option<usize>,
    /// The TOML key path (`site.latitude_deg`, `records[0].units.ta`) or CSV column concerned.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub field: Option<String>,
    pub message: String,
    /// What would be valid.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub help: Option<String>,
    /// The offending source line, as it is in the file.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub snippet: Option<String>,
    /// How many characters to underline from `column` (1 when absent).
    #[serde(skip)]
    pub width: Option<usize>,
}

impl Diagnostic {
    pub fn new(severity: Severity, message: impl Into<String>) -> Self {
        Diagnostic {
            severity,
            file: None,
            line: None,
            column: None,
            field: None,
            message: message.into(),
            help: None,
            snippet: None,
            width: None,
        }
    }
    pub fn error(message: impl Into<String>) -> Self {
        Self::new(Severity::Error, message)
    }
    pub fn warning(message: impl Into<String>) -> Self {
        Self::new(Severity::Warning, message)
    }
    pub fn note(message: impl Into<String>) -> Self {
        Self::new(Severity::Note, message)
    }
    pub fn with_file(mut self, file: impl AsRef<Path>) -> Self {
        self.file = Some(file.as_ref().to_path_buf());
        self
    }
    pub fn with_line(mut self, line: usize) -> Self {
        self.line = Some(line);
        self
    }
    pub fn with_column(mut self, column: usize) -> Self {
        self.column = Some(column);
        self
    }
    /// Line and column together (both 1-based).
    pub fn at(self, line: usize, column: usize) -> Self {
        self.with_line(line).with_column(column)
    }
    pub fn with_field(mut self, field: impl Into<String>) -> Self {
        self.field = Some(field.into());
        self
    }
    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }
    pub fn with_snippet(mut self, snippet: impl Into<String>) -> Self {
        self.snippet = Some(snippet.into());
        self
    }
    pub fn with_width(mut self, width: usize) -> Self {
        self.width = Some(width.max(1));
        self
    }
    pub fn is_error(&self) -> bool {
        self.severity == Severity::Error
    }

    /// The text form; `colour` adds ANSI colour to the severity word and the underline.
    pub fn render(&self, colour: bool) -> String {
        let paint = |code: &str, s: &str| -> String {
            if colour {
                format!("\x1b[{code}m{s}\x1b[0m")
            } else {
                s.to_string()
            }
        };
        let sev_code = match self.severity {
            Severity::Error => "1;31",
            Severity::Warning => "1;33",
            Severity::Note => "1;36",
        };
        let mut out = String::new();
        out.push_str(&paint(sev_code, self.severity.as_str()));
        out.push_str(": ");
        out.push_str(&self.message);
        out.push('\n');

        let gutter = self.line.map_or(1, |l| l.to_string().len());
        let pad = " ".repeat(gutter);
        if let Some(file) = &self.file {
            let mut loc = file.display().to_string();
            if let Some(l) = self.line {
                loc.push_str(&format!(":{l}"));
                if let Some(c) = self.column {
                    loc.push_str(&format!(":{c}"));
                }
            }
            if let Some(field) = &self.field {
                loc.push_str(&format!(", field `{field}`"));
            }
            out.push_str(&format!("{pad}--> {loc}\n"));
        } else if let Some(field) = &self.field {
            out.push_str(&format!("{pad}--> field `{field}`\n"));
        }
        if let (Some(line), Some(snippet)) = (self.line, &self.snippet) {
            let (shown, col) = window(snippet, self.column.unwrap_or(1));
            out.push_str(&format!("{pad} |\n"));
            out.push_str(&format!("{line} | {shown}\n"));
            if self.column.is_some() {
                let avail = shown.chars().count().saturating_sub(col - 1).max(1);
                let w = self.width.unwrap_or(1).clamp(1, avail);
                out.push_str(&format!(
                    "{pad} | {}{}\n",
                    " ".repeat(col - 1),
                    paint(sev_code, &"^".repeat(w))
                ));
            }
        }
        if let Some(help) = &self.help {
            out.push_str(&format!("{pad} = help: {help}\n"));
        }
        out
    }
}

/// Longest snippet shown in full; longer lines are cut around the column.
const SNIPPET_MAX_CHARS: usize = 120;

/// Returns the part of `line` to show (tabs as spaces) and the 1-based column within it.
fn window(line: &str, column: usize) -> (String, usize) {
    let chars: Vec<char> = line
        .trim_end_matches(['\r', '\n'])
        .chars()
        .map(|c| if c == '\t' { ' ' } else { c })
        .collect();
    let column = column.max(1);
    if chars.len() <= SNIPPET_MAX_CHARS {
        return (chars.into_iter().collect(), column);
    }
    let start = column
        .saturating_sub(SNIPPET_MAX_CHARS / 2)
        .min(chars.len());
    let end = (start + SNIPPET_MAX_CHARS).min(chars.len());
    let mut s = String::new();
    let mut col = column - start;
    if start > 0 {
        s.push_str("...");
        col += 3;
    }
    s.extend(&chars[start..end]);
    if end < chars.len() {
        s.push_str("...");
    }
    (s, col.max(1))
}

impl fmt::Display for Diagnostic {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.render(false).trim_end_matches('\n'))
    }
}

/// A list of findings in the order they were made.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
#[serde(transparent)]
pub struct Diagnostics {
    items: Vec<Diagnostic>,
}

impl Diagnostics {
    pub fn new() -> Self {
        Self::default()
    }
    pub fn push(&mut self, d: Diagnostic) {
        self.items.push(d);
    }
    pub fn extend(&mut self, other: impl IntoIterator<Item = Diagnostic>) {
        self.items.extend(other);
    }
    pub fn has_errors(&self) -> bool {
        self.items.iter().any(Diagnostic::is_error)
    }
    pub fn count(&self, severity: Severity) -> usize {
        self.items.iter().filter(|d| d.severity == severity).count()
    }
    pub fn len(&self) -> usize {
        self.items.len()
    }
    pub fn is_empty(&self) -> bool {
        self.items.is_empty()
    }
    pub fn iter(&self) -> std::slice::Iter<'_, Diagnostic> {
        self.items.iter()
    }
    pub fn as_slice(&self) -> &[Diagnostic] {
        &self.items
    }
    pub fn into_vec(self) -> Vec<Diagnostic> {
        self.items
    }
    /// Every finding rendered, separated by blank lines, then a count line when there is
    /// anything to count.
    pub fn render(&self, colour: bool) -> String {
        let mut out = String::new();
        for d in &self.items {
            out.push_str(&d.render(colour));
            out.push('\n');
        }
        let (e, w) = (self.count(Severity::Error), self.count(Severity::Warning));
        if e + w > 0 {
            out.push_str(&format!(
                "{}, {}\n",
                plural(e, "error"),
                plural(w, "warning")
            ));
        }
        out
    }
}

fn plural(n: usize, word: &str) -> String {
    if n == 1 {
        format!("1 {word}")
    } else {
        format!("{n} {word}s")
    }
}

impl From<Diagnostic> for Diagnostics {
    fn from(d: Diagnostic) -> Self {
        Diagnostics { items: vec![d] }
    }
}

impl From<Vec<Diagnostic>> for Diagnostics {
    fn from(items: Vec<Diagnostic>) -> Self {
        Diagnostics { items }
    }
}

impl FromIterator<Diagnostic> for Diagnostics {
    fn from_iter<I: IntoIterator<Item = Diagnostic>>(iter: I) -> Self {
        Diagnostics {
            items: iter.into_iter().collect(),
        }
    }
}

impl IntoIterator for Diagnostics {
    type Item = Diagnostic;
    type IntoIter = std::vec::IntoIter<Diagnostic>;
    fn into_iter(self) -> Self::IntoIter {
        self.items.into_iter()
    }
}

impl<'a> IntoIterator for &'a Diagnostics {
    type Item = &'a Diagnostic;
    type IntoIter = std::slice::Iter<'a, Diagnostic>;
    fn into_iter(self) -> Self::IntoIter {
        self.items.iter()
    }
}

impl fmt::Display for Diagnostics {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.render(false).trim_end_matches('\n'))
    }
}

/// How much the commands say on standard error besides errors.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Verbosity {
    /// Errors only (`--quiet`).
    Quiet = 0,
    /// Errors, warnings and notes (the default).
    Normal = 1,
    /// Also progress details (`--verbose`).
    Verbose = 2,
}

static VERBOSITY: std::sync::atomic::AtomicU8 = std::sync::atomic::AtomicU8::new(1);

/// Set once by `main` from `--quiet` / `--verbose`.
pub fn set_verbosity(v: Verbosity) {
    VERBOSITY.store(v as u8, std::sync::atomic::Ordering::Relaxed);
}

/// True under `--quiet`: print errors only.
pub fn quiet() -> bool {
    VERBOSITY.load(std::sync::atomic::Ordering::Relaxed) == Verbosity::Quiet as u8
}

/// True under `--verbose`.
pub fn verbose() -> bool {
    VERBOSITY.load(std::sync::atomic::Ordering::Relaxed) >= Verbosity::Verbose as u8
}

/// Whether to colour output: only when `asked` and the `NO_COLOR` variable is unset or empty.
pub fn colour_wanted(asked: bool) -> bool {
    asked && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn renders_location_snippet_caret_and_help() {
        let d = Diagnostic::error("latitude 200 is outside the valid range")
            .with_file("site.toml")
            .at(3, 16)
            .with_field("site.latitude_deg")
            .with_snippet("latitude_deg = 200")
            .with_width(3)
            .with_help("latitude must be between -90 and 90 degrees");
        let text = d.to_string();
        let expected = "error: latitude 200 is outside the valid range\n \
                        --> site.toml:3:16, field `site.latitude_deg`\n  \
                        |\n\
                        3 | latitude_deg = 200\n  \
                        |                ^^^\n  \
                        = help: latitude must be between -90 and 90 degrees";
        assert_eq!(text, expected);
    }

    #[test]
    fn gutter_grows_with_line_number_and_colour_is_opt_in() {
        let d = Diagnostic::warning("w")
            .with_file("a.csv")
            .at(1234, 1)
            .with_snippet("x,y");
        let text = d.render(false);
        assert!(text.contains("    --> a.csv:1234:1\n"), "{text}");
        assert!(text.contains("1234 | x,y\n"), "{text}");
        assert!(!text.contains('\x1b'));
        assert!(d.render(true).contains("\x1b[1;33mwarning\x1b[0m"));
    }

    #[test]
    fn long_lines_are_windowed_around_the_column() {
        let line = format!("{}BAD{}", "a,".repeat(200), ",b".repeat(200));
        let d = Diagnostic::error("x")
            .with_file("f.csv")
            .at(2, 401)
            .with_snippet(line)
            .with_width(3);
        let text = d.render(false);
        let snippet_line = text.lines().nth(3).unwrap_or_default();
        let caret_line = text.lines().nth(4).unwrap_or_default();
        let caret_at = caret_line.find('^').unwrap_or(0);
        assert_eq!(&snippet_line[caret_at..caret_at + 3], "BAD", "{text}");
    }

    #[test]
    fn collection_counts_and_serialises() {
        let mut ds = Diagnostics::new();
        assert!(!ds.has_errors());
        ds.push(Diagnostic::warning("w"));
        assert!(!ds.has_errors());
        ds.push(Diagnostic::error("e").with_field("site.name"));
        assert!(ds.has_errors());
        assert_eq!(ds.count(Severity::Error), 1);
        let json = serde_json::to_string(&ds).unwrap_or_default();
        assert!(json.starts_with("[{\"severity\":\"warning\""), "{json}");
        assert!(json.contains("\"field\":\"site.name\""), "{json}");
        assert!(ds.render(false).ends_with("1 error, 1 warning\n"));
    }
}
