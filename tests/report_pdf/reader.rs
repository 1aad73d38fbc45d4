//! The report as its readers use it: dates, settings printed once, paths and identifiers,
//! units, and the appendix listing (part of the `report_pdf` tests; helpers in the parent).

use std::collections::BTreeSet;

use super::*;

#[test]
fn settings_shared_by_every_site_are_printed_once() {
    // Every demo site projects with the same ensemble settings: each setting's name is printed
    // once (under Methods), not once per site and again under Reproducibility.
    for (report, what) in [(one(), "one-site"), (comparison(), "comparison")] {
        for name in [
            "Disequilibrium",
            "Record variability",
            "Measurement uncertainties",
            "Constant uncertainties",
        ] {
            let n = report.squeezed.matches(&squeeze(name)).count();
            assert_eq!(n, 1, "{what}: {name:?} printed {n} times");
        }
    }
}

/// Renders the lagoon report with the site given by its absolute path from another folder.
fn render_from_elsewhere() -> (Report, String) {
    let elsewhere = tempfile::tempdir().expect("temp dir");
    let out = elsewhere.path().join("r.pdf");
    let site = repo().join(LAGOON);
    let o = calcisite()
        .current_dir(elsewhere.path())
        .arg("report")
        .arg(&site)
        .arg("-o")
        .arg(&out)
        .output()
        .expect("run");
    assert!(o.status.success(), "{}", show(&o));
    let pdf = fs::read(&out).expect("PDF");
    let text = pdf_text(&pdf);
    let report = Report {
        squeezed: squeeze(&text),
        dehyphenated: dehyphenate(&text),
        pdf,
        data: None,
        _dir: elsewhere,
    };
    (report, repo().display().to_string())
}

#[test]
fn command_names_site_files_relative_to_their_folder() {
    let (r, machine_folder) = render_from_elsewhere();
    r.assert_has("calcisite report tala-vesi-lagoon.toml", "relative command");
    let start = r.squeezed.find("Command").expect("command line");
    let end = start + 200.min(r.squeezed.len() - start);
    let command = &r.squeezed[start..end];
    assert!(
        !command.contains(&squeeze(&machine_folder)),
        "machine folder in the command: {command}"
    );
}

#[test]
fn no_folder_of_this_machine_is_printed() {
    let (r, machine_folder) = render_from_elsewhere();
    assert!(
        !r.has(&machine_folder),
        "{machine_folder} is printed in the PDF"
    );
    // Record files are named relative to the site file, as in the site file.
    r.assert_has(
        "../demo-data/lagoon-bottles.csv",
        "record file relative to the site",
    );
}

#[test]
fn no_internal_identifier_is_printed() {
    // Identifiers of the site-file and `project` vocabulary, not words for readers.
    for id in [
        "chan2013",
        "silverman2009",
        "langdon2005",
        "lueker2000",
        "lee2010",
        "pf87",
        "co2_annmean_gl",
    ] {
        for (report, what) in [(one(), "one-site"), (comparison(), "comparison")] {
            assert!(!report.has(id), "{what}: identifier {id:?} printed");
        }
    }
}

#[test]
fn units_and_formulae_are_written_one_way() {
    for (report, what) in [(one(), "one-site"), (comparison(), "comparison")] {
        assert!(!report.has("umol/kg"), "{what}: umol/kg instead of µmol/kg");
        assert!(!report.has("CaCO3"), "{what}: CaCO3 instead of CaCO₃");
        report.assert_has("µmol/kg", "µmol/kg");
        report.assert_has("CaCO₃", "CaCO₃");
    }
}

