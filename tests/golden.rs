//! Golden outputs: the real binary on every invented demo site must write the same bytes as the
//! files committed in `tests/golden/` — the `check` JSON, the `project` CSV tables and JSON, the
//! `solve` CSV of the demo bottle file, and the report PDFs. The PDFs and the large `project` JSON
//! are kept as SHA-256 digests (with the PDF's text beside its digest, so a change can be read).
//!
//! These files are not an outside reference; they pin behaviour across refactors, so that a
//! restructuring that should change nothing visibly changes nothing. When a change is intended,
//! regenerate them once, in the commit that makes the change, and say which outputs changed and
//! why in the commit message:
//!
//! ```sh
//! CALCISITE_BLESS=1 cargo test --release --test golden
//! ```

use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;

use sha2::{Digest, Sha256};

/// A fixed "prepared" date for the reports (2026-05-28T20:26:40Z), so the PDFs do not depend on
/// the clock.
const SOURCE_DATE_EPOCH: &str = "1780000000";

const SITES: [&str; 3] = ["forereef", "lagoon", "pass"];

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn golden_dir() -> PathBuf {
    root().join("tests").join("golden")
}

fn bless() -> bool {
    std::env::var_os("CALCISITE_BLESS").is_some_and(|v| !v.is_empty() && v != "0")
}

/// Runs the binary from the repository root (relative paths, as a user would) and returns
/// stdout; panics with stderr when it fails.
fn run(args: &[&str]) -> Vec<u8> {
    let out = Command::new(env!("CARGO_BIN_EXE_calcisite"))
        .args(args)
        .current_dir(root())
        .env("SOURCE_DATE_EPOCH", SOURCE_DATE_EPOCH)
        .env("NO_COLOR", "1")
        .output()
        .expect("binary runs");
    assert!(
        out.status.success(),
        "calcisite {} exited {:?}\n{}",
        args.join(" "),
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    out.stdout
}

/// Compares `bytes` with the golden file `name` (or writes it when blessing). Returns a
/// description of the mismatch, if any.
fn compare(name: &str, bytes: &[u8]) -> Option<String> {
    let path = golden_dir().join(name);
    if bless() {
        fs::create_dir_all(golden_dir()).expect("golden dir");
        fs::write(&path, bytes).expect("write golden");
        return None;
    }
    let want = match fs::read(&path) {
        Ok(w) => w,
        Err(e) => return Some(format!("{name}: cannot read golden file ({e})")),
    };
    if want == bytes {
        return None;
    }
    let (w, g) = (
        String::from_utf8_lossy(&want),
        String::from_utf8_lossy(bytes),
    );
    let first = w
        .lines()
        .zip(g.lines())
        .position(|(a, b)| a != b)
        .unwrap_or_else(|| w.lines().count().min(g.lines().count()));
    Some(format!(
        "{name}: differs from the golden file first at line {}\n  golden: {}\n  now:    {}",
        first + 1,
        w.lines().nth(first).unwrap_or("<end of file>"),
        g.lines().nth(first).unwrap_or("<end of file>")
    ))
}

fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn temp_path(dir: &Path, name: &str) -> String {
    dir.join(name).to_string_lossy().into_owned()
}

fn site_file(s: &str) -> String {
    format!("sites/tala-vesi-{s}.toml")
}

#[test]
fn check_outputs_match_the_goldens() {
    let mut diffs = Vec::new();
    for s in SITES {
        let out = run(&["check", &site_file(s), "--format", "json"]);
        diffs.extend(compare(&format!("check-{s}.json"), &out));
    }
    assert!(diffs.is_empty(), "{}", diffs.join("\n"));
}

#[test]
fn project_outputs_match_the_goldens() {
    let mut diffs = Vec::new();
    for s in SITES {
        let site = site_file(s);
        let out = run(&["project", &site, "--format", "csv"]);
        diffs.extend(compare(&format!("project-{s}.csv"), &out));
        for table in ["crossings", "thresholds", "exposure", "diel"] {
            let out = run(&["project", &site, "--format", "csv", "--table", table]);
            diffs.extend(compare(&format!("project-{s}-{table}.csv"), &out));
        }
        // The JSON holds the same numbers as the CSV tables (which show a readable diff) and
        // runs to megabytes, so only its digest is kept.
        let out = run(&["project", &site, "--format", "json"]);
        let digest = format!("{}\n", sha256_hex(&out));
        diffs.extend(compare(
            &format!("project-{s}.json.sha256"),
            digest.as_bytes(),
        ));
    }
    assert!(diffs.is_empty(), "{}", diffs.join("\n"));
}

#[test]
fn solve_output_matches_the_golden() {
    let out = run(&["solve", "demo-data/lagoon-bottles-solve.csv"]);
    let diffs: Vec<String> = compare("solve-lagoon.csv", &out).into_iter().collect();
    assert!(diffs.is_empty(), "{}", diffs.join("\n"));
}

#[test]
fn report_pdfs_match_the_goldens() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut diffs = Vec::new();
    let mut jobs: Vec<(String, Vec<String>)> = SITES
        .iter()
        .map(|s| (format!("report-{s}"), vec![site_file(s)]))
        .collect();
    jobs.push((
        "report-comparison".to_string(),
        SITES.iter().map(|s| site_file(s)).collect(),
    ));
    for (name, sites) in jobs {
        let pdf = temp_path(dir.path(), &format!("{name}.pdf"));
        let mut args: Vec<&str> = vec!["report"];
        args.extend(sites.iter().map(String::as_str));
        args.extend(["-o", &pdf]);
        run(&args);
        let bytes = fs::read(&pdf).expect("report written");
        // The text first: its diff says what changed when the digest does.
        let text = pdf_extract::extract_text_from_mem(&bytes).expect("PDF text");
        diffs.extend(compare(&format!("{name}.txt"), text.as_bytes()));
        let digest = format!("{}\n", sha256_hex(&bytes));
        diffs.extend(compare(&format!("{name}.pdf.sha256"), digest.as_bytes()));
    }
    assert!(diffs.is_empty(), "{}", diffs.join("\n"));
}
