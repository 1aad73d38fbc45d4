//! A record that looks like a real coastal-lagoon survey, run through the real binary. The
//! lab file is INVENTED (numbers made up for this test, no real survey): 48 bottle samples
//! with TA and DIC, salinity 0.2–38 across a river-mouth mixing gradient, day-first dates,
//! a byte-order mark, lab column names, and rows sorted by DIC instead of date (as a lab
//! exports them). `check` and `project` must agree (both accept the site, on the same rows),
//! and the findings must be few and right.
//!
//! The invented chemistry: a mixing line TA = 600 + 48·S µmol/kg (freshwater end-member
//! 600 µmol/kg) with ±3 µmol/kg scatter, DIC = 500 + 44·S, temperature 25–30 °C.
//! Units rows under the header are not supported (a second header line is read as data and
//! refused with "not a number"), so the file has none.

use std::path::Path;
use std::process::{Command, Output};

const BIN: &str = env!("CARGO_BIN_EXE_calcisite");

const SITE: &str = r#"[site]
name = "Invented river-mouth lagoon"
latitude_deg = -18.1
longitude_deg = 178.4
depth_min_m = 0.5
depth_max_m = 3.0
utc_offset = "+12:00"

[[records]]
path = "lagoon-survey.csv"
kind = "bottle"
date_format = "day-first"
depth_m = 1.0

[records.columns]
date = "Sample date"
station = "Site"
temp_c = "Temp (C)"
salinity = "Sal"
ta = "TA umol/kg"
dic = "DIC umol/kg"

[seasons]
wet = [11, 12, 1, 2, 3, 4]
dry = [5, 6, 7, 8, 9, 10]

[projection]
horizon_years = [2030, 2050]
members = 20
"#;

/// Salinities of the 48 invented samples: three below the default floor of 5, nine brackish
/// (5 ≤ S < 20), the rest marine.
const SALINITIES: [f64; 48] = [
    0.2, 0.7, 3.1, 6.5, 8.2, 10.4, 12.8, 14.9, 16.3, 17.7, 18.8, 19.6, 21.0, 22.4, 23.9, 25.1,
    26.0, 26.8, 27.5, 28.3, 29.0, 29.6, 30.2, 30.8, 31.3, 31.8, 32.2, 32.6, 33.0, 33.4, 33.7, 34.0,
    34.3, 34.6, 34.9, 35.1, 35.3, 35.5, 35.7, 35.9, 36.1, 36.3, 36.5, 36.7, 36.9, 37.2, 37.6, 38.0,
];

/// The invented lab file: BOM, lab headers, day-first dates (several days above 12, so the
/// dates cannot be month-first), rows sorted by DIC.
fn lab_file() -> String {
    let mut rows: Vec<(f64, String)> = SALINITIES
        .iter()
        .enumerate()
        .map(|(i, &s)| {
            let i = i as u32;
            let station = ["L1", "L2", "L3"][(i % 3) as usize];
            // Weekly from 3 January 2024 in an order unrelated to salinity (days run past 12).
            let week = (i * 7) % 48;
            let day0 = chrono::NaiveDate::from_ymd_opt(2024, 1, 3).unwrap_or_default();
            let date = day0 + chrono::Duration::days(i64::from(7 * week));
            let scatter = [3.0, -3.0, 0.0, 1.5, -1.5][(i % 5) as usize];
            let ta = 600.0 + 48.0 * s + scatter;
            let dic = 500.0 + 44.0 * s + 0.5 * scatter;
            let temp = 25.0 + 5.0 * (f64::from(i) * 0.13).sin().abs();
            let line = format!(
                "{},{station},{temp:.1},{s},{ta:.1},{dic:.1}",
                date.format("%d/%m/%Y")
            );
            (dic, line)
        })
        .collect();
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut text = String::from("\u{feff}Sample date,Site,Temp (C),Sal,TA umol/kg,DIC umol/kg\n");
    for (_, line) in rows {
        text.push_str(&line);
        text.push('\n');
    }
    text
}

fn run(args: &[&str], dir: &Path) -> Output {
    Command::new(BIN)
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .output()
        .unwrap_or_else(|e| panic!("cannot run {BIN}: {e}"))
}

