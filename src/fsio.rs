//! File output that never leaves a partial or clobbered file behind.
//!
//! Every output is written to a temporary file in the destination folder and renamed into
//! place only once it is complete, so a crash, a full disk or Ctrl-C leaves either the old
//! file or no file, never half a file. Temporary files are registered so that the Ctrl-C
//! handler installed by `main` can remove them before the process exits.

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// Temporary files currently being written, removed by [`remove_pending`] on interrupt.
static PENDING: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// Remove every temporary file still being written. Called from the Ctrl-C handler.
pub fn remove_pending() {
    if let Ok(mut list) = PENDING.lock() {
        for p in list.drain(..) {
            let _ = std::fs::remove_file(p);
        }
    }
}

fn forget(path: &Path) {
    if let Ok(mut list) = PENDING.lock() {
        list.retain(|p| p != path);
    }
}

/// The folder an output file will be written into, or an error saying plainly what is
/// wrong with it (missing, or not a folder). Commands call this before expensive work.
pub fn output_folder(path: &Path) -> io::Result<PathBuf> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    match std::fs::metadata(&dir) {
        Ok(m) if !m.is_dir() => Err(io::Error::other(format!(
            "{} is not a folder",
            dir.display()
        ))),
        Err(e) if e.kind() == io::ErrorKind::NotFound => Err(io::Error::new(
            e.kind(),
            format!(
                "the folder {} does not exist; create it first",
                dir.display()
            ),
        )),
        _ => Ok(dir),
    }
}

/// Write `path` atomically: `fill` writes the whole content into a temporary file beside
/// `path`, which is then renamed over it. On any error the temporary file is removed and
/// `path` is left as it was.
pub fn write_atomic<F>(path: &Path, fill: F) -> io::Result<()>
where
    F: FnOnce(&mut dyn Write) -> io::Result<()>,
{
    let dir = output_folder(path)?;
    let tmp = tempfile::Builder::new()
        .prefix(".calcisite-")
        .suffix(".part")
        .tempfile_in(&dir)
        .map_err(|e| {
            io::Error::new(
                e.kind(),
                format!(
                    "cannot create a file in the folder {}: {}",
                    dir.display(),
                    io::Error::from(e.kind())
                ),
            )
        })?;
    let tmp_path = tmp.path().to_path_buf();
    if let Ok(mut list) = PENDING.lock() {
        list.push(tmp_path.clone());
    }
    let result = (|| {
        let mut w = io::BufWriter::new(tmp.as_file());
        fill(&mut w)?;
        w.flush()?;
        drop(w);
        tmp.as_file().sync_all()?;
        // Temporary files are private (0600); the finished output gets ordinary permissions.
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            tmp.as_file()
                .set_permissions(std::fs::Permissions::from_mode(0o644))?;
        }
        tmp.persist(path).map_err(|e| e.error)?;
        Ok(())
    })();
    forget(&tmp_path);
    result
}

/// Write bytes atomically (see [`write_atomic`]).
pub fn write_bytes_atomic(path: &Path, bytes: &[u8]) -> io::Result<()> {
    write_atomic(path, |w| w.write_all(bytes))
}

/// True when `out` names the same file as one of `inputs` (after resolving links), so that
/// a command can refuse to overwrite its own input.
pub fn is_same_file_as_any(out: &Path, inputs: &[PathBuf]) -> bool {
    let Ok(out_abs) = std::fs::canonicalize(out) else {
        return false; // the output does not exist yet, so it cannot be an input
    };
    inputs
        .iter()
        .filter_map(|p| std::fs::canonicalize(p).ok())
        .any(|p| p == out_abs)
}

/// `path` written relative to the folder `base` (both as given or, failing that, both made
/// absolute); the file name alone when no relation can be worked out.
pub fn relative_to(base: &Path, path: &Path) -> PathBuf {
    if let Ok(rest) = path.strip_prefix(base) {
        return rest.to_path_buf();
    }
    let (Ok(base), Ok(path)) = (std::path::absolute(base), std::path::absolute(path)) else {
        return path.file_name().map(PathBuf::from).unwrap_or_default();
    };
    let b: Vec<_> = base.components().collect();
    let p: Vec<_> = path.components().collect();
    let common = b.iter().zip(&p).take_while(|(x, y)| x == y).count();
    if common == 0 {
        return path.file_name().map(PathBuf::from).unwrap_or_default();
    }
    let mut out = PathBuf::new();
    for _ in common..b.len() {
        out.push("..");
    }
    for c in &p[common..] {
        out.push(c);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failed_write_leaves_old_content_and_no_temp_file() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.csv");
        std::fs::write(&target, "old").unwrap();
        let err = write_atomic(&target, |w| {
            w.write_all(b"half")?;
            Err(io::Error::other("boom"))
        });
        assert!(err.is_err());
        assert_eq!(std::fs::read_to_string(&target).unwrap(), "old");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1, "temporary file left behind");
    }

    #[test]
    fn successful_write_replaces_content() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.csv");
        write_bytes_atomic(&target, b"new").unwrap();
        assert_eq!(std::fs::read_to_string(&target).unwrap(), "new");
        assert!(is_same_file_as_any(&target, std::slice::from_ref(&target)));
    }

    #[test]
    fn paths_are_written_relative_to_a_folder() {
        let p = |s: &str| PathBuf::from(s);
        assert_eq!(
            relative_to(Path::new("sites"), Path::new("sites/a.toml")),
            p("a.toml")
        );
        assert_eq!(
            relative_to(Path::new("/x/sites"), Path::new("/x/other/b.toml")),
            p("../other/b.toml")
        );
        assert_eq!(
            relative_to(Path::new("."), Path::new("a.toml")),
            p("a.toml")
        );
        assert_eq!(
            relative_to(Path::new("/x/sites"), Path::new("/x/sites/deep/c.toml")),
            p("deep/c.toml")
        );
    }
}
