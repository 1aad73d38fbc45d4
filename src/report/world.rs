//! The typesetter's world: fonts, templates and in-memory data, all inside the process.
//!
//! * Fonts: the typst-assets set (Libertinus Serif, New Computer Modern, DejaVu Sans Mono) plus
//!   DejaVu Sans (regular, bold, oblique, bold oblique, condensed regular and bold). No system
//!   fonts are read, so the output does not depend on the machine.
//! * Files: the data (`/data.json`) and figures (`/plots/*.svg`) live in memory; templates come
//!   from the built-in set or, with `--template DIR`, from DIR only. A path that resolves outside
//!   DIR (through `..`, which the typesetter already rejects, or through a symbolic link) is an
//!   error; packages (`@preview/...`) are not available.
//! * Time: `today()` is the report date, never the clock.

use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::sync::{Mutex, OnceLock};

use typst::diag::{FileError, FileResult, Severity, SourceDiagnostic};
use typst::foundations::{Bytes, Datetime};
use typst::syntax::{FileId, RootedPath, Source, VirtualPath, VirtualRoot};
use typst::text::{Font, FontBook};
use typst::utils::LazyHash;
use typst::{Library, LibraryExt, World, WorldExt};

use super::error::ReportError;
use super::model::ReportTime;
use super::templates;

/// Where the templates come from.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub enum TemplateSource {
    /// The templates compiled into the binary.
    #[default]
    BuiltIn,
    /// A directory holding `report.typ` and whatever it imports (`--template DIR`).
    Dir(PathBuf),
}

struct FontSet {
    book: LazyHash<FontBook>,
    fonts: Vec<Font>,
}

static FONTS: OnceLock<FontSet> = OnceLock::new();

fn font_set() -> &'static FontSet {
    FONTS.get_or_init(|| {
        let mut fonts = Vec::new();
        for data in typst_assets::fonts() {
            fonts.extend(Font::iter(Bytes::new(data)));
        }
        for data in [
            dejavu::sans::regular(),
            dejavu::sans::bold(),
            dejavu::sans::oblique(),
            dejavu::sans::bold_oblique(),
            dejavu::sans_condensed::regular(),
            dejavu::sans_condensed::bold(),
        ] {
            fonts.extend(Font::iter(Bytes::new(data)));
        }
        let book = FontBook::from_fonts(&fonts);
        FontSet {
            book: LazyHash::new(book),
            fonts,
        }
    })
}

/// Families the templates and figures rely on (lower case, as the font book keys them).
const REQUIRED_FAMILIES: [&str; 2] = ["dejavu sans", "libertinus serif"];

/// Checks that the embedded fonts include every family the report uses. Without this a missing
/// family would silently fall back to another face in the figures.
pub fn check_fonts() -> Result<(), ReportError> {
    let set = font_set();
    let missing: Vec<&str> = REQUIRED_FAMILIES
        .iter()
        .copied()
        .filter(|f| !set.book.contains_family(f))
        .collect();
    if missing.is_empty() {
        Ok(())
    } else {
        Err(ReportError::Fonts(format!(
            "font famil{} {} not found among the {} embedded fonts",
            if missing.len() == 1 { "y" } else { "ies" },
            missing.join(", "),
            set.fonts.len()
        )))
    }
}

/// Number of embedded font faces (for tests and `--verbose`).
pub fn font_count() -> usize {
    font_set().fonts.len()
}

enum Templates {
    BuiltIn,
    Dir { shown: PathBuf, canonical: PathBuf },
}

/// The in-memory world one report is compiled in.
pub struct ReportWorld {
    library: LazyHash<Library>,
    fonts: &'static FontSet,
    main: FileId,
    templates: Templates,
    memory: HashMap<FileId, Bytes>,
    sources: Mutex<HashMap<FileId, FileResult<Source>>>,
    today: Datetime,
}

fn file_id(path: &str) -> Result<FileId, ReportError> {
    let vpath = VirtualPath::new(path)
        .map_err(|e| ReportError::Model(format!("bad internal path {path:?}: {e}")))?;
    Ok(RootedPath::new(VirtualRoot::Project, vpath).intern())
}

