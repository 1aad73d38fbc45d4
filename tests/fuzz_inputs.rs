//! Fuzz targets over the library API, written with proptest because the project builds on the
//! stable toolchain only (cargo-fuzz needs nightly). Every target checks that no input, however
//! broken, makes the code panic, and a few cheap properties of what comes back.
//!
//! * `fuzz_site_toml`: the demo site files with random byte flips, truncations, inserted
//!   keys/values/sections, duplicated sections, deleted lines and replaced values, read with
//!   `site::load_site` (then the projection settings with `outlook::from_loaded_site`);
//! * `fuzz_record_csv`: random record files (headers, cells, units, mappings, date formats,
//!   encodings) read through `site::load_site`, sometimes with a tiny projection run;
//! * `fuzz_dates`: `site::dates::parse_stamp`, `parse_offset` and `parse_number` on date-like
//!   and arbitrary text;
//! * `fuzz_chem_solve`: `chem::solve` and `chem::solve_pair` on arbitrary finite and non-finite
//!   inputs and conditions;
//! * `fuzz_solve_stream`: `cli::solve::solve_stream` on random CSV bytes.
//!
//! The default case counts keep `cargo test --release` to a few seconds per target.
//! `CALCISITE_FUZZ_CASES=N` runs every target N cases (e.g. 1000000 for a long run; add
//! `--nocapture` to see executions and time per target). Inputs that once made the code panic
//! are kept below as named regression tests.

use std::fs;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Instant;

use calcisite::chem::scales::PhScale;
use calcisite::chem::{
    BoronTotal, Conditions, Constants, Input, K1K2, KfSource, MethodSet, solve, solve_pair,
};
use calcisite::site::dates::{parse_number, parse_offset, parse_stamp};
use calcisite::site::schema::DateFormat;
use calcisite::site::{LoadedSite, load_site};
use chrono::FixedOffset;
use proptest::prelude::*;
use proptest::test_runner::{Config, TestCaseError, TestRunner};

// ------------------------------------------------------------------------------- harness

/// Cases for one target: `CALCISITE_FUZZ_CASES` when set, else `default`.
fn cases(default: u32) -> u32 {
    std::env::var("CALCISITE_FUZZ_CASES")
        .ok()
        .and_then(|v| v.trim().parse().ok())
        .unwrap_or(default)
}

/// Runs `test` on `cases` inputs from `strategy`; panics (with the shrunk input) on the first
/// failure. Prints executions and wall time.
fn fuzz<S: Strategy>(
    name: &str,
    n: u32,
    strategy: S,
    test: impl Fn(S::Value) -> Result<(), TestCaseError>,
) where
    S::Value: std::fmt::Debug,
{
    let config = Config {
        cases: n,
        failure_persistence: None,
        // A fuzz run rejects nothing, so the reject limits never apply; keep shrinking short.
        max_shrink_iters: 2000,
        ..Config::default()
    };
    let mut runner = TestRunner::new(config);
    let start = Instant::now();
    let result = runner.run(&strategy, test);
    let secs = start.elapsed().as_secs_f64();
    eprintln!(
        "fuzz {name}: {n} cases in {secs:.1} s ({:.2} min, {:.0} cases/s)",
        secs / 60.0,
        f64::from(n) / secs.max(1e-9)
    );
    if let Err(e) = result {
        panic!("fuzz {name} failed: {e}");
    }
}

fn demo_root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).to_path_buf()
}

/// Text of a demo file, or an empty string (the target then still runs on mutations of it).
fn demo_text(rel: &str) -> String {
    fs::read_to_string(demo_root().join(rel)).unwrap_or_default()
}

/// The first `lines` lines of a demo file (keeps each fuzz case fast).
fn head(rel: &str, lines: usize) -> String {
    let mut out = String::new();
    for l in demo_text(rel).lines().take(lines) {
        out.push_str(l);
        out.push('\n');
    }
    out
}

/// Loads a site and, when it loads, checks the projection settings too; renders every
/// diagnostic (as `check` would) so that the rendering is fuzzed as well.
fn load_and_render(site: &Path) -> Result<Option<LoadedSite>, TestCaseError> {
    match load_site(site) {
        Ok(loaded) => {
            let _ = loaded.findings.render(false);
            if let Err(ds) = calcisite::outlook::from_loaded_site(&loaded) {
                let located: calcisite::diag::Diagnostics =
                    ds.into_iter().map(|d| loaded.locate(d)).collect();
                prop_assert!(
                    located.has_errors(),
                    "from_loaded_site failed without an error"
                );
                let _ = located.render(true);
            }
            let _ = serde_json::to_string(&loaded);
            Ok(Some(loaded))
        }
        Err(fail) => {
            let diags = fail.to_diagnostics();
            prop_assert!(
                diags.has_errors(),
                "load_site failed without an error:\n{}",
                diags.render(false)
            );
            for d in diags.iter() {
                prop_assert!(!d.message.trim().is_empty(), "an error without a message");
            }
            let _ = diags.render(true);
            let _ = serde_json::to_string(&diags);
            Ok(None)
        }
    }
}

/// A small projection of a loaded site (at most 3 members, one thread) and every output table
/// in both formats: the settings read from a fuzzed site file drive the outlook stage too.
fn project_small(loaded: &LoadedSite) -> Result<(), TestCaseError> {
    use calcisite::outlook::{OutputFormat, OutputTable};
    let Ok((input, mut settings)) = calcisite::outlook::from_loaded_site(loaded) else {
        return Ok(());
    };
    settings.ensemble.members = settings.ensemble.members.min(3);
    settings.ensemble.threads = Some(1);
    if let Ok(o) = calcisite::outlook::run(&input, &settings, &calcisite::outlook::NoProgress) {
        for format in [OutputFormat::Csv, OutputFormat::Json] {
            for table in [
                OutputTable::Quantiles,
                OutputTable::Crossings,
                OutputTable::Thresholds,
            ] {
                let mut out = Vec::new();
                o.write(&mut out, format, table)
                    .map_err(|e| TestCaseError::fail(format!("writing the outlook: {e}")))?;
            }
        }
    }
    Ok(())
}

