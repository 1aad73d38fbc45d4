//! `calcisite report` end to end: the real binary renders the invented demo sites of `sites/`
//! and the tests read the PDFs back with a PDF text extractor (`pdf-extract`, a dev-dependency,
//! so nothing outside cargo is needed).
//!
//! What is checked, and against what:
//! * every section, the caution box, each pathway, the invented-data notice and the SHA-256 of
//!   every input file appear in the text; the cited sources are taken from the library's default
//!   constant set (`MethodSet::default().citations()`) and from the sources that
//!   `calcisite project --format json` reports for its pathways, relationships, threshold
//!   classes and baseline rate, not from copies kept here;
//! * the numbers in the PDF are those of `calcisite project` for the same site: the median
//!   Ω_ar of the limiting season with its 5–95 % range at every horizon year under every
//!   pathway, and the calcification change in the last horizon year, formatted with
//!   `calcisite::report::fmt` as the report formats them; the SHA-256 digests are computed
//!   here with `sha2`;
//! * `--appendix` adds every sample row, `--data-out` holds the same medians as `project`;
//! * reproducibility (same bytes with one worker thread and with the default), the
//!   `SOURCE_DATE_EPOCH` date, `--dump-template`/`--template`, and bad inputs (a broken
//!   template, an unwritable output path, a site that fails `check`): a clear message, a
//!   non-zero exit and no PDF left behind.
//!
//! Renders are shared between tests (each takes about a second in a release build).

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

use calcisite::report::{CalcUnit, fmt};
use serde_json::Value;
use sha2::{Digest, Sha256};

#[path = "report_pdf/compare.rs"]
mod compare;
#[path = "report_pdf/exposure.rs"]
mod exposure;
#[path = "report_pdf/heat.rs"]
mod heat;
#[path = "report_pdf/permit.rs"]
mod permit;
#[path = "report_pdf/reader.rs"]
mod reader;

const BIN: &str = env!("CARGO_BIN_EXE_calcisite");
const FOREREEF: &str = "sites/tala-vesi-forereef.toml";
const LAGOON: &str = "sites/tala-vesi-lagoon.toml";
const PASS: &str = "sites/tala-vesi-pass.toml";
const ALL: [&str; 3] = [FOREREEF, LAGOON, PASS];

fn repo() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The binary, run from the repository root (site paths as a user types them) with no
/// inherited `SOURCE_DATE_EPOCH` or thread setting.
fn calcisite() -> Command {
    let mut c = Command::new(BIN);
    c.current_dir(repo())
        .env_remove("SOURCE_DATE_EPOCH")
        .env_remove("RAYON_NUM_THREADS");
    c
}

fn show(out: &Output) -> String {
    format!(
        "status {:?}\n--- stdout\n{}\n--- stderr\n{}",
        out.status.code(),
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    )
}

/// Whitespace removed: the text extractor splits table cells and runs of different sizes with
/// spaces or line breaks at its own discretion.
fn squeeze(s: &str) -> String {
    s.chars().filter(|c| !c.is_whitespace()).collect()
}

/// A rendered report, its text and (when asked for) its `--data-out` JSON.
struct Report {
    pdf: Vec<u8>,
    /// Extracted text without any white space.
    squeezed: String,
    /// Like `squeezed`, but with line-end hyphens of hyphenated words removed.
    dehyphenated: String,
    data: Option<Value>,
    _dir: tempfile::TempDir,
}

impl Report {
    /// Whether `needle` appears (white space ignored; a word hyphenated at a line end counts).
    fn has(&self, needle: &str) -> bool {
        let n = squeeze(needle);
        self.squeezed.contains(&n) || self.dehyphenated.contains(&n)
    }

    fn assert_has(&self, needle: &str, what: &str) {
        assert!(
            self.has(needle),
            "{what} {needle:?} missing from the PDF text"
        );
    }

    fn data(&self) -> &Value {
        self.data.as_ref().expect("rendered with --data-out")
    }
}