impl ReportWorld {
    /// A world with the given templates, the view data as `/data.json` and extra in-memory
    /// files (path → bytes, e.g. `/plots/s0-fan0.svg`).
    pub fn new(
        template: &TemplateSource,
        data_json: Vec<u8>,
        files: Vec<(String, Vec<u8>)>,
        date: ReportTime,
    ) -> Result<Self, ReportError> {
        check_fonts()?;
        let templates = match template {
            TemplateSource::BuiltIn => Templates::BuiltIn,
            TemplateSource::Dir(dir) => {
                let canonical =
                    std::fs::canonicalize(dir).map_err(|e| ReportError::TemplateDir {
                        path: dir.clone(),
                        message: e.to_string(),
                    })?;
                if !canonical.is_dir() {
                    return Err(ReportError::TemplateDir {
                        path: dir.clone(),
                        message: "not a directory".to_string(),
                    });
                }
                if !canonical.join(templates::MAIN).is_file() {
                    return Err(ReportError::TemplateDir {
                        path: dir.clone(),
                        message: format!(
                            "has no {} (write the built-in templates there with --dump-template)",
                            templates::MAIN
                        ),
                    });
                }
                Templates::Dir {
                    shown: dir.clone(),
                    canonical,
                }
            }
        };
        let mut memory = HashMap::new();
        memory.insert(file_id("/data.json")?, Bytes::new(data_json));
        for (path, bytes) in files {
            memory.insert(file_id(&path)?, Bytes::new(bytes));
        }
        let today = Datetime::from_ymd(date.year, date.month, date.day).ok_or_else(|| {
            ReportError::Timestamp(format!("report date {} does not exist", date.iso_date()))
        })?;
        Ok(Self {
            library: LazyHash::new(Library::builder().build()),
            fonts: font_set(),
            main: file_id(&format!("/{}", templates::MAIN))?,
            templates,
            memory,
            sources: Mutex::new(HashMap::new()),
            today,
        })
    }

    fn load(&self, id: FileId) -> FileResult<Bytes> {
        if let VirtualRoot::Package(spec) = id.root() {
            return Err(FileError::Other(Some(
                format!(
                    "package {spec} is not available: reports are typeset offline from the \
                     built-in or --template files only"
                )
                .into(),
            )));
        }
        if let Some(b) = self.memory.get(&id) {
            return Ok(b.clone());
        }
        let vpath = id.vpath();
        match &self.templates {
            Templates::BuiltIn => templates::builtin(vpath.get_without_slash())
                .filter(|_| vpath.get_without_slash().ends_with(".typ"))
                .map(Bytes::from_string)
                .ok_or_else(|| FileError::NotFound(PathBuf::from(vpath.get_with_slash()))),
            Templates::Dir { shown, canonical } => read_confined(canonical, shown, vpath),
        }
    }

    /// A readable name for a file in diagnostics: the real path for a template directory,
    /// `templates/NAME (built-in)` for a built-in template, else the in-memory path.
    pub fn display_name(&self, id: FileId) -> String {
        let vpath = id.vpath();
        if self.memory.contains_key(&id) {
            return vpath.get_with_slash().to_string();
        }
        match &self.templates {
            Templates::BuiltIn => format!("templates/{} (built-in)", vpath.get_without_slash()),
            Templates::Dir { shown, .. } => {
                shown.join(vpath.get_without_slash()).display().to_string()
            }
        }
    }

    /// Renders diagnostics like a compiler: severity and message, `--> file:line:column`, the
    /// source line with a marker, the call trace and hints.
    pub fn render_diagnostics(&self, diags: &[SourceDiagnostic]) -> String {
        use std::fmt::Write;
        let mut out = String::new();
        for d in diags {
            let sev = match d.severity {
                Severity::Error => "error",
                Severity::Warning => "warning",
            };
            let _ = writeln!(out, "{sev}: {}", d.message);
            if let Some(loc) = self.locate(d.span) {
                let _ = writeln!(out, "  --> {}", loc.header);
                if let Some((number, text, col, width)) = loc.snippet {
                    let gutter = " ".repeat(number.to_string().len());
                    let _ = writeln!(out, "{gutter} |");
                    let _ = writeln!(out, "{number} | {text}");
                    let _ = writeln!(
                        out,
                        "{gutter} | {}{}",
                        " ".repeat(col),
                        "^".repeat(width.max(1))
                    );
                }
            }
            for t in &d.trace {
                match self.locate(t.span.into()) {
                    Some(loc) => {
                        let _ = writeln!(out, "  = note: {} at {}", t.v, loc.header);
                    }
                    None => {
                        let _ = writeln!(out, "  = note: {}", t.v);
                    }
                }
            }
            for h in &d.hints {
                // The typesetter's own command-line hints name flags this program does not have.
                let hint = if h.v.contains("--root") {
                    "a template may read only files in its own directory and the report data \
                     (/data.json, /plots/)"
                } else {
                    h.v.as_str()
                };
                let _ = writeln!(out, "  = hint: {hint}");
            }
        }
        out
    }

    fn locate(&self, span: typst::syntax::DiagSpan) -> Option<Location> {
        let id = span.id()?;
        let name = self.display_name(id);
        let range = self.range(span);
        let source = self.source(id).ok();
        match (range, source) {
            (Some(range), Some(source)) => {
                let lines = source.lines();
                let (line, col) = lines.byte_to_line_column(range.start)?;
                let line_range = lines.line_to_range(line)?;
                let text = source
                    .text()
                    .get(line_range.clone())?
                    .trim_end_matches(['\n', '\r']);
                // Marker width in characters, limited to the end of the line.
                let end = range.end.min(line_range.start + text.len());
                let width = source
                    .text()
                    .get(range.start.min(end)..end)
                    .map_or(1, |s| s.chars().count());
                let col_chars = text
                    .get(..range.start.saturating_sub(line_range.start))
                    .map_or(col, |s| s.chars().count());
                Some(Location {
                    header: format!("{name}:{}:{}", line + 1, col_chars + 1),
                    snippet: Some((line + 1, text.to_string(), col_chars, width)),
                })
            }
            _ => Some(Location {
                header: name,
                snippet: None,
            }),
        }
    }
}