// ------------------------------------------------------------------------------- site TOML

/// The demo sites, with record paths pointing at short copies of the demo records.
const DEMO_SITES: [&str; 3] = [
    "sites/tala-vesi-forereef.toml",
    "sites/tala-vesi-lagoon.toml",
    "sites/tala-vesi-pass.toml",
];
const DEMO_RECORDS: [(&str, usize); 6] = [
    ("forereef-bottles.csv", 40),
    ("lagoon-bottles.csv", 40),
    ("lagoon-offshore.csv", 40),
    ("lagoon-sensor.csv", 150),
    ("upwelling-bottles-lab.csv", 40),
    ("upwelling-bottles.csv", 40),
];

const KEYS: &[&str] = &[
    "name",
    "region",
    "latitude_deg",
    "longitude_deg",
    "depth_min_m",
    "depth_max_m",
    "habitat",
    "area_m2",
    "utc_offset",
    "outplanting_area_m2",
    "target_groups",
    "project_start_year",
    "project_end_year",
    "net_calcification_kg_m2_yr",
    "coral_cover_fraction",
    "source",
    "path",
    "kind",
    "station",
    "date_format",
    "depth_m",
    "salinity",
    "missing",
    "on_out_of_range",
    "pathways",
    "user_pathways",
    "horizon_years",
    "disequilibrium",
    "warming",
    "members",
    "seed",
    "relationships",
    "ta_umol_kg",
    "dic_umol_kg",
    "ph",
    "pco2_pct",
    "omega_ar_optimal_min",
    "omega_ar_adequate_min",
    "omega_ar_marginal_min",
    "carbonic_acid",
    "total_boron",
    "hydrogen_fluoride",
    "ta_offset_umol_kg",
    "dic_offset_umol_kg",
    "seasons",
    "title",
    "prepared_for",
    "date",
    "notice",
    "wet",
    "dry",
    "temp_c",
    "ta",
    "dic",
    "co2",
    "time",
    "silicate",
    "phosphate",
    "temperature",
    "points",
    "site",
    "records",
    "projection",
    "calcification",
    "thresholds",
    "chemistry",
    "scenario",
];

const SECTIONS: &[&str] = &[
    "[site]",
    "[plan]",
    "[baseline]",
    "[[records]]",
    "[records.columns]",
    "[records.units]",
    "[seasons]",
    "[projection]",
    "[[projection.user_pathways]]",
    "[calcification]",
    "[uncertainty]",
    "[thresholds]",
    "[chemistry]",
    "[[scenario]]",
    "[report]",
    "[records]",
    "[site.extra]",
    "[[site]]",
    "[]",
    "[a.b.c]",
];

fn toml_value() -> impl Strategy<Value = String> {
    let fixed = prop::sample::select(vec![
        "nan",
        "inf",
        "-inf",
        "+inf",
        "1e400",
        "-1e400",
        "-0.0",
        "0",
        "1",
        "-1",
        "13",
        "99999999999999999999",
        "-9223372036854775808",
        "9223372036854775807",
        "1.5",
        "2024",
        "1000001",
        "true",
        "false",
        "\"\"",
        "\"SSP2-4.5\"",
        "\"SSP9-9.9\"",
        "\"steady\"",
        "\"bottle\"",
        "\"sensor\"",
        "\"+10:00\"",
        "\"+14:59\"",
        "\"-12:00\"",
        "\"Z\"",
        "\"2024-02-30\"",
        "\"2024-01-01\"",
        "\"day-first\"",
        "\"month-first\"",
        "\"umol/L\"",
        "\"nbs\"",
        "\"drop\"",
        "\".\"",
        "\"..\"",
        "\"/\"",
        "\"/dev/null\"",
        "\"../secret\"",
        "\"forereef-bottles.csv\"",
        "\"lagoon-sensor.csv\"",
        "[]",
        "[1, 2, 13]",
        "[0]",
        "[\"Jan\", \"Feb\", \"Mar\"]",
        "[\"SSP1-2.6\", \"mine\"]",
        "[[2030, 450], [2020]]",
        "[[2030, 450.0], [2100, 4000.0]]",
        "[[1e400, 400]]",
        "[2100, 2050]",
        "[2030, 2030]",
        "{ name = \"mine\", points = [[2030, 450.0], [2050, 500.0]] }",
        "{}",
        "[[]]",
        "2024-01-01",
        "2024-01-01T00:00:00Z",
        "\"chan2013\"",
        "\"\\u0000\"",
        "'''\nx\n'''",
        "\"a\\\"b\"",
        "[\"-999\", \"\"]",
        "\"lueker2000\"",
        "\"dm87\"",
        "1000000000",
    ]);
    prop_oneof![
        4 => fixed.prop_map(str::to_string),
        2 => any::<f64>().prop_map(|v| format!("{v:?}").replace("NaN", "nan")),
        1 => any::<i64>().prop_map(|v| v.to_string()),
        2 => "[ -~]{0,20}".prop_map(|s| format!("{s:?}")),
        1 => prop::collection::vec(-1000i64..3000, 0..6)
            .prop_map(|v| format!("[{}]", v.iter().map(i64::to_string).collect::<Vec<_>>().join(", "))),
    ]
}

#[derive(Clone, Debug)]
enum Mutation {
    FlipByte(usize, u8),
    Truncate(usize),
    InsertLine(usize, String),
    DeleteLine(usize),
    ReplaceValue(usize, String),
    DuplicateSection(usize),
    InsertSection(usize, String),
}

