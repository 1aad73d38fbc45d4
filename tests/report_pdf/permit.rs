//! The appendix as a permit file uses it: its first page names the tool version, every input
//! file and the data file with their SHA-256 (computed here from the files themselves), every
//! appendix page carries the flag key, rows carry the conversions their site file declares, a
//! sensor series is listed per day, and no page says "from memory" (part of the `report_pdf`
//! tests; helpers in the parent).

use std::collections::BTreeSet;

use super::*;

/// The lagoon (bottles, an hourly sensor series and a temperature logger) with `--appendix`.
fn lagoon_appendix() -> &'static Report {
    static R: OnceLock<Report> = OnceLock::new();
    R.get_or_init(|| render(&[LAGOON], &["--appendix"], &[]))
}

/// The text of each page, white space removed.
fn pages(r: &Report) -> Vec<String> {
    pdf_extract::extract_text_from_mem_by_pages(&r.pdf)
        .expect("PDF text by pages")
        .iter()
        .map(|p| squeeze(p))
        .collect()
}

/// The pages from the appendix's first page on.
fn appendix_pages(r: &Report) -> Vec<String> {
    let all = pages(r);
    let title = squeeze("Appendix: carbonate chemistry of every sample");
    let first = all
        .iter()
        .position(|p| p.contains(&title))
        .expect("an appendix page");
    all[first..].to_vec()
}

/// The package version as Cargo.toml gives it.
fn cargo_version() -> String {
    let text = fs::read_to_string(repo().join("Cargo.toml")).expect("Cargo.toml");
    let toml: toml::Value = toml::from_str(&text).expect("Cargo.toml is TOML");
    toml["package"]["version"]
        .as_str()
        .expect("package version")
        .to_string()
}

/// The site file, its record files and its temperature logger.
fn every_input(site: &str) -> Vec<PathBuf> {
    let mut files = input_files(site);
    if let Some(p) = site_toml(site)
        .get("thermal")
        .and_then(|t| t.get("path"))
        .and_then(|p| p.as_str())
    {
        files.push(repo().join(site).parent().expect("site dir").join(p));
    }
    files
}

#[test]
fn appendix_opens_with_the_version_and_every_input_and_data_file_digest() {
    let r = lagoon_appendix();
    let first = &appendix_pages(r)[0];
    let version = squeeze(&format!("calcisite {}", cargo_version()));
    assert!(
        first.contains(&version),
        "no {version} on the appendix's first page"
    );
    let files = every_input(LAGOON);
    assert_eq!(
        files.len(),
        5,
        "site, three record files (one offshore source water), logger: {files:?}"
    );
    for f in &files {
        let digest = sha256_hex(f);
        assert!(
            first.contains(&digest),
            "SHA-256 of {} missing from the appendix's first page",
            f.display()
        );
    }
    // The --data-out file, by name and digest (of the bytes written).
    let data = r._dir.path().join("data.json");
    assert!(first.contains("data.json"), "data file not named");
    assert!(
        first.contains(&sha256_hex(&data)),
        "digest of the data file missing"
    );
    // The constant set with its citations.
    for (_, citation) in calcisite::chem::MethodSet::default().citations() {
        assert!(
            r.has(&citation),
            "constant citation {citation:?} missing from the appendix"
        );
    }
}

#[test]
fn every_appendix_page_carries_the_flag_key() {
    let r = lagoon_appendix();
    let pages = appendix_pages(r);
    assert!(pages.len() >= 2, "{} appendix pages", pages.len());
    for (i, p) in pages.iter().enumerate() {
        for key in [
            "Flags:",
            "D depth in m taken as pressure in dbar",
            "E TA estimated from the site's TA–salinity relationship",
            "N not used in the baseline or outlook",
        ] {
            assert!(
                p.contains(&squeeze(key)),
                "appendix page {} lacks {key:?}",
                i + 1
            );
        }
    }
}

/// (line count, distinct station-days) of a sensor CSV whose first column is an ISO date-time
/// and second the station.
fn rows_and_days(csv: &Path) -> (usize, usize) {
    let text = fs::read_to_string(csv).expect("sensor CSV");
    let mut days = BTreeSet::new();
    let mut rows = 0;
    for line in text.lines().skip(1) {
        let mut cells = line.split(',');
        let date: String = cells.next().expect("date").chars().take(10).collect();
        let station = cells.next().expect("station").to_string();
        days.insert((date, station));
        rows += 1;
    }
    (rows, days.len())
}