/// The first line of every finding ("warning: ...", "note: ...") on standard error.
fn finding_lines(stderr: &str) -> Vec<&str> {
    stderr
        .lines()
        .filter(|l| {
            l.starts_with("warning: ") || l.starts_with("note: ") || l.starts_with("error: ")
        })
        .collect()
}

#[test]
fn field_like_lagoon_survey_checks_and_projects_with_few_right_findings() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    std::fs::write(dir.path().join("site.toml"), SITE).unwrap_or_else(|e| panic!("{e}"));
    std::fs::write(dir.path().join("lagoon-survey.csv"), lab_file())
        .unwrap_or_else(|e| panic!("{e}"));

    let check = run(&["check", "site.toml"], dir.path());
    let err = String::from_utf8_lossy(&check.stderr).to_string();
    let out = String::from_utf8_lossy(&check.stdout).to_string();
    println!("{err}");
    assert_eq!(check.status.code(), Some(0), "check refused:\n{err}");

    // Three rows below the salinity floor: one warning shown, the others in one line.
    assert!(
        err.contains("warning: salinity 0.2 is below the site's floor of 5"),
        "{err}"
    );
    assert!(
        err.contains("2 more rows like the one above (below-salinity-floor)"),
        "{err}"
    );
    assert!(
        out.contains("Left out of the baseline and outlook: 3 rows with salinity below 5"),
        "{out}"
    );
    // Brackish water, once for the site: 9 of 45 rows used (20 %).
    assert!(
        err.contains("warning: 9 of 45 rows used (20 %) are brackish (salinity below 20)"),
        "{err}"
    );
    assert!(err.contains("an artefact near S = 0"), "{err}");
    // Rows sorted by DIC: the dates are out of order, said once, with no date-format guess
    // (days above 12 cannot be months).
    let order: Vec<&str> = finding_lines(&err)
        .into_iter()
        .filter(|l| l.contains("earlier than the previous row"))
        .collect();
    assert_eq!(order.len(), 1, "{err}");
    assert!(order[0].starts_with("note: "), "{err}");
    assert!(!err.contains("date_format"), "{err}");
    // The mixing line is found and used for nTA with its freshwater end-member.
    assert!(out.contains("TA_S0 6"), "{out}");
    assert!(out.contains("prediction standard error"), "{out}");
    // Few findings: a screenful.
    let lines = finding_lines(&err);
    assert!(lines.len() <= 10, "{} findings:\n{err}", lines.len());
    assert!(err.lines().count() <= 60, "{err}");
    assert!(!err.contains("error: "), "{err}");

    // project agrees: it accepts the same site.
    let project = run(&["project", "site.toml", "-o", "outlook.csv"], dir.path());
    let perr = String::from_utf8_lossy(&project.stderr).to_string();
    assert_eq!(project.status.code(), Some(0), "project refused:\n{perr}");
    let table = std::fs::read_to_string(dir.path().join("outlook.csv")).unwrap_or_default();
    assert!(table.contains("SSP2-4.5,"), "{table}");

    // report runs end to end on it too, and lists what was left out of the outlook and why
    // (the rows below the salinity floor, among the findings and in the per-sample appendix).
    let report = run(
        &["report", "site.toml", "--appendix", "-o", "survey.pdf"],
        dir.path(),
    );
    let rerr = String::from_utf8_lossy(&report.stderr).to_string();
    assert_eq!(report.status.code(), Some(0), "report refused:\n{rerr}");
    let pdf = std::fs::read(dir.path().join("survey.pdf")).unwrap_or_default();
    let text = pdf_extract::extract_text_from_mem(&pdf).unwrap_or_default();
    let flat: String = text.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(flat.contains("below the site's floor of 5"), "{flat}");
    assert!(
        flat.contains("left out of the baseline and the outlook"),
        "{flat}"
    );
    assert!(flat.contains("brackish"), "{flat}");

    // --verbose lists every row finding.
    let verbose = run(&["check", "site.toml", "--verbose"], dir.path());
    let verr = String::from_utf8_lossy(&verbose.stderr).to_string();
    assert!(
        verr.contains("salinity 3.1 is below the site's floor"),
        "{verr}"
    );
    assert!(finding_lines(&verr).len() > lines.len(), "{verr}");
}
