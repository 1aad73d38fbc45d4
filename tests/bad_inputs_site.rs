//! Bad site and record inputs, run through the built binary: each must exit with the input-error
//! status,
//! name the file, the line and the column or field, say what would be valid, write nothing
//! and leave every input file as it was. Also `init` → fill in → `check`.

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
fn toml_syntax_error() {
    let e = check_fails(
        &SITE.replace("latitude_deg = -8.0", "latitude_deg = = -8.0"),
        CSV,
    );
    assert!(e.contains("error: TOML syntax error"), "{e}");
    assert!(e.contains("--> site.toml:3:"), "{e}");
}

#[test]
fn unknown_key_with_suggestion() {
    let e = check_fails(&SITE.replace("longitude_deg", "longitud_deg"), CSV);
    assert!(e.contains("unknown key `longitud_deg` in `site`"), "{e}");
    assert!(
        e.contains("--> site.toml:4:1, field `site.longitud_deg`"),
        "{e}"
    );
    assert!(e.contains("did you mean `longitude_deg`?"), "{e}");
}

#[test]
fn wrong_type() {
    let e = check_fails(
        &SITE.replace("depth_min_m = 1.0", "depth_min_m = true"),
        CSV,
    );
    assert!(e.contains("wrong type: found boolean"), "{e}");
    assert!(
        e.contains("--> site.toml:5:15, field `site.depth_min_m`"),
        "{e}"
    );
    assert!(e.contains("expected a number"), "{e}");
}

#[test]
fn latitude_200() {
    let e = check_fails(
        &SITE.replace("latitude_deg = -8.0", "latitude_deg = 200"),
        CSV,
    );
    assert!(
        e.contains("--> site.toml:3:16, field `site.latitude_deg`"),
        "{e}"
    );
    assert!(e.contains("3 | latitude_deg = 200"), "{e}");
    assert!(
        e.contains("latitude must be between -90 and 90 degrees"),
        "{e}"
    );
}

#[test]
fn negative_depth() {
    let e = check_fails(
        &SITE.replace("depth_max_m = 5.0", "depth_max_m = -5.0"),
        CSV,
    );
    assert!(
        e.contains("--> site.toml:6:15, field `site.depth_max_m`"),
        "{e}"
    );
    assert!(
        e.contains("depth_max_m must be between 0 and 1000 m"),
        "{e}"
    );
}

#[test]
fn missing_record_file() {
    let e = check_fails(&SITE.replace("bottles.csv", "missing.csv"), CSV);
    assert!(
        e.contains("record file `missing.csv` does not exist"),
        "{e}"
    );
    assert!(
        e.contains("--> site.toml:10:8, field `records[0].path`"),
        "{e}"
    );
    assert!(
        e.contains("paths are relative to the folder of the site file"),
        "{e}"
    );
}

#[test]
fn missing_mapped_column() {
    let site = format!("{SITE}\n[records.columns]\ndic = \"DIC_umol_kg\"\n");
    let e = check_fails(&site, CSV);
    assert!(
        e.contains("column `DIC_umol_kg` (mapped to `dic` in the site file) is not in the header"),
        "{e}"
    );
    assert!(
        e.contains("--> bottles.csv:1, field `records[0].columns.dic`"),
        "{e}"
    );
    assert!(
        e.contains("1 | date,station,temp_c,salinity,depth_m,ta,dic"),
        "{e}"
    );
    assert!(e.contains("did you mean `dic`?"), "{e}");
}

#[test]
fn non_numeric_cell() {
    let e = check_fails(SITE, &CSV.replace("35.3", "thirty-five"));
    assert!(e.contains("error: `thirty-five` is not a number"), "{e}");
    assert!(e.contains("--> bottles.csv:3:19, field `salinity`"), "{e}");
    assert!(e.contains("expected a number such as 2301.5"), "{e}");
}

#[test]
fn impossible_date() {
    let e = check_fails(SITE, &CSV.replace("2024-01-11", "2024-02-30"));
    assert!(
        e.contains("`2024-02-30` is not a calendar date: February 2024 has 29 days"),
        "{e}"
    );
    assert!(e.contains("--> bottles.csv:3:1, field `date`"), "{e}");
    assert!(e.contains("the day must be between 1 and 29"), "{e}");
}

#[test]
fn unknown_unit() {
    let site = format!("{SITE}\n[records.units]\ndic = \"mol/m3\"\n");
    let e = check_fails(&site, CSV);
    assert!(e.contains("unknown value \"mol/m3\""), "{e}");
    assert!(
        e.contains("--> site.toml:14:7, field `records[0].units.dic`"),
        "{e}"
    );
    assert!(e.contains("`umol/kg`") && e.contains("`mmol/kg`"), "{e}");
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

#[test]
fn init_then_fill_in_then_check() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let target = dir.path().join("new-site");
    let out = run(&["init", "new-site"], dir.path());
    assert_eq!(
        out.status.code(),
        Some(EXIT_OK),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let site = target.join("site.toml");
    let csv = target.join("records.csv");
    assert!(site.is_file() && csv.is_file());

    // The untouched template has no data rows yet: check says so and fails.
    let out = run(&["check", "new-site/site.toml"], dir.path());
    assert_eq!(out.status.code(), Some(EXIT_INPUT));
    assert!(String::from_utf8_lossy(&out.stderr).contains("has no data rows"));

    // A second init refuses and leaves the files alone.
    let before = snapshot(&target);
    let out = run(&["init", "new-site"], dir.path());
    assert_eq!(out.status.code(), Some(EXIT_INPUT));
    assert!(String::from_utf8_lossy(&out.stderr).contains("already exists"));
    assert_eq!(snapshot(&target), before);

    // Fill in real numbers under the template header: check accepts it.
    let mut text = fs::read_to_string(&csv).unwrap_or_default();
    text.push_str("2024-03-01,S1,3,28.1,35.2,2350,2010,,,1.2,0.15\n");
    text.push_str("2024-03-02,S1,3,28.2,35.2,2351,2011,,,1.1,0.14\n");
    text.push_str("2024-03-03,S1,3,28.0,35.3,2352,2012,,,1.0,0.16\n");
    fs::write(&csv, text).unwrap_or_else(|e| panic!("{e}"));
    let out = run(&["check", "new-site/site.toml"], dir.path());
    assert_eq!(
        out.status.code(),
        Some(EXIT_OK),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn projection_settings_the_outlook_refuses_are_caught_by_check() {
    let site =
        format!("{SITE}\n[calcification]\nrelationships = [\"chan2013\", \"silvermann2009\"]\n");
    let e = check_fails(&site, CSV);
    assert!(
        e.contains("unknown calcification relationship \"silvermann2009\""),
        "{e}"
    );
    assert!(
        e.contains("--> site.toml:14:30, field `calcification.relationships[1]`"),
        "{e}"
    );
    assert!(e.contains("silverman2009"), "{e}");
}