fn mutation() -> impl Strategy<Value = Mutation> {
    let key = prop_oneof![
        4 => prop::sample::select(KEYS.to_vec()).prop_map(str::to_string),
        1 => "[a-z_]{1,14}",
        1 => "[ -~]{1,8}",
    ];
    prop_oneof![
        3 => (any::<usize>(), any::<u8>()).prop_map(|(p, b)| Mutation::FlipByte(p, b)),
        1 => any::<usize>().prop_map(Mutation::Truncate),
        4 => (any::<usize>(), key, toml_value())
            .prop_map(|(p, k, v)| Mutation::InsertLine(p, format!("{k} = {v}"))),
        2 => any::<usize>().prop_map(Mutation::DeleteLine),
        4 => (any::<usize>(), toml_value()).prop_map(|(p, v)| Mutation::ReplaceValue(p, v)),
        2 => any::<usize>().prop_map(Mutation::DuplicateSection),
        2 => (any::<usize>(), prop::sample::select(SECTIONS.to_vec()))
            .prop_map(|(p, s)| Mutation::InsertSection(p, s.to_string())),
    ]
}

fn apply(text: &[u8], muts: &[Mutation]) -> Vec<u8> {
    let mut bytes = text.to_vec();
    for m in muts {
        match m {
            Mutation::FlipByte(p, b) => {
                if !bytes.is_empty() {
                    let i = p % bytes.len();
                    bytes[i] = *b;
                }
            }
            Mutation::Truncate(p) => {
                let n = p % (bytes.len() + 1);
                bytes.truncate(n);
            }
            _ => {
                let text = String::from_utf8_lossy(&bytes).into_owned();
                let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
                match m {
                    Mutation::InsertLine(p, line) | Mutation::InsertSection(p, line) => {
                        let i = p % (lines.len() + 1);
                        lines.insert(i, line.clone());
                    }
                    Mutation::DeleteLine(p) if !lines.is_empty() => {
                        let i = p % lines.len();
                        lines.remove(i);
                    }
                    Mutation::ReplaceValue(p, v) => {
                        let with_values: Vec<usize> = (0..lines.len())
                            .filter(|i| lines[*i].contains(" = "))
                            .collect();
                        if !with_values.is_empty() {
                            let i = with_values[p % with_values.len()];
                            let key = lines[i].split(" = ").next().unwrap_or("").to_string();
                            lines[i] = format!("{key} = {v}");
                        }
                    }
                    Mutation::DuplicateSection(p) => {
                        let starts: Vec<usize> = (0..lines.len())
                            .filter(|i| lines[*i].starts_with('['))
                            .collect();
                        if !starts.is_empty() {
                            let k = p % starts.len();
                            let a = starts[k];
                            let b = starts.get(k + 1).copied().unwrap_or(lines.len());
                            let section: Vec<String> = lines[a..b].to_vec();
                            lines.extend(section);
                        }
                    }
                    _ => {}
                }
                bytes = lines.join("\n").into_bytes();
                bytes.push(b'\n');
            }
        }
    }
    bytes
}

/// A temporary folder holding short copies of the demo records.
fn record_dir() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("temporary folder: {e}"));
    for (name, lines) in DEMO_RECORDS {
        fs::write(
            dir.path().join(name),
            head(&format!("demo-data/{name}"), lines),
        )
        .unwrap_or_else(|e| panic!("write {name}: {e}"));
    }
    dir
}

fn demo_site_texts() -> Vec<String> {
    DEMO_SITES
        .iter()
        .map(|s| demo_text(s).replace("../demo-data/", ""))
        .collect()
}

/// Writes and loads one mutated site (projecting it when it loads); `Ok(true)` when it loaded.
fn check_site_bytes(dir: &Path, bytes: &[u8]) -> Result<bool, TestCaseError> {
    let site = dir.join("site.toml");
    fs::write(&site, bytes).map_err(|e| TestCaseError::fail(e.to_string()))?;
    match load_and_render(&site)? {
        Some(loaded) => {
            project_small(&loaded)?;
            Ok(true)
        }
        None => Ok(false),
    }
}

#[test]
fn fuzz_site_toml() {
    let dir = record_dir();
    let texts = demo_site_texts();
    assert!(
        texts.iter().all(|t| t.contains("[site]")),
        "demo sites not found"
    );
    // The unmutated demo sites load (so the mutations start from a valid file).
    for t in &texts {
        let site = dir.path().join("site.toml");
        fs::write(&site, t).unwrap_or_else(|e| panic!("{e}"));
        if let Err(d) = load_site(&site) {
            panic!("demo site does not load:\n{}", d.render(false));
        }
    }
    // Half the cases change only values (plausible or not), so that more of them get past the
    // parser into validation, record reading and the projection settings.
    let gentle = prop_oneof![
        3 => (any::<usize>(), toml_value()).prop_map(|(p, v)| Mutation::ReplaceValue(p, v)),
        1 => (any::<usize>(), (1.0..3000.0f64)).prop_map(|(p, v)| Mutation::ReplaceValue(p, format!("{v}"))),
        1 => (any::<usize>(), (-1i64..3000)).prop_map(|(p, v)| Mutation::ReplaceValue(p, v.to_string())),
    ];
    let muts = prop_oneof![
        1 => prop::collection::vec(mutation(), 1..6),
        1 => prop::collection::vec(gentle, 1..3),
    ];
    let strategy = (0..texts.len(), muts);
    let loaded = AtomicUsize::new(0);
    let n = cases(800);
    fuzz("site_toml", n, strategy, |(which, muts)| {
        let base = texts.get(which).map(String::as_bytes).unwrap_or_default();
        if check_site_bytes(dir.path(), &apply(base, &muts))? {
            loaded.fetch_add(1, Ordering::Relaxed);
        }
        Ok(())
    });
    eprintln!(
        "fuzz site_toml: {} of {n} mutated sites loaded",
        loaded.load(Ordering::Relaxed)
    );
}

