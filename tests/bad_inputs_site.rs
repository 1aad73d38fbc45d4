//! `check --format json` on site and record inputs, run through the built binary: the
//! structured output of a failing and of a passing site. The messages of bad site files and
//! records (file, line, column, field, help) are checked in one place, the bad-input corpus
//! `tests/bad_inputs/` (run by `tests/bad_inputs.rs`); `init` → fill in → `check` → `project`
//! is in `tests/cli_demo.rs`.

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use calcisite::cli::{EXIT_INPUT, EXIT_OK};

const BIN: &str = env!("CARGO_BIN_EXE_calcisite");

const SITE: &str = r#"[site]
name = "Test reef"
latitude_deg = -8.0
longitude_deg = -127.0
depth_min_m = 1.0
depth_max_m = 5.0
utc_offset = "-08:00"

[[records]]
path = "bottles.csv"
kind = "bottle"
"#;

const CSV: &str = "date,station,temp_c,salinity,depth_m,ta,dic\n\
    2024-01-10,A,27.0,35.2,3,2350,2010\n\
    2024-01-11,A,27.1,35.3,3,2352,2012\n\
    2024-01-12,A,27.2,35.1,3,2348,2008\n";

/// Every file in `dir` with its bytes.
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Vec<u8>> {
    let mut out = BTreeMap::new();
    for e in fs::read_dir(dir).into_iter().flatten().flatten() {
        let p = e.path();
        if p.is_file() {
            out.insert(p.clone(), fs::read(&p).unwrap_or_default());
        }
    }
    out
}

fn run(args: &[&str], cwd: &Path) -> Output {
    Command::new(BIN)
        .args(args)
        .current_dir(cwd)
        .env("NO_COLOR", "1")
        .output()
        .unwrap_or_else(|e| panic!("cannot run {BIN}: {e}"))
}

/// Writes the site and CSV, runs `check`, asserts the failure contract and returns stderr.
fn check_fails(site: &str, csv: &str) -> String {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("site.toml"), site).unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("bottles.csv"), csv).unwrap_or_else(|e| panic!("{e}"));
    let before = snapshot(dir.path());
    let out = run(&["check", "site.toml"], dir.path());
    let stderr = String::from_utf8_lossy(&out.stderr).to_string();
    assert_eq!(
        out.status.code(),
        Some(EXIT_INPUT),
        "expected the input-error status; stderr:\n{stderr}"
    );
    assert_eq!(
        snapshot(dir.path()),
        before,
        "check wrote or changed a file"
    );
    assert!(stderr.contains("= help: "), "no help line:\n{stderr}");
    stderr
}

#[test]
fn every_row_error_is_listed_and_json_reports_them() {
    let csv = CSV
        .replace("27.0", "n/d")
        .replace("2024-01-12", "12/01/2024");
    let e = check_fails(SITE, &csv);
    assert!(e.contains("--> bottles.csv:2:"), "{e}");
    assert!(e.contains("--> bottles.csv:4:"), "{e}");
    assert!(e.contains("2 errors"), "{e}");

    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("site.toml"), SITE).unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("bottles.csv"), &csv).unwrap_or_else(|e| panic!("{e}"));
    let out = run(&["check", "site.toml", "--format", "json"], dir.path());
    assert_eq!(out.status.code(), Some(EXIT_INPUT));
    let v: serde_json::Value =
        serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(v["status"], "error");
    let diags = v["diagnostics"].as_array().cloned().unwrap_or_default();
    assert_eq!(
        diags.iter().filter(|d| d["severity"] == "error").count(),
        2,
        "{v}"
    );
    assert!(
        diags.iter().any(|d| d["line"] == 4 && d["field"] == "date"),
        "{v}"
    );
    // The typed findings: one per row, with kind, line, cell and field as fields.
    let findings = v["findings"].as_array().cloned().unwrap_or_default();
    assert_eq!(findings.len(), 2, "{v}");
    assert_eq!(findings[0]["kind"], "non-numeric", "{v}");
    assert_eq!(findings[0]["line"], 2, "{v}");
    assert_eq!(findings[0]["cell"], 2, "{v}");
    assert_eq!(findings[0]["field"], "temp_c", "{v}");
    assert_eq!(findings[1]["kind"], "bad-date", "{v}");
    assert_eq!(findings[1]["line"], 4, "{v}");
    assert_eq!(findings[1]["severity"], "error", "{v}");
}

#[test]
fn good_site_passes_in_text_and_json() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("site.toml"), SITE).unwrap_or_else(|e| panic!("{e}"));
    fs::write(dir.path().join("bottles.csv"), CSV).unwrap_or_else(|e| panic!("{e}"));
    let before = snapshot(dir.path());
    let out = run(&["check", "site.toml"], dir.path());
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(
        out.status.code(),
        Some(EXIT_OK),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(stdout.contains("Site: Test reef"), "{stdout}");
    assert!(stdout.contains("TA+DIC 3"), "{stdout}");
    let out = run(&["check", "site.toml", "--format", "json"], dir.path());
    assert_eq!(out.status.code(), Some(EXIT_OK));
    let v: serde_json::Value =
        serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(v["status"], "ok");
    assert_eq!(v["site"]["baseline"]["whole_record"]["n_solved"], 3);
    assert_eq!(snapshot(dir.path()), before);
}