#[test]
fn appendix_lists_every_sample_with_file_and_line() {
    let r = render(&[PASS], &["--appendix"], &[]);
    r.assert_has(
        "Appendix: carbonate chemistry of every sample",
        "appendix title",
    );
    let site = &r.data()["sites"][0];
    let samples = site["samples"].as_array().expect("samples");
    let records = site_toml(PASS)["records"]
        .as_array()
        .expect("records")
        .len();
    assert!(records >= 1);
    let files: BTreeSet<&str> = samples.iter().map(|s| str_at(s, "file")).collect();
    assert!(!samples.is_empty());
    for f in &files {
        r.assert_has(f, "record file in the appendix");
    }
    let start = r
        .squeezed
        .find(&squeeze("Appendix: carbonate chemistry"))
        .expect("appendix");
    let appendix = &r.squeezed[start..];
    let opt = |v: &Value, d: usize| fmt::opt(v.as_f64(), d);
    // Station, season, T, S, p, TA, DIC, pH, pCO2, Ω_ar, Ω_ca as the report formats them.
    let fields = |s: &Value| -> Vec<String> {
        vec![
            str_at(s, "station").to_string(),
            str_at(s, "season").to_string(),
            fmt::temp(s["temp_c"].as_f64().expect("T")),
            fmt::salinity(s["salinity"].as_f64().expect("S")),
            fmt::pressure(s["pressure_dbar"].as_f64().expect("p")),
            opt(&s["ta"], 0),
            opt(&s["dic"], 0),
            opt(&s["ph_t"], 3),
            opt(&s["pco2"], 0),
            opt(&s["omega_ar"], 2),
            opt(&s["omega_ca"], 2),
        ]
    };
    for f in &files {
        let group: Vec<&Value> = samples.iter().filter(|s| str_at(s, "file") == *f).collect();
        let first = fields(group[0]);
        // A field with the same text in every row of a file is said once above its listing.
        let same: Vec<bool> = (0..first.len())
            .map(|k| group.len() > 1 && group.iter().all(|s| fields(s)[k] == first[k]))
            .collect();
        let head = appendix
            .find(&squeeze(&format!("record file {f}")))
            .map(|at| &appendix[at..(at + 400).min(appendix.len())])
            .unwrap_or_else(|| panic!("no listing of {f}"));
        for (k, v) in first.iter().enumerate().filter(|(k, _)| same[*k]) {
            let sentence = head
                .find("thesameineveryrow:")
                .map(|at| &head[at..])
                .unwrap_or_else(|| {
                    panic!(
                        "{f}: field {k} ({v:?}) is the same in every row, but no sentence says so"
                    )
                });
            assert!(
                sentence.contains(&squeeze(v)),
                "{f}: {v:?} missing from {sentence:?}"
            );
        }
        for s in &group {
            // Line, date, then the fields that vary: one row.
            let mut row = format!("{}{}", s["row"].as_u64().expect("row"), str_at(s, "date"));
            for (k, v) in fields(s).iter().enumerate() {
                if !same[k] {
                    row.push_str(v);
                }
            }
            let row = squeeze(&row);
            assert!(appendix.contains(&row), "appendix row {row:?} missing");
        }
    }
}

/// The last date (local, as written) in the date column of a site's record files: the first ten
/// characters of the `date` or `datetime` cell are the ISO date.
fn last_record_date(site: &str) -> String {
    input_files(site)
        .iter()
        .skip(1)
        .flat_map(|f| {
            let text = fs::read_to_string(f).expect("records");
            let mut lines = text.lines();
            let header: Vec<&str> = lines.next().expect("header").split(',').collect();
            let col = header
                .iter()
                .position(|h| *h == "date" || *h == "datetime")
                .expect("date column");
            lines
                .filter_map(|l| l.split(',').nth(col).map(|c| c.chars().take(10).collect()))
                .collect::<Vec<String>>()
        })
        .max()
        .expect("a record")
}

#[test]
fn data_date_and_preparation_date_are_printed_apart() {
    // The lagoon site gives no [report] date: the last sample date is printed, and a note says
    // that no preparation date was set.
    let last = last_record_date(LAGOON);
    one().assert_has(&format!("Data to {last}"), "last sample date");
    one().assert_has("Prepared date not set", "note on the missing date");
    assert!(!one().has("Report date"), "the old single date is back");
    // 1700000000 s = 2023-11-14T22:13:20Z (GNU `date -u -d @1700000000`).
    let r = render(&[LAGOON], &[], &[("SOURCE_DATE_EPOCH", "1700000000")]);
    r.assert_has("Prepared 2023-11-14", "SOURCE_DATE_EPOCH date");
    r.assert_has("2023-11-14T22:13:20Z", "SOURCE_DATE_EPOCH timestamp");
    r.assert_has(&format!("Data to {last}"), "last sample date");
    assert!(!r.has("date not set"));
    assert!(r.pdf != one().pdf);
    // A [report] date is the preparation date.
    let dir = tempfile::tempdir().expect("temp dir");
    let demo = repo().join("demo-data");
    let text = fs::read_to_string(repo().join(LAGOON))
        .expect("site")
        .replace("../demo-data", &demo.display().to_string())
        .replace("[report]\n", "[report]\ndate = \"2025-02-01\"\n");
    let site = dir.path().join("dated.toml");
    fs::write(&site, text).expect("write site");
    let site = site.display().to_string();
    let r = render(&[site.as_str()], &[], &[]);
    r.assert_has("Prepared 2025-02-01", "[report] date");
    r.assert_has(&format!("Data to {last}"), "last sample date");
}
