//! The built-in Typst templates (compiled into the binary) and `--dump-template`.

use std::path::{Path, PathBuf};

use super::error::ReportError;

/// Name of the main template file; a `--template DIR` must contain it.
pub const MAIN: &str = "report.typ";

/// The built-in templates: (file name, text).
pub const BUILTIN: &[(&str, &str)] = &[
    ("report.typ", include_str!("../../templates/report.typ")),
    ("style.typ", include_str!("../../templates/style.typ")),
    ("summary.typ", include_str!("../../templates/summary.typ")),
    (
        "site-section.typ",
        include_str!("../../templates/site-section.typ"),
    ),
    ("appendix.typ", include_str!("../../templates/appendix.typ")),
    ("exposure.typ", include_str!("../../templates/exposure.typ")),
    ("README.md", include_str!("../../templates/README.md")),
];

/// The text of a built-in template.
pub fn builtin(name: &str) -> Option<&'static str> {
    BUILTIN.iter().find(|(n, _)| *n == name).map(|(_, t)| *t)
}

/// Writes the built-in templates into `dir` (created if missing) for editing. Refuses to
/// overwrite: if any of the files already exists, nothing is written. Returns the written paths.
pub fn dump(dir: &Path) -> Result<Vec<PathBuf>, ReportError> {
    std::fs::create_dir_all(dir).map_err(|e| ReportError::io("create directory", dir, e))?;
    let existing: Vec<String> = BUILTIN
        .iter()
        .map(|(name, _)| dir.join(name))
        .filter(|p| p.symlink_metadata().is_ok())
        .map(|p| p.display().to_string())
        .collect();
    if !existing.is_empty() {
        return Err(ReportError::Refused(format!(
            "not overwriting existing template files: {} (choose an empty directory or remove \
             them first)",
            existing.join(", ")
        )));
    }
    let mut written = Vec::new();
    for (name, text) in BUILTIN {
        let path = dir.join(name);
        // create_new: a file that appeared since the check above is not overwritten either.
        let result = std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&path)
            .and_then(|mut f| {
                use std::io::Write;
                f.write_all(text.as_bytes())?;
                f.sync_all()
            });
        if let Err(e) = result {
            return Err(ReportError::io("write template", &path, e));
        }
        written.push(path);
    }
    Ok(written)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dump_writes_every_template_and_refuses_to_overwrite() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("tpl");
        let written = dump(&target).unwrap();
        assert_eq!(written.len(), BUILTIN.len());
        let main = std::fs::read_to_string(target.join(MAIN)).unwrap();
        assert_eq!(main, builtin(MAIN).unwrap());
        // A second dump must fail and leave the edited file alone.
        std::fs::write(target.join("style.typ"), "// edited").unwrap();
        let e = dump(&target).unwrap_err().to_string();
        assert!(e.contains("not overwriting"), "{e}");
        assert_eq!(
            std::fs::read_to_string(target.join("style.typ")).unwrap(),
            "// edited"
        );
    }

    #[test]
    fn main_template_imports_only_builtin_files() {
        for (name, text) in BUILTIN {
            for line in text
                .lines()
                .filter(|l| l.trim_start().starts_with("#import"))
            {
                let file = line.split('"').nth(1).unwrap_or_default();
                assert!(builtin(file).is_some(), "{name} imports unknown {file}");
            }
        }
    }
}