// ------------------------------------------------------------------------------- record CSV

const HEADERS: &[&str] = &[
    "date",
    "datetime",
    "time_utc",
    "time",
    "station",
    "temp_c",
    "salinity",
    "depth_m",
    "pressure_dbar",
    "ta",
    "dic",
    "ph",
    "ph_t",
    "pco2",
    "fco2",
    "xco2",
    "silicate",
    "phosphate",
    "TA_umol_L",
    "Temp (°C)",
    "Date",
    "TEMP_C",
    "",
    "note",
    "temp_c",
];

fn cell() -> impl Strategy<Value = Vec<u8>> {
    let fixed = prop::sample::select(vec![
        "",
        "NA",
        "N/A",
        "NaN",
        "nan",
        "-",
        "-999",
        "inf",
        "-inf",
        "1e400",
        "-0",
        "0",
        "1e-320",
        "8,05",
        "\"8,05\"",
        "\"a,\"\"b\"",
        "\"unclosed",
        "2024-01-10",
        "2024-02-30",
        "2024-13-01",
        "10/01/2024",
        "01/13/2024",
        "2024-01-10T10:00",
        "2024-01-10T10:00:00.123456789999Z",
        "2024-01-10 25:61",
        "2024-01-10T10:00+25:00",
        "2024-01-10T10:00 PST",
        "0000-01-01",
        "9999-12-31T23:59:59-14:00",
        "10:00",
        "9:05",
        "23:59:60",
        "35",
        "27.5",
        "2300",
        "2000",
        "8.05",
        "400",
        "5.0",
        "-5",
        "60",
        "80",
        "14",
        "99999",
        "A",
        "LG1",
        " ",
        "\t",
    ]);
    prop_oneof![
        4 => fixed.prop_map(|s| s.as_bytes().to_vec()),
        2 => (-5.0..50.0f64).prop_map(|v| format!("{v:.3}").into_bytes()),
        2 => (1500.0..2600.0f64).prop_map(|v| format!("{v:.1}").into_bytes()),
        1 => (7.0..8.6f64).prop_map(|v| format!("{v:.4}").into_bytes()),
        1 => any::<f64>().prop_map(|v| v.to_string().into_bytes()),
        1 => (2000i32..2030, 1u32..13, 1u32..29, 0u32..24, 0u32..60).prop_map(|(y, m, d, h, mi)| {
            format!("{y}-{m:02}-{d:02}T{h:02}:{mi:02}").into_bytes()
        }),
        1 => "[ -~]{0,12}".prop_map(String::into_bytes),
        1 => prop::collection::vec(any::<u8>(), 0..8),
    ]
}

#[derive(Clone, Debug)]
struct RecordCase {
    headers: Vec<String>,
    rows: Vec<Vec<Vec<u8>>>,
    bom: bool,
    crlf: bool,
    site_extra: String,
    project: bool,
}

fn chaotic_record_case() -> impl Strategy<Value = RecordCase> {
    let header = prop_oneof![
        5 => prop::sample::select(HEADERS.to_vec()).prop_map(str::to_string),
        1 => "[ -~]{0,10}",
    ];
    let headers = prop_oneof![
        // The usual bottle layout, sometimes with a few headers swapped.
        1 => Just(["date", "station", "temp_c", "salinity", "depth_m", "ta", "dic"]
            .iter().map(|s| s.to_string()).collect::<Vec<_>>()),
        2 => prop::collection::vec(header, 0..10),
    ];
    let unit = prop::sample::select(vec!["umol/kg", "umol/L", "mmol/kg", "µmol/L"]);
    let ph = prop::sample::select(vec!["total", "sws", "free", "nbs"]);
    let co2 = prop::sample::select(vec!["", "pco2_uatm", "fco2_uatm", "xco2_ppm"]);
    let fmt = prop::sample::select(vec!["iso", "day-first", "month-first"]);
    let map_to = prop::option::of(prop::sample::select(HEADERS.to_vec()));
    let settings = (
        (unit.clone(), unit.clone(), unit, ph, co2, fmt),
        (
            map_to.clone(),
            map_to.clone(),
            map_to,
            any::<bool>(),
            any::<bool>(),
            prop::option::of(-5.0..1200.0f64),
            prop::option::of(-5.0..60.0f64),
            prop::option::of("[A-Z0-9]{0,4}"),
        ),
    )
        .prop_map(
            |(
                (ta, dic, si, ph, co2, fmt),
                (m_date, m_temp, m_ta, sensor, drop, depth, sal, station),
            )| {
                let mut s = String::new();
                s.push_str(&format!("date_format = \"{fmt}\"\n"));
                s.push_str(&format!(
                    "on_out_of_range = \"{}\"\n",
                    if drop { "drop" } else { "error" }
                ));
                s.push_str("missing = [\"-999\"]\n");
                if let Some(d) = depth {
                    s.push_str(&format!("depth_m = {d}\n"));
                }
                if let Some(v) = sal {
                    s.push_str(&format!("salinity = {v}\n"));
                }
                if let Some(st) = station {
                    s.push_str(&format!("station = \"{st}\"\n"));
                }
                s.push_str("[records.columns]\n");
                for (k, v) in [("date", m_date), ("temp_c", m_temp), ("ta", m_ta)] {
                    if let Some(v) = v {
                        s.push_str(&format!("{k} = {v:?}\n"));
                    }
                }
                s.push_str("[records.units]\n");
                s.push_str(&format!(
                    "ta = \"{ta}\"\ndic = \"{dic}\"\nsilicate = \"{si}\"\nph = \"{ph}\"\n"
                ));
                if !co2.is_empty() {
                    s.push_str(&format!("co2 = \"{co2}\"\n"));
                }
                (s, sensor)
            },
        );
    (
        headers,
        prop::collection::vec(prop::collection::vec(cell(), 0..10), 0..14),
        any::<bool>(),
        any::<bool>(),
        settings,
        prop::bool::weighted(0.1),
    )
        .prop_map(
            |(headers, mut rows, bom, crlf, (site_extra, sensor), project)| {
                // Most rows get as many cells as the header, so that parsing goes past the shape check.
                for (i, r) in rows.iter_mut().enumerate() {
                    if i % 4 != 3 {
                        r.resize(headers.len(), b"1".to_vec());
                    }
                }
                let kind = if sensor { "sensor" } else { "bottle" };
                RecordCase {
                    headers,
                    rows,
                    bom,
                    crlf,
                    site_extra: format!("kind = \"{kind}\"\n{site_extra}"),
                    project,
                }
            },
        )
}