struct Location {
    header: String,
    /// (1-based line number, line text, 0-based column in chars, marker width in chars)
    snippet: Option<(usize, String, usize, usize)>,
}

/// Reads a file of a template directory, refusing anything that resolves outside it.
fn read_confined(
    canonical_root: &Path,
    shown_root: &Path,
    vpath: &VirtualPath,
) -> FileResult<Bytes> {
    let path = vpath.realize(canonical_root)?;
    let shown = shown_root.join(vpath.get_without_slash());
    let real = match std::fs::canonicalize(&path) {
        Ok(p) => p,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            return Err(FileError::NotFound(shown));
        }
        Err(e) => return Err(FileError::from_io(e, &shown)),
    };
    if !real.starts_with(canonical_root) {
        return Err(FileError::Other(Some(
            format!(
                "{} resolves to {}, outside the template directory {}; templates may read only \
                 their own directory and the report data",
                shown.display(),
                real.display(),
                shown_root.display()
            )
            .into(),
        )));
    }
    if real.is_dir() {
        return Err(FileError::IsDirectory);
    }
    std::fs::read(&real)
        .map(Bytes::new)
        .map_err(|e| FileError::from_io(e, &shown))
}

impl World for ReportWorld {
    fn library(&self) -> &LazyHash<Library> {
        &self.library
    }

    fn book(&self) -> &LazyHash<FontBook> {
        &self.fonts.book
    }

    fn main(&self) -> FileId {
        self.main
    }

    fn source(&self, id: FileId) -> FileResult<Source> {
        if let Ok(cache) = self.sources.lock()
            && let Some(s) = cache.get(&id)
        {
            return s.clone();
        }
        let result = self.load(id).and_then(|bytes| {
            let text = std::str::from_utf8(bytes.as_slice()).map_err(|_| FileError::InvalidUtf8)?;
            // A byte-order mark is not part of the source.
            let text = text.strip_prefix('\u{feff}').unwrap_or(text);
            Ok(Source::new(id, text.to_string()))
        });
        if let Ok(mut cache) = self.sources.lock() {
            cache.insert(id, result.clone());
        }
        result
    }

    fn file(&self, id: FileId) -> FileResult<Bytes> {
        self.load(id)
    }

    fn font(&self, index: usize) -> Option<Font> {
        self.fonts.fonts.get(index).cloned()
    }

    fn today(&self, _offset: Option<typst::foundations::Duration>) -> Option<Datetime> {
        Some(self.today)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fonts_include_dejavu_sans_in_four_styles() {
        check_fonts().unwrap();
        let book = &font_set().book;
        let faces: Vec<usize> = book.select_family("dejavu sans").collect();
        // regular, bold, oblique, bold oblique, condensed regular and bold
        assert!(faces.len() >= 6, "only {} DejaVu Sans faces", faces.len());
        assert!(font_count() >= 17 + 6);
    }

    #[test]
    fn missing_template_dir_or_main_file_is_a_clear_error() {
        let t = ReportTime::from_ymd(2025, 1, 1).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let e = ReportWorld::new(&TemplateSource::Dir(dir.path().into()), vec![], vec![], t)
            .err()
            .unwrap()
            .to_string();
        assert!(e.contains("has no report.typ"), "{e}");
        let e = ReportWorld::new(
            &TemplateSource::Dir(dir.path().join("nope")),
            vec![],
            vec![],
            t,
        )
        .err()
        .unwrap()
        .to_string();
        assert!(e.contains("nope"), "{e}");
    }

    #[cfg(unix)]
    #[test]
    fn symlink_out_of_the_template_dir_is_refused() {
        let outside = tempfile::tempdir().unwrap();
        std::fs::write(outside.path().join("secret.txt"), "secret").unwrap();
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("report.typ"), "hello").unwrap();
        std::os::unix::fs::symlink(
            outside.path().join("secret.txt"),
            dir.path().join("link.txt"),
        )
        .unwrap();
        let t = ReportTime::from_ymd(2025, 1, 1).unwrap();
        let w =
            ReportWorld::new(&TemplateSource::Dir(dir.path().into()), vec![], vec![], t).unwrap();
        let e = w
            .file(file_id("/link.txt").unwrap())
            .unwrap_err()
            .to_string();
        assert!(e.contains("outside the template directory"), "{e}");
        // The main file is readable; an absolute path is taken inside the directory.
        assert!(w.file(file_id("/report.typ").unwrap()).is_ok());
        assert!(matches!(
            w.file(file_id("/etc/passwd").unwrap()),
            Err(FileError::NotFound(_))
        ));
    }
}