#[test]
fn a_sensor_series_is_listed_per_day_and_every_row_is_in_the_data_file() {
    let r = lagoon_appendix();
    let sensor = repo().join("demo-data/lagoon-sensor.csv");
    let (rows, days) = rows_and_days(&sensor);
    assert!(rows > 8000 && days > 300, "{rows} rows, {days} days");
    r.assert_has(
        &format!("{rows} rows as {days} daily summaries"),
        "daily summary count",
    );
    // A year of hourly rows no longer fills well over a hundred pages.
    let n = appendix_pages(r).len();
    assert!(n < 30, "{n} appendix pages");
    // One day worked out here from the rows of the data file: n, min, mean, max of Ω_ar.
    let samples = r.data()["sites"][0]["samples"].as_array().expect("samples");
    let in_sensor: Vec<&Value> = samples
        .iter()
        .filter(|s| str_at(s, "file").ends_with("lagoon-sensor.csv"))
        .collect();
    assert_eq!(in_sensor.len(), rows, "every sensor row in the data file");
    let day: Vec<f64> = in_sensor
        .iter()
        .filter(|s| str_at(s, "date").starts_with("2024-07-15") && str_at(s, "station") == "LG1")
        .filter(|s| s["used"] == Value::Bool(true))
        .map(|s| s["omega_ar"].as_f64().expect("Ω_ar"))
        .collect();
    assert_eq!(day.len(), 24, "hourly rows of 2024-07-15 at LG1");
    let min = day.iter().copied().fold(f64::INFINITY, f64::min);
    let max = day.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let mean = day.iter().sum::<f64>() / day.len() as f64;
    // The day's line: the date, the season when it varies, then n and the statistics.
    let stats = squeeze(&format!(
        "24 {} {} {}",
        fmt::omega(min),
        fmt::omega(mean),
        fmt::omega(max)
    ));
    let appendix = appendix_pages(r).concat();
    let found = appendix.match_indices("2024-07-15").any(|(at, _)| {
        let near: String = appendix[at..].chars().take(40 + stats.len()).collect();
        near.contains(&stats)
    });
    assert!(found, "no daily summary {stats:?} after 2024-07-15");
}

#[test]
fn rows_carry_the_conversions_their_site_file_declares() {
    // The pass's lab file gives TA in µmol/L, pH on the seawater scale and depths in m
    // ([records.units] and [records.columns] of its site file): every row is flagged D, L, S.
    let toml = site_toml(PASS);
    let rec = &toml["records"][0];
    assert_eq!(rec["units"]["ta"].as_str(), Some("umol/L"));
    assert_eq!(rec["units"]["ph"].as_str(), Some("sws"));
    assert!(rec["columns"].get("depth_m").is_some());
    let r = render(&[PASS], &["--appendix"], &[]);
    let samples = r.data()["sites"][0]["samples"].as_array().expect("samples");
    assert_eq!(samples.len(), 36);
    for s in samples {
        let flags: Vec<&str> = s["flags"]
            .as_array()
            .expect("flags")
            .iter()
            .filter_map(Value::as_str)
            .collect();
        for f in ["depth_as_pressure", "per_litre", "ph_scale"] {
            assert!(flags.contains(&f), "row {}: {flags:?}", s["row"]);
        }
    }
    // The listing: each row ends in the letters, and the opening names the conversions.
    let appendix = appendix_pages(&r).concat();
    for s in samples {
        let row = squeeze(&format!(
            "{}{}",
            s["row"].as_u64().expect("row"),
            str_at(s, "date")
        ));
        let at = appendix
            .find(&row)
            .unwrap_or_else(|| panic!("row {row} missing"));
        let rest: String = appendix[at..].chars().take(120).collect();
        assert!(rest.contains("DLS"), "row {row} without D L S: {rest}");
    }
    for text in [
        "TA or DIC converted from µmol/L to µmol/kg",
        "pH converted to the total scale",
    ] {
        r.assert_has(text, "conversion in the opening");
    }
}

#[test]
fn no_page_says_from_memory_or_prints_a_source_status_code() {
    for (report, what) in [
        (one(), "one-site"),
        (comparison(), "comparison"),
        (lagoon_appendix(), "appendix"),
    ] {
        for mark in ["from memory", "Source status", "status: M", "(M)"] {
            assert!(!report.has(mark), "{what}: {mark:?} printed");
        }
        // What could not be checked is said in words.
        report.assert_has(
            "not checked against the original publication",
            "plain-words caution",
        );
    }
}

#[test]
fn the_appendix_names_no_folder_of_this_machine() {
    let r = lagoon_appendix();
    let machine = squeeze(&repo().display().to_string());
    assert!(!r.squeezed.contains(&machine), "machine folder printed");
    r.assert_has(
        "../demo-data/lagoon-sensor.csv",
        "record file relative to the site",
    );
    r.assert_has(
        "../demo-data/lagoon-temperature.csv",
        "logger relative to the site",
    );
}