/// A record that is valid apart from a few corrupted cells: reaches unit conversion, QC,
/// the solvers and the baseline rather than stopping at the first unreadable cell.
fn near_valid_record_case() -> impl Strategy<Value = RecordCase> {
    // (header, is carbonate)
    let optional = prop::sample::subsequence(
        vec![
            "station",
            "depth_m",
            "pressure_dbar",
            "silicate",
            "phosphate",
            "time",
        ],
        0..4,
    );
    let carbonate =
        prop::sample::subsequence(vec!["ta", "dic", "ph", "pco2", "fco2", "xco2"], 1..4);
    let unit = prop::sample::select(vec!["umol/kg", "umol/L", "mmol/kg"]);
    let ph = prop::sample::select(vec!["total", "sws", "free", "nbs"]);
    let fmt = prop::sample::select(vec!["iso", "day-first", "month-first"]);
    let row = (
        (2015i32..2025, 1u32..13, 1u32..29, 0u32..24, 0u32..60),
        (20.0..31.0f64, 33.0..37.5f64, 0.0..30.0f64),
        (
            2200.0..2450.0f64,
            1850.0..2150.0f64,
            7.7..8.3f64,
            250.0..800.0f64,
        ),
        (0.0..5.0f64, 0.0..0.5f64, "[A-C][0-9]?"),
    );
    let corruption = (
        any::<prop::sample::Index>(),
        any::<prop::sample::Index>(),
        cell(),
    );
    (
        optional,
        carbonate,
        (unit.clone(), unit, ph, fmt, any::<bool>(), any::<bool>()),
        prop::collection::vec(row, 1..30),
        prop::collection::vec(corruption, 0..3),
        (any::<bool>(), prop::bool::weighted(0.25)),
    )
        .prop_map(|(opt, carb, (ta_u, dic_u, ph_s, fmt, sensor, drop), rows, corrupt, (crlf, project))| {
            let mut headers = vec!["date".to_string(), "temp_c".to_string(), "salinity".to_string()];
            headers.extend(opt.iter().map(|h| h.to_string()));
            headers.extend(carb.iter().map(|h| h.to_string()));
            let co2_unit = carb.iter().find_map(|c| match *c {
                "pco2" => Some("pco2_uatm"),
                "fco2" => Some("fco2_uatm"),
                "xco2" => Some("xco2_ppm"),
                _ => None,
            });
            let scale = |u: &str, v: f64| match u {
                "mmol/kg" => v / 1000.0,
                "umol/L" => v * 1.023,
                _ => v,
            };
            let mut out_rows: Vec<Vec<Vec<u8>>> = rows
                .iter()
                .map(|((y, mo, d, h, mi), (t, sal, depth), (ta, dic, ph, co2), (si, po4, st))| {
                    headers
                        .iter()
                        .map(|hd| {
                            let text = match hd.as_str() {
                                "date" if opt.contains(&"time") => match fmt {
                                    "day-first" => format!("{d:02}/{mo:02}/{y}"),
                                    "month-first" => format!("{mo:02}/{d:02}/{y}"),
                                    _ => format!("{y}-{mo:02}-{d:02}"),
                                },
                                "date" => format!("{y}-{mo:02}-{d:02}T{h:02}:{mi:02}"),
                                "time" => format!("{h:02}:{mi:02}"),
                                "temp_c" => format!("{t:.2}"),
                                "salinity" => format!("{sal:.3}"),
                                "depth_m" | "pressure_dbar" => format!("{depth:.1}"),
                                "station" => st.clone(),
                                "silicate" => format!("{si:.2}"),
                                "phosphate" => format!("{po4:.3}"),
                                "ta" => format!("{:.4}", scale(ta_u, *ta)),
                                "dic" => format!("{:.4}", scale(dic_u, *dic)),
                                "ph" => format!("{ph:.4}"),
                                _ => format!("{co2:.1}"),
                            };
                            text.into_bytes()
                        })
                        .collect()
                })
                .collect();
            for (r, c, v) in corrupt {
                let ri = r.index(out_rows.len());
                if let Some(row) = out_rows.get_mut(ri) {
                    let ci = c.index(row.len());
                    if let Some(cell) = row.get_mut(ci) {
                        *cell = v;
                    }
                }
            }
            let mut extra = format!(
                "kind = \"{}\"\ndate_format = \"{fmt}\"\non_out_of_range = \"{}\"\n[records.units]\nta = \"{ta_u}\"\ndic = \"{dic_u}\"\nph = \"{ph_s}\"\n",
                if sensor { "sensor" } else { "bottle" },
                if drop { "drop" } else { "error" },
            );
            if let Some(u) = co2_unit {
                extra.push_str(&format!("co2 = \"{u}\"\n"));
            }
            RecordCase { headers, rows: out_rows, bom: false, crlf, site_extra: extra, project }
        })
}

fn record_case() -> impl Strategy<Value = RecordCase> {
    prop_oneof![1 => chaotic_record_case(), 2 => near_valid_record_case()]
}