fn pdf_text(pdf: &[u8]) -> String {
    let raw = pdf_extract::extract_text_from_mem(pdf).expect("PDF text extraction");
    raw.split_whitespace().collect::<Vec<_>>().join(" ")
}

fn dehyphenate(text: &str) -> String {
    // "permit- ting" → "permitting": a hyphen directly followed by white space is a line-end
    // hyphenation point in this text (real hyphens are followed by a letter or digit).
    let mut out = String::with_capacity(text.len());
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        if c == '-' && chars.peek().is_some_and(|n| n.is_whitespace()) {
            while chars.peek().is_some_and(|n| n.is_whitespace()) {
                chars.next();
            }
            continue;
        }
        out.push(c);
    }
    squeeze(&out)
}

/// Runs `calcisite report SITES -o DIR/report.pdf --data-out DIR/data.json ARGS` and reads the
/// results back; panics with the command's output when it fails.
fn render(sites: &[&str], args: &[&str], env: &[(&str, &str)]) -> Report {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("report.pdf");
    let json = dir.path().join("data.json");
    let mut c = calcisite();
    c.arg("report").args(sites).arg("-o").arg(&out);
    c.arg("--data-out").arg(&json).args(args);
    for (k, v) in env {
        c.env(k, v);
    }
    let o = c.output().expect("run calcisite");
    assert!(o.status.success(), "report failed:\n{}", show(&o));
    let pdf = fs::read(&out).expect("PDF written");
    assert!(pdf.starts_with(b"%PDF-"), "not a PDF");
    let text = pdf_text(&pdf);
    let data = serde_json::from_slice(&fs::read(&json).expect("data JSON written"))
        .expect("--data-out is JSON");
    Report {
        squeezed: squeeze(&text),
        dehyphenated: dehyphenate(&text),
        pdf,
        data: Some(data),
        _dir: dir,
    }
}

/// One-site report of the lagoon (two seasons, bottle and sensor records).
fn one() -> &'static Report {
    static R: OnceLock<Report> = OnceLock::new();
    R.get_or_init(|| render(&[LAGOON], &[], &[]))
}

/// The three-site comparison.
fn comparison() -> &'static Report {
    static R: OnceLock<Report> = OnceLock::new();
    R.get_or_init(|| render(&ALL, &[], &[]))
}

/// `calcisite project SITE --format json`, per site in the order of [`ALL`].
fn projections() -> &'static Vec<Value> {
    static P: OnceLock<Vec<Value>> = OnceLock::new();
    P.get_or_init(|| {
        ALL.iter()
            .map(|site| {
                let o = calcisite()
                    .args(["project", site, "--format", "json", "-q"])
                    .output()
                    .expect("run calcisite project");
                assert!(o.status.success(), "project {site} failed:\n{}", show(&o));
                serde_json::from_slice(&o.stdout).expect("project JSON")
            })
            .collect()
    })
}

fn projection_of(site: &str) -> &'static Value {
    let i = ALL.iter().position(|s| *s == site).expect("demo site");
    &projections()[i]
}

fn site_toml(site: &str) -> toml::Value {
    let text = fs::read_to_string(repo().join(site)).expect("site file");
    toml::from_str(&text).expect("site TOML")
}

fn str_at<'a>(v: &'a Value, key: &str) -> &'a str {
    v[key]
        .as_str()
        .unwrap_or_else(|| panic!("no text at {key:?} in {v}"))
}

/// The site's limiting season according to `project`: the season with the lowest baseline mean
/// Ω_ar (the all-records aggregate left out).
fn limiting_season(proj: &Value) -> String {
    proj["seasons"]
        .as_array()
        .expect("seasons")
        .iter()
        .filter(|s| s["aggregate"] != Value::Bool(true))
        .filter_map(|s| Some((s["baseline_omega_ar"].as_f64()?, str_at(s, "label"))))
        .min_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, l)| l.to_string())
        .expect("a season with a baseline")
}

