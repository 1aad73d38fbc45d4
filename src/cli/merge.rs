//! The two halves of a sharded `report`: `--shard K/N --results DIR` writes one result file
//! per site of the shard, `--merge DIR` reads every listed site's file back for the ranking and
//! the comparison. A merge refuses files from another tool version, another site list or
//! another seed, and says which sites have no file yet.

use std::path::{Path, PathBuf};

use rayon::prelude::*;

use super::many::{Listed, Shard, result_text};
use super::{EXIT_OK, EXIT_PARTIAL};
use crate::report::many::{RESULT_FORMAT, ResultFile, SiteFailure, SiteResult};

/// The result file of the site on `line` of the list.
pub fn result_path(dir: &Path, line: usize) -> PathBuf {
    dir.join(format!("site-{line:05}.toml"))
}

/// Runs the sites of one shard, writing each one's result file as soon as it is ready (a
/// failed site's file holds its message); returns the exit status: 3 when a site failed.
pub fn run_shard(
    mine: &[&Listed],
    process: &(dyn Fn(&Listed) -> Result<SiteResult, SiteFailure> + Sync),
    dir: &Path,
    shard: Shard,
    hash: &str,
) -> Result<i32, String> {
    let written: Vec<Result<bool, String>> = mine
        .par_iter()
        .map(|l| {
            let outcome = process(l);
            let failed = outcome.is_err();
            let text = result_text(shard, hash, outcome)?;
            let path = result_path(dir, l.line);
            crate::fsio::write_bytes_atomic(&path, text.as_bytes())
                .map_err(|e| format!("cannot write {}: {e}", path.display()))?;
            Ok(failed)
        })
        .collect();
    let mut failed = 0;
    for w in written {
        failed += usize::from(w?);
    }
    if !crate::diag::quiet() {
        eprintln!(
            "shard {shard}: wrote {} result file(s) into {}{}",
            mine.len(),
            dir.display(),
            if failed > 0 {
                format!("; {failed} site(s) failed (their files say why)")
            } else {
                String::new()
            }
        );
    }
    Ok(if failed > 0 { EXIT_PARTIAL } else { EXIT_OK })
}

/// Reads the result file of every listed site; a failed site's message is printed again.
pub fn read_results(
    dir: &Path,
    listed: &[Listed],
    hash: &str,
) -> Result<(Vec<SiteResult>, Vec<SiteFailure>), String> {
    let version = env!("CARGO_PKG_VERSION");
    let mut missing = Vec::new();
    let mut ok = Vec::new();
    let mut failed = Vec::new();
    for l in listed {
        let path = result_path(dir, l.line);
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                missing.push(format!("line {} ({})", l.line, l.shown));
                continue;
            }
            Err(e) => return Err(format!("cannot read {}: {e}", path.display())),
        };
        let file = ResultFile::from_text(&text)
            .map_err(|e| format!("{}: not a calcisite result file: {e}", path.display()))?;
        check_compatible(&path, &file, version, hash, l)?;
        match (file.result, file.failure) {
            (Some(r), _) => ok.push(r),
            (None, Some(f)) => {
                eprint!("{}", f.message);
                failed.push(f);
            }
            (None, None) => {
                return Err(format!(
                    "{}: holds neither a result nor a failure",
                    path.display()
                ));
            }
        }
    }
    if !missing.is_empty() {
        let shown: Vec<&str> = missing.iter().take(5).map(String::as_str).collect();
        return Err(format!(
            "{} has no result for {} listed site(s): {}{}; run every shard (--shard K/N for K = 1 to N) before merging",
            dir.display(),
            missing.len(),
            shown.join(", "),
            if missing.len() > 5 { ", …" } else { "" }
        ));
    }
    Ok((ok, failed))
}

/// Refuses a result file written by another version, format, list or seed, or for another
/// site than the list now has on its line.
fn check_compatible(
    path: &Path,
    file: &ResultFile,
    version: &str,
    hash: &str,
    l: &Listed,
) -> Result<(), String> {
    if file.tool_version != version || file.format != RESULT_FORMAT {
        return Err(format!(
            "{} was written by calcisite {} and this is calcisite {version}: results of \
             different versions are not merged; run every shard again with this version",
            path.display(),
            file.tool_version
        ));
    }
    if file.settings_hash != hash {
        return Err(format!(
            "{} was made with other settings than this merge (another site list or --seed): \
             merge with the --site-list and --seed the shards were run with, or run the \
             shards again",
            path.display()
        ));
    }
    let site = file
        .result
        .as_ref()
        .map(|r| r.file.as_str())
        .or(file.failure.as_ref().map(|f| f.file.as_str()));
    if site != Some(l.shown.as_str()) {
        return Err(format!(
            "{} is for {} but line {} of the list names {}",
            path.display(),
            site.unwrap_or("no site"),
            l.line,
            l.shown
        ));
    }
    Ok(())
}