fn record_bytes(c: &RecordCase) -> Vec<u8> {
    let mut out = Vec::new();
    if c.bom {
        out.extend_from_slice("\u{feff}".as_bytes());
    }
    let nl: &[u8] = if c.crlf { b"\r\n" } else { b"\n" };
    out.extend_from_slice(c.headers.join(",").as_bytes());
    out.extend_from_slice(nl);
    for r in &c.rows {
        for (i, cell) in r.iter().enumerate() {
            if i > 0 {
                out.push(b',');
            }
            out.extend_from_slice(cell);
        }
        out.extend_from_slice(nl);
    }
    out
}

const RECORD_SITE: &str = "[site]
name = \"Fuzz reef\"
latitude_deg = -8.0
longitude_deg = -127.0
depth_min_m = 1.0
depth_max_m = 5.0
utc_offset = \"-08:00\"

[projection]
members = 2
horizon_years = [2030, 2060]
pathways = [\"SSP2-4.5\"]

[[records]]
path = \"bottles.csv\"
kind = \"bottle\"

[[records]]
path = \"records.csv\"
";

#[test]
fn fuzz_record_csv() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    // A valid bottle record beside the fuzzed one gives the TA–salinity fit something to use.
    fs::write(
        dir.path().join("bottles.csv"),
        "date,station,temp_c,salinity,depth_m,ta,dic\n\
         2024-01-10,A,27.0,35.2,3,2350,2010\n\
         2024-01-11,A,27.1,35.3,3,2352,2012\n\
         2024-01-12,A,27.2,35.1,3,2348,2008\n",
    )
    .unwrap_or_else(|e| panic!("{e}"));
    let loaded = AtomicUsize::new(0);
    let n = cases(1000);
    fuzz("record_csv", n, record_case(), |c| {
        fs::write(dir.path().join("records.csv"), record_bytes(&c))
            .map_err(|e| TestCaseError::fail(e.to_string()))?;
        let site = dir.path().join("site.toml");
        fs::write(&site, format!("{RECORD_SITE}{}", c.site_extra))
            .map_err(|e| TestCaseError::fail(e.to_string()))?;
        let result = load_and_render(&site)?;
        if result.is_some() {
            loaded.fetch_add(1, Ordering::Relaxed);
        }
        if let Some(loaded) = result
            && c.project
        {
            // A tiny projection (2 members, one pathway, two years) on whatever was read.
            project_small(&loaded)?;
        }
        Ok(())
    });
    eprintln!(
        "fuzz record_csv: {} of {n} record files loaded",
        loaded.load(Ordering::Relaxed)
    );
}

// ------------------------------------------------------------------------------- dates

fn date_like() -> impl Strategy<Value = String> {
    prop_oneof![
        3 => "[0-9]{1,5}[-/.][0-9]{1,3}[-/.][0-9]{1,5}([Tt ][0-9]{1,2}:[0-9]{1,2}(:[0-9]{1,2}([.,][0-9]{0,12})?)?)?( ?(Z|UTC|utc|[+-][0-9]{1,4}(:[0-9]{1,2})?))?",
        1 => "[0-9:/ .TZ+-]{0,24}",
        1 => any::<String>(),
        1 => "[ -~]{0,30}",
    ]
}

fn date_format() -> impl Strategy<Value = DateFormat> {
    prop::sample::select(vec![
        DateFormat::Iso,
        DateFormat::DayFirst,
        DateFormat::MonthFirst,
    ])
}

#[test]
fn fuzz_dates() {
    let strategy = (
        date_like(),
        prop::option::of(date_like()),
        date_format(),
        -840i32..=840, // site offsets are whole minutes, ±14 h
        "[ -~]{0,12}",
        any::<String>(),
    );
    fuzz(
        "dates",
        cases(20_000),
        strategy,
        |(date, time, fmt, off, offset_text, num)| {
            let default =
                FixedOffset::east_opt(off * 60).unwrap_or_else(|| unreachable!("in range"));
            match parse_stamp(&date, time.as_deref(), fmt, default) {
                Ok(st) => {
                    use chrono::Datelike;
                    let y = st.time.year();
                    prop_assert!((999..=10_000).contains(&y), "{date:?} gave year {y}");
                    // An ISO date-time printed back in RFC 3339 reads as the same instant.
                    let again = parse_stamp(&st.time.to_rfc3339(), None, DateFormat::Iso, default);
                    if let Ok(again) = again {
                        prop_assert_eq!(again.time, st.time, "{:?} round trip", date);
                    }
                }
                Err(e) => {
                    prop_assert!(
                        !e.message.is_empty() && !e.help.is_empty(),
                        "{date:?}: {e:?}"
                    );
                }
            }
            let _ = parse_offset(&offset_text);
            let _ = parse_offset(&date);
            match parse_number(&num, &["-999".to_string()]) {
                Ok(Some(v)) => prop_assert!(v.is_finite()),
                Ok(None) => {}
                Err(e) => prop_assert!(!e.message.is_empty()),
            }
            if let Ok(Some(v)) = parse_number(&offset_text, &[]) {
                prop_assert!(v.is_finite());
            }
            Ok(())
        },
    );
}

// ------------------------------------------------------------------------------- chemistry

fn wild_f64() -> impl Strategy<Value = f64> {
    prop_oneof![
        2 => any::<f64>(),
        1 => prop::sample::select(vec![
            f64::NAN, f64::INFINITY, f64::NEG_INFINITY, 0.0, -0.0, f64::MIN_POSITIVE,
            f64::MAX, f64::MIN, 1e-300, 5e-324, 1e300,
        ]),
    ]
}