/// Quantiles (p05, p25, p50, p75, p95) of one `project` row of the base case.
fn quantiles(proj: &Value, pathway: &str, season: &str, quantity: &str, year: i64) -> [f64; 5] {
    let row = proj["quantiles"]
        .as_array()
        .expect("quantiles")
        .iter()
        .find(|r| {
            r["pathway"] == pathway
                && r["scenario"] == "none"
                && r["season"] == season
                && r["quantity"] == quantity
                && r["year"].as_i64() == Some(year)
        })
        .unwrap_or_else(|| panic!("no {quantity} row for {pathway} {season} {year}"));
    ["p05", "p25", "p50", "p75", "p95"].map(|k| row[k].as_f64().expect("quantile"))
}

fn pathway_names(proj: &Value) -> Vec<String> {
    proj["pathways"]
        .as_array()
        .expect("pathways")
        .iter()
        .map(|p| str_at(p, "name").to_string())
        .collect()
}

/// The report's table years (from `--data-out`), checked to be projected years.
fn horizons(report: &Report, proj: &Value) -> Vec<i64> {
    let years: Vec<i64> = report.data()["horizons"]
        .as_array()
        .expect("horizons")
        .iter()
        .map(|y| y.as_i64().expect("year"))
        .collect();
    let projected: Vec<i64> = proj["settings"]["horizon_years"]
        .as_array()
        .expect("horizon_years")
        .iter()
        .filter_map(Value::as_i64)
        .collect();
    assert!(years.len() >= 2, "{years:?}");
    assert!(
        years.iter().all(|y| projected.contains(y)),
        "{years:?} vs {projected:?}"
    );
    assert_eq!(
        years.last(),
        projected.last(),
        "the last projected year is a table year"
    );
    years
}