fn input_value() -> impl Strategy<Value = (usize, f64)> {
    prop_oneof![
        // Plausible values for each kind, to reach the solvers' iterations.
        1 => (Just(0usize), 0.0..6000.0f64),
        1 => (Just(1usize), 0.0..6000.0f64),
        1 => (Just(2usize), 5.0..10.5f64),
        1 => (Just(3usize), 0.0..25000.0f64),
        1 => (Just(4usize), 0.0..25000.0f64),
        1 => (Just(5usize), 0.0..2000.0f64),
        2 => (0usize..6, wild_f64()),
    ]
}

fn make_input((kind, v): (usize, f64)) -> Input {
    match kind {
        0 => Input::Ta(v),
        1 => Input::Dic(v),
        2 => Input::PhT(v),
        3 => Input::Pco2(v),
        4 => Input::Fco2(v),
        _ => Input::Co3(v),
    }
}

fn conditions() -> impl Strategy<Value = Conditions> {
    let plausible = (
        -2.0..45.0f64,
        0.0..50.0f64,
        0.0..11000.0f64,
        0.0..500.0f64,
        0.0..20.0f64,
    );
    let wild = (wild_f64(), wild_f64(), wild_f64(), wild_f64(), wild_f64());
    prop_oneof![3 => plausible, 1 => wild].prop_map(|(t, s, p, si, po4)| Conditions {
        temp_c: t,
        salinity: s,
        pressure_dbar: p,
        silicate: si,
        phosphate: po4,
    })
}

fn methods() -> impl Strategy<Value = MethodSet> {
    (
        0..K1K2::ALL.len(),
        0..BoronTotal::ALL.len(),
        0..KfSource::ALL.len(),
    )
        .prop_map(|(a, b, c)| MethodSet {
            k1k2: K1K2::ALL.get(a).map(|x| x.1).unwrap_or_default(),
            boron: BoronTotal::ALL.get(b).map(|x| x.1).unwrap_or_default(),
            kf: KfSource::ALL.get(c).map(|x| x.1).unwrap_or_default(),
        })
}

fn assert_finite(st: &calcisite::chem::CarbonateState) -> Result<(), TestCaseError> {
    for (name, v) in [
        ("ta", st.ta),
        ("dic", st.dic),
        ("ph_t", st.ph_t),
        ("pco2", st.pco2),
        ("fco2", st.fco2),
        ("hco3", st.hco3),
        ("co3", st.co3),
        ("co2aq", st.co2aq),
        ("omega_ar", st.omega_ar),
        ("omega_ca", st.omega_ca),
        ("revelle", st.revelle),
    ] {
        prop_assert!(v.is_finite(), "{name} = {v} in {st:?}");
    }
    Ok(())
}

#[test]
fn fuzz_chem_solve() {
    let strategy = (input_value(), input_value(), conditions(), methods());
    fuzz("chem_solve", cases(50_000), strategy, |(a, b, cond, m)| {
        let (a, b) = (make_input(a), make_input(b));
        if let Ok(st) = solve(a, b, &cond, &m) {
            assert_finite(&st)?;
        }
        // The pair solver on constants of any conditions (the callers check limits first;
        // here only the absence of a panic is required).
        let k = Constants::new(&cond, &m);
        let _ = solve_pair(a, b, &k);
        let _ = m.range_warnings(&cond);
        for scale in [PhScale::Seawater, PhScale::Free, PhScale::Nbs] {
            let _ = calcisite::chem::scales::to_total(a.value(), scale, &k);
        }
        Ok(())
    });
}

// ------------------------------------------------------------------------------- solve CSV

const SOLVE_HEADERS: &[&str] = &[
    "temp_c",
    "salinity",
    "depth_m",
    "pressure_dbar",
    "ta",
    "dic",
    "ph_t",
    "pco2",
    "fco2",
    "co3",
    "silicate",
    "phosphate",
    "hco3",
    "omega_ar",
    "problem",
    "revelle",
    "sample",
    "TEMP_C",
    "",
];

fn solve_bytes() -> impl Strategy<Value = Vec<u8>> {
    let header = prop_oneof![
        5 => prop::sample::select(SOLVE_HEADERS.to_vec()).prop_map(str::to_string),
        1 => "[ -~]{0,8}",
    ];
    let structured = (
        prop::collection::vec(header, 1..9),
        prop::collection::vec(prop::collection::vec(cell(), 0..10), 0..12),
        any::<bool>(),
    )
        .prop_map(|(h, rows, crlf)| {
            let nl: &[u8] = if crlf { b"\r\n" } else { b"\n" };
            let mut out = h.join(",").into_bytes();
            out.extend_from_slice(nl);
            for (i, r) in rows.iter().enumerate() {
                let mut r = r.clone();
                if i % 3 != 2 {
                    r.resize(h.len(), b"2000".to_vec());
                }
                for (j, c) in r.iter().enumerate() {
                    if j > 0 {
                        out.push(b',');
                    }
                    out.extend_from_slice(c);
                }
                out.extend_from_slice(nl);
            }
            out
        });
    prop_oneof![
        4 => structured,
        1 => prop::collection::vec(any::<u8>(), 0..200),
    ]
}

fn check_solve_stream(input: &[u8], m: &MethodSet) -> Result<(), TestCaseError> {
    let mut out = Vec::new();
    match calcisite::cli::solve::solve_stream(input, &mut out, m) {
        Ok(summary) => {
            prop_assert!(summary.unsolved <= summary.rows);
            let mut rdr = csv::ReaderBuilder::new()
                .flexible(true)
                .from_reader(out.as_slice());
            let width = rdr
                .headers()
                .map(|h| h.len())
                .map_err(|e| TestCaseError::fail(e.to_string()))?;
            let mut n = 0u64;
            for r in rdr.records() {
                let r = r.map_err(|e| TestCaseError::fail(format!("output is not CSV: {e}")))?;
                prop_assert_eq!(r.len(), width, "row {} of the output", n + 1);
                n += 1;
            }
            prop_assert_eq!(n, summary.rows, "every row is written");
        }
        Err(e) => prop_assert!(!e.trim().is_empty()),
    }
    Ok(())
}