fn sha256_hex(path: &Path) -> String {
    let bytes = fs::read(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The site file and every record file it names.
fn input_files(site: &str) -> Vec<PathBuf> {
    let path = repo().join(site);
    let dir = path.parent().expect("site dir").to_path_buf();
    let mut out = vec![path];
    for r in site_toml(site)["records"].as_array().expect("records") {
        out.push(dir.join(r["path"].as_str().expect("records path")));
    }
    out
}

/// Every cited source of a site's methods: the default constant set of the library (the demo
/// sites do not choose another) and the sources `project` names.
fn cited_sources(proj: &Value) -> Vec<String> {
    let mut out: Vec<String> = calcisite::chem::MethodSet::default()
        .citations()
        .into_iter()
        .map(|(_, citation)| citation)
        .collect();
    for p in proj["pathways"].as_array().expect("pathways") {
        out.push(str_at(p, "source").to_string());
    }
    for r in proj["calcification"]["relationships"]
        .as_array()
        .expect("relationships")
    {
        out.push(str_at(r, "source").to_string());
    }
    out.push(str_at(&proj["thresholds"], "source").to_string());
    out.push(str_at(&proj["calcification"], "baseline_rate_source").to_string());
    out.push(str_at(&proj["settings"], "observed_co2_source").to_string());
    out.sort();
    out.dedup();
    out
}

fn assert_in_order(report: &Report, needles: &[&str], what: &str) {
    let mut from = 0;
    for n in needles {
        let key = squeeze(n);
        match report.squeezed.get(from..).and_then(|rest| rest.find(&key)) {
            Some(at) => from += at + key.len(),
            None => panic!("{what}: {n:?} missing or out of order"),
        }
    }
}

const CAUTION: [&str; 4] = [
    "Caution: screening-level estimate, not a permit determination",
    "It is not a permit determination",
    "Biological, ecological and local physical factors",
    "consult the local permitting authorities and licensed professionals",
];

const SITE_SECTIONS: [&str; 8] = [
    "Site and data",
    "Coverage per season",
    "Quality control",
    "Seasonal baseline",
    "Projection",
    "Thresholds and crossing years",
    "Annex: crossing years by season",
    "Calcification outlook",
];

const CLOSING_SECTIONS: [&str; 9] = [
    "Methods",
    "Carbonate chemistry",
    "Projection settings",
    "Habitat classes",
    "Calcification relationships",
    "Assumptions and limitations",
    "Reproducibility",
    "Further settings",
    "Input files",
];

/// Sections, caution, pathways, sources, notice and digests of the given sites.
fn assert_complete(report: &Report, sites: &[&str]) {
    for s in SITE_SECTIONS.iter().chain(&CLOSING_SECTIONS) {
        report.assert_has(s, "section");
    }
    assert_in_order(
        report,
        &["Methods", "Assumptions and limitations", "Reproducibility"],
        "closing sections",
    );
    for c in CAUTION {
        report.assert_has(c, "caution");
    }
    // Not modelled: each named in the limitations.
    for factor in [
        "Thermal stress",
        "Disease",
        "Storms",
        "Water quality",
        "Local hydrodynamics",
    ] {
        report.assert_has(factor, "limitation");
    }
    for site in sites {
        let proj = projection_of(site);
        let toml = site_toml(site);
        report.assert_has(toml["site"]["name"].as_str().expect("name"), "site name");
        let notice = toml["report"]["notice"]
            .as_str()
            .expect("demo sites carry a notice");
        assert!(notice.to_lowercase().contains("invented"), "{notice}");
        report.assert_has(notice, "invented-data notice");
        for p in pathway_names(proj) {
            report.assert_has(&p, "pathway");
        }
        for source in cited_sources(proj) {
            report.assert_has(&source, "cited source");
        }
        for f in input_files(site) {
            report.assert_has(&sha256_hex(&f), &format!("SHA-256 of {}", f.display()));
        }
    }
}

#[test]
fn one_site_report_has_every_section_caution_pathway_source_notice_and_digest() {
    let r = one();
    assert_complete(r, &[LAGOON]);
    assert_in_order(
        r,
        &[
            "Verdict",
            "Site and data",
            "Seasonal baseline",
            "Projection",
            "Thresholds and crossing years",
            "Calcification outlook",
            "Methods",
        ],
        "one-site sections",
    );
    assert!(
        !r.has("Appendix: carbonate chemistry"),
        "appendix without --appendix"
    );
    // The one-site report is not a comparison.
    assert!(!r.has("How the sites are ranked"));
}

#[test]
fn comparison_has_ranking_every_site_section_and_every_source() {
    let r = comparison();
    assert_complete(r, &ALL);
    for s in ["Ranking", "How the sites are ranked", "Site comparison"] {
        r.assert_has(s, "comparison section");
    }
    let names: Vec<String> = ALL
        .iter()
        .map(|s| {
            site_toml(s)["site"]["name"]
                .as_str()
                .expect("name")
                .to_string()
        })
        .collect();
    // A section per site, in the order given, before Methods.
    let mut order: Vec<String> = names.iter().map(|n| format!("Site: {n}")).collect();
    order.push("Methods".to_string());
    let order: Vec<&str> = order.iter().map(String::as_str).collect();
    assert_in_order(r, &order, "site sections");
}

/// Decimals `project` rounds these quantities to (its output contract): Ω_ar 4, calcification
/// change 2.
const PROJECT_DECIMALS_OMEGA: i32 = 4;
const PROJECT_DECIMALS_CALC_PCT: i32 = 2;

/// How the report may show a value that `project` gives rounded to `decimals`: the unrounded
/// value lies within half a unit of the last decimal, so when that half unit straddles a
/// rounding boundary of the report's coarser format both neighbours are possible.
fn shown_as(v: f64, decimals: i32, f: &dyn Fn(f64) -> String) -> Vec<String> {
    let half = 0.5 * 10f64.powi(-decimals) * (1.0 - 1e-9);
    let mut out = vec![f(v), f(v - half), f(v + half)];
    out.dedup();
    out.sort();
    out.dedup();
    out
}

/// "median (5–95 %)" as the report formats an Ω_ar cell, every possible rendering of
/// `project`'s rounded quantiles.
fn omega_cells(q: &[f64; 5]) -> Vec<String> {
    let f = |x: f64| fmt::omega(x);
    let d = PROJECT_DECIMALS_OMEGA;
    let mut out = Vec::new();
    for m in shown_as(q[2], d, &f) {
        for lo in shown_as(q[0], d, &f) {
            for hi in shown_as(q[4], d, &f) {
                out.push(format!("{m} ({})", fmt::range(&lo, &hi)));
            }
        }
    }
    out
}

/// Like [`assert_in_order`], each step accepting any of its alternatives.
fn assert_in_order_any(report: &Report, steps: &[Vec<String>], what: &str) {
    let mut from = 0;
    for alternatives in steps {
        let rest = report.squeezed.get(from..).unwrap_or_default();
        let hit = alternatives
            .iter()
            .filter_map(|a| {
                let key = squeeze(a);
                rest.find(&key).map(|at| at + key.len())
            })
            .min();
        match hit {
            Some(end) => from += end,
            None => panic!("{what}: none of {alternatives:?} found (in order)"),
        }
    }
}

/// The limiting-season Ω_ar of every pathway and table year, and each relationship's
/// calcification change in the last table year, as `project` gives them.
fn assert_numbers_match_project(report: &Report, site: &str) {
    let proj = projection_of(site);
    let season = limiting_season(proj);
    let years = horizons(report, proj);
    report.assert_has(&season, "limiting season");
    // Calcification is projected over all records (the aggregate group).
    let all_records = proj["seasons"]
        .as_array()
        .expect("seasons")
        .iter()
        .find(|s| s["aggregate"] == Value::Bool(true))
        .map(|s| str_at(s, "label").to_string())
        .expect("an all-records group");
    for pathway in pathway_names(proj) {
        // The verdict row: the pathway, then its cells in year order.
        let mut row = vec![vec![pathway.clone()]];
        for &y in &years {
            row.push(omega_cells(&quantiles(
                proj, &pathway, &season, "omega_ar", y,
            )));
        }
        assert_in_order_any(report, &row, &format!("{site} verdict row {pathway}"));
        let last = *years.last().expect("years");
        for rel in proj["calcification"]["relationships"]
            .as_array()
            .expect("relationships")
        {
            let id = str_at(rel, "id");
            let q = quantiles(
                proj,
                &pathway,
                &all_records,
                &format!("calc_change_pct_{id}"),
                last,
            );
            let f = |x: f64| fmt::calc(x, CalcUnit::PercentChange);
            let d = PROJECT_DECIMALS_CALC_PCT;
            let medians = shown_as(q[2], d, &f);
            assert!(
                medians.iter().any(|m| report.has(m)),
                "{site} {id} {pathway} median {medians:?} missing"
            );
            let mut ranges = Vec::new();
            for lo in shown_as(q[0], d, &f) {
                for hi in shown_as(q[4], d, &f) {
                    ranges.push(format!("({})", fmt::range(&lo, &hi)));
                }
            }
            assert!(
                ranges.iter().any(|r| report.has(r)),
                "{site} {id} {pathway} 5–95 % range {ranges:?} missing"
            );
        }
    }
}

#[test]
fn one_site_numbers_equal_those_of_project() {
    assert_numbers_match_project(one(), LAGOON);
}

#[test]
fn comparison_numbers_equal_those_of_project_for_every_site() {
    for site in ALL {
        assert_numbers_match_project(comparison(), site);
    }
}

#[test]
fn data_out_holds_the_medians_of_project() {
    for (report, sites) in [(one(), &[LAGOON][..]), (comparison(), &ALL[..])] {
        let data = report.data();
        for site in sites {
            let proj = projection_of(site);
            let name = site_toml(site)["site"]["name"]
                .as_str()
                .expect("name")
                .to_string();
            let s = data["sites"]
                .as_array()
                .expect("sites")
                .iter()
                .find(|s| s["name"] == name.as_str())
                .unwrap_or_else(|| panic!("{name} missing from --data-out"));
            let season = limiting_season(proj);
            for pathway in pathway_names(proj) {
                let series = s["projection"]
                    .as_array()
                    .expect("projection")
                    .iter()
                    .find(|p| p["pathway"] == pathway.as_str())
                    .and_then(|p| {
                        p["seasons"]
                            .as_array()?
                            .iter()
                            .find(|x| x["season"] == season.as_str())
                    })
                    .unwrap_or_else(|| panic!("{name} {pathway} {season} missing"));
                for y in horizons(report, proj) {
                    let point = series["points"]
                        .as_array()
                        .expect("points")
                        .iter()
                        .find(|p| p["year"].as_i64() == Some(y))
                        .unwrap_or_else(|| panic!("{name} {pathway} {y} missing"));
                    let expected = quantiles(proj, &pathway, &season, "omega_ar", y);
                    for (k, key) in ["p05", "p25", "p50", "p75", "p95"].iter().enumerate() {
                        let got = point["omega_ar"][key].as_f64().expect("number");
                        // `project` rounds to PROJECT_DECIMALS_OMEGA; --data-out keeps every digit.
                        let half = 0.5 * 10f64.powi(-PROJECT_DECIMALS_OMEGA) + 1e-12;
                        assert!(
                            (got - expected[k]).abs() <= half,
                            "{name} {pathway} {y} {key}: {got} vs project {}",
                            expected[k]
                        );
                    }
                }
            }
        }
    }
}

#[test]
fn same_inputs_give_the_same_bytes_whatever_the_thread_count() {
    let single = render(&[LAGOON], &[], &[("RAYON_NUM_THREADS", "1")]);
    assert!(
        single.pdf == one().pdf,
        "one-site PDF differs with RAYON_NUM_THREADS=1"
    );
    let cmp = render(&ALL, &[], &[("RAYON_NUM_THREADS", "1")]);
    assert!(
        cmp.pdf == comparison().pdf,
        "comparison PDF differs with RAYON_NUM_THREADS=1"
    );
}

#[test]
fn dumped_templates_give_the_same_pdf_and_are_never_overwritten() {
    let dir = tempfile::tempdir().expect("temp dir");
    let tpl = dir.path().join("tpl");
    let o = calcisite()
        .arg("report")
        .arg("--dump-template")
        .arg(&tpl)
        .output()
        .expect("run");
    assert!(o.status.success(), "{}", show(&o));
    assert!(tpl.join("report.typ").is_file());
    let out = dir.path().join("custom.pdf");
    let o = calcisite()
        .args(["report", LAGOON, "-o"])
        .arg(&out)
        .arg("--template")
        .arg(&tpl)
        .output()
        .expect("run");
    assert!(o.status.success(), "{}", show(&o));
    let bytes = fs::read(&out).expect("PDF");
    assert!(
        bytes == one().pdf,
        "--template with the dumped templates changed the PDF"
    );
    // A second dump refuses and leaves an edited file alone.
    fs::write(tpl.join("style.typ"), "// edited\n").expect("edit");
    let o = calcisite()
        .arg("report")
        .arg("--dump-template")
        .arg(&tpl)
        .output()
        .expect("run");
    assert!(!o.status.success(), "{}", show(&o));
    assert!(
        String::from_utf8_lossy(&o.stderr).contains("not overwriting"),
        "{}",
        show(&o)
    );
    assert_eq!(
        fs::read_to_string(tpl.join("style.typ")).expect("read"),
        "// edited\n"
    );
}

/// Names of the files in a directory.
fn listing(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = fs::read_dir(dir)
        .expect("list dir")
        .map(|e| e.expect("entry").file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[test]
fn broken_template_names_file_and_line_and_writes_nothing() {
    let dir = tempfile::tempdir().expect("temp dir");
    let tpl = dir.path().join("tpl");
    let o = calcisite()
        .arg("report")
        .arg("--dump-template")
        .arg(&tpl)
        .output()
        .expect("run");
    assert!(o.status.success(), "{}", show(&o));
    let main = tpl.join("report.typ");
    let original = fs::read_to_string(&main).expect("report.typ");
    let kept = original.trim_end();
    let line = kept.lines().count() + 1;
    fs::write(&main, format!("{kept}\n#this-function-does-not-exist(1)\n")).expect("write");
    let out_dir = dir.path().join("out");
    fs::create_dir(&out_dir).expect("mkdir");
    let out = out_dir.join("r.pdf");
    let o = calcisite()
        .args(["report", PASS, "-o"])
        .arg(&out)
        .arg("--data-out")
        .arg(out_dir.join("r.json"))
        .arg("--template")
        .arg(&tpl)
        .output()
        .expect("run");
    assert_eq!(o.status.code(), Some(1), "{}", show(&o));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains(&format!("report.typ:{line}:")),
        "no file:line in\n{err}"
    );
    assert!(err.contains("this-function-does-not-exist"), "{err}");
    assert!(
        listing(&out_dir).is_empty(),
        "left behind: {:?}",
        listing(&out_dir)
    );
}

#[test]
fn unwritable_output_path_fails_clearly_and_creates_nothing() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("no-such-folder").join("r.pdf");
    let o = calcisite()
        .args(["report", PASS, "-o"])
        .arg(&out)
        .output()
        .expect("run");
    assert!(!o.status.success(), "{}", show(&o));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("no-such-folder"),
        "message does not name the path:\n{err}"
    );
    assert!(!out.exists() && !out.parent().expect("parent").exists());
    assert!(
        listing(dir.path()).is_empty(),
        "left behind: {:?}",
        listing(dir.path())
    );
}

#[test]
fn site_failing_check_is_named_with_file_line_and_field() {
    let dir = tempfile::tempdir().expect("temp dir");
    // A copy of the fore-reef site whose records have a word where a salinity belongs.
    let records = fs::read_to_string(repo().join("demo-data/forereef-bottles.csv")).expect("csv");
    let header: Vec<&str> = records.lines().next().expect("header").split(',').collect();
    let col = header
        .iter()
        .position(|h| *h == "salinity")
        .expect("salinity column");
    let mut lines: Vec<String> = records.lines().map(str::to_string).collect();
    let mut cells: Vec<String> = lines[4].split(',').map(str::to_string).collect();
    cells[col] = "salty".to_string();
    lines[4] = cells.join(",");
    fs::write(dir.path().join("rec.csv"), lines.join("\n") + "\n").expect("write csv");
    let site = fs::read_to_string(repo().join(FOREREEF))
        .expect("site")
        .replace("../demo-data/forereef-bottles.csv", "rec.csv");
    let bad = dir.path().join("bad-site.toml");
    fs::write(&bad, site).expect("write site");
    let out_dir = dir.path().join("out");
    fs::create_dir(&out_dir).expect("mkdir");
    let pass = repo().join(PASS);
    // Alone, the broken site stops the report: nothing is written. Beside a good site, it
    // is named with its error and left out, the good one is written, and the status is 3.
    for sites in [vec![bad.clone()], vec![pass.clone(), bad.clone()]] {
        let out = out_dir.join("r.pdf");
        let o = calcisite()
            .arg("report")
            .args(&sites)
            .arg("-o")
            .arg(&out)
            .output()
            .expect("run");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains("rec.csv:5"), "no file:line in\n{err}");
        assert!(err.contains("salinity"), "no field in\n{err}");
        if sites.len() == 1 {
            assert_eq!(o.status.code(), Some(1), "{}", show(&o));
            assert!(err.contains("no report written"), "{err}");
            assert!(
                listing(&out_dir).is_empty(),
                "left behind: {:?}",
                listing(&out_dir)
            );
        } else {
            assert_eq!(o.status.code(), Some(3), "{}", show(&o));
            assert!(
                err.contains("left out of the ranking: 1 of 2 site(s)")
                    && err.contains("bad-site.toml"),
                "{err}"
            );
            assert_eq!(listing(&out_dir), vec!["r.pdf".to_string()]);
        }
    }
}