#[test]
fn fuzz_solve_stream() {
    let strategy = (solve_bytes(), methods());
    fuzz("solve_stream", cases(5000), strategy, |(input, m)| {
        check_solve_stream(&input, &m)
    });
}

// ------------------------------------------------------------------------------- fixed inputs
//
// The long runs (see the module comment) found no panic. These fixed inputs pin the edges the
// targets are built around, so that they are exercised on every `cargo test` whatever the
// random draws; an input that ever makes a target panic is added here by name.

#[test]
fn edge_dates_at_the_limits_of_the_hand_written_parser() {
    let utc = FixedOffset::east_opt(0).unwrap_or_else(|| unreachable!());
    for (text, ok) in [
        ("999999999-99-99", false), // nine-digit fields: the digit loop stops before overflow
        ("9999999999-01-01", false),
        ("2024-02-29", true),
        ("2023-02-29", false),
        ("0999-01-01", false),
        ("9999-12-31T23:59:59.999999999+14:00", true),
        ("1000-01-01T00:00-14:00", true),
        ("2024-01-01T24:00", false),
        ("2024-01-01T23:59:60", false),
        ("2024-01-01T10:00+14:60", false),
        ("2024-01-01T10:00+1", false),
        ("2024-01-01T10:00:00.", false),
        ("2024-01-01T1", false),
        ("2024-01-01\u{feff}", false),
        ("٢٠٢٤-٠١-٠١", false), // non-ASCII digits
        ("", false),
    ] {
        for fmt in [
            DateFormat::Iso,
            DateFormat::DayFirst,
            DateFormat::MonthFirst,
        ] {
            let r = parse_stamp(text, None, fmt, utc);
            assert_eq!(r.is_ok(), ok, "{text:?} ({fmt:?}): {r:?}");
        }
    }
    // A separate time column with a midnight date-time, and a conflicting one.
    assert!(parse_stamp("2024-01-01T00:00", Some("10:00"), DateFormat::Iso, utc).is_ok());
    assert!(parse_stamp("2024-01-01T09:00", Some("10:00"), DateFormat::Iso, utc).is_err());
    assert_eq!(parse_offset("+14:59").map(|o| o.is_some()), Some(true));
    assert_eq!(parse_offset("+15:00"), None);
    assert_eq!(parse_offset("-"), None);
}

#[test]
fn edge_numbers_that_are_not_finite_are_errors_not_values() {
    for text in ["inf", "-inf", "Infinity", "1e400", "-1e400", "+inf"] {
        let r = parse_number(text, &[]);
        assert!(
            r.as_ref()
                .is_err_and(|e| e.message.contains("not a finite number")),
            "{text}: {r:?}"
        );
    }
    for text in ["", "NA", "nan", "NaN", "-", " N/A "] {
        assert_eq!(parse_number(text, &[]), Ok(None), "{text}");
    }
    assert_eq!(parse_number("1e-400", &[]), Ok(Some(0.0)));
}

#[test]
fn edge_solver_inputs() {
    let m = MethodSet::default();
    let surface = Conditions::surface(25.0, 35.0);
    for (a, b) in [
        (Input::Ta(f64::NAN), Input::Dic(2000.0)),
        (Input::Ta(2300.0), Input::Dic(f64::INFINITY)),
        (Input::Ta(5e-324), Input::Dic(5e-324)),
        (Input::Ta(5000.0), Input::Dic(1.0)),
        (Input::Ta(1.0), Input::Dic(5000.0)),
        (Input::PhT(6.0), Input::Pco2(20000.0)),
        (Input::PhT(9.5), Input::Co3(1500.0)),
        (Input::Pco2(400.0), Input::Fco2(400.0)),
        (Input::Ta(2300.0), Input::Ta(2300.0)),
    ] {
        if let Ok(st) = solve(a, b, &surface, &m) {
            assert!(assert_finite(&st).is_ok(), "{a:?} {b:?}: {st:?}");
        }
    }
    // Conditions outside every limit are refused before any constant is computed.
    let wild = Conditions {
        temp_c: f64::NAN,
        salinity: -1.0,
        pressure_dbar: 1e300,
        silicate: 0.0,
        phosphate: 0.0,
    };
    assert!(solve(Input::Ta(2300.0), Input::Dic(2000.0), &wild, &m).is_err());
}

#[test]
fn edge_solve_stream_shapes() {
    let m = MethodSet::default();
    // A byte-order mark (spreadsheet "CSV UTF-8" exports) does not hide the first column.
    let mut out = Vec::new();
    let r = calcisite::cli::solve::solve_stream(
        &b"\xef\xbb\xbftemp_c,salinity,ta,dic\n25,35,2300,2000\n"[..],
        &mut out,
        &m,
    );
    assert_eq!(r.map(|s| (s.rows, s.unsolved)), Ok((1, 0)));
    for input in [
        &b""[..],
        b"\n",
        b"temp_c,salinity\n",
        b"temp_c,salinity,ta,dic\n25,35,2300,2000",
        b"temp_c,salinity,ta,dic\r\n25,35,2300,2000\r\n",
        b"temp_c,salinity,ta,dic\n25,35\n25,35,2300,2000,1,2,3\n",
        b"temp_c,salinity,ta,dic\n\"25\n\",35,2300,2000\n",
        b"temp_c,salinity,ta,dic,problem,problem\n25,35,2300,2000,x,y\n",
        b"\xef\xbb\xbftemp_c,salinity,ta,dic\n25,35,2300,2000\n",
        b"temp_c,salinity,ta,dic\n25,35,2300,\xff\n",
    ] {
        assert!(
            check_solve_stream(input, &m).is_ok(),
            "{:?}",
            String::from_utf8_lossy(input)
        );
    }
}
