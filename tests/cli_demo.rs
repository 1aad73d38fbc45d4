//! The real binary on the invented demo sites: every stage runs, outputs are the same bytes
//! whatever the thread count, and an interrupted run leaves no file behind.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_calcisite"))
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn demo_sites() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("sites"))
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    v.sort();
    v
}

fn run(cmd: &mut Command) -> Output {
    cmd.current_dir(root()).output().expect("binary runs")
}

fn assert_ok(out: &Output, what: &str) {
    assert!(
        out.status.success(),
        "{what} exited {:?}\nstderr:\n{}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn every_demo_site_passes_check() {
    let sites = demo_sites();
    assert_eq!(sites.len(), 3, "three invented demo sites");
    for site in sites {
        let out = run(bin().arg("check").arg(&site));
        assert_ok(&out, &format!("check {}", site.display()));
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains("Baseline"), "{text}");
        assert!(text.contains("Omega_ar"), "{text}");
    }
}

/// Common practice: an oceanic fore-reef near 400 µatm sits around Omega_ar 3.5–4, and
/// upwelled water lowers it; the demo scenario is built that way and the check baseline
/// must show it.
#[test]
fn check_json_baseline_is_plausible() {
    let out = run(bin().args(["check", "sites/tala-vesi-forereef.toml", "--format", "json"]));
    assert_ok(&out, "check --format json");
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    let omega = &v["site"]["baseline"]["whole_record"]["omega_ar"];
    let mean = omega["mean"].as_f64().expect("baseline Omega_ar mean");
    assert!((3.5..4.0).contains(&mean), "fore-reef Omega_ar mean {mean}");
    assert_eq!(omega["n"].as_u64(), Some(36));

    let out = run(bin().args(["check", "sites/tala-vesi-pass.toml", "--format", "json"]));
    assert_ok(&out, "check --format json");
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    let seasons = v["site"]["baseline"]["seasons"]
        .as_array()
        .expect("seasons");
    let mean_of = |name: &str| {
        seasons
            .iter()
            .find(|s| s["name"] == name)
            .and_then(|s| s["omega_ar"]["mean"].as_f64())
    };
    let (calm, upwelling) = (mean_of("calm").unwrap(), mean_of("upwelling").unwrap());
    assert!(
        upwelling < calm - 0.3,
        "upwelling {upwelling} vs calm {calm}"
    );
}

#[test]
fn project_output_does_not_depend_on_threads() {
    let dir = tempfile::tempdir().unwrap();
    for format in ["csv", "json"] {
        let mut outs = Vec::new();
        for threads in ["1", "2"] {
            let path = dir.path().join(format!("p-{threads}.{format}"));
            let out = run(bin()
                .args([
                    "project",
                    "sites/tala-vesi-pass.toml",
                    "--format",
                    format,
                    "--threads",
                    threads,
                    "-o",
                ])
                .arg(&path));
            assert_ok(&out, "project");
            outs.push(std::fs::read(&path).unwrap());
        }
        assert!(!outs[0].is_empty());
        assert_eq!(outs[0], outs[1], "{format} differs between 1 and 2 threads");
    }
}

#[test]
fn solve_output_does_not_depend_on_threads() {
    let input = root().join("demo-data/lagoon-bottles-solve.csv");
    let one = run(bin().env("RAYON_NUM_THREADS", "1").arg("solve").arg(&input));
    let all = run(bin().arg("solve").arg(&input));
    assert_ok(&one, "solve");
    assert_ok(&all, "solve");
    assert_eq!(one.stdout, all.stdout);
    // 24 demo rows plus the header, every row solved.
    let text = String::from_utf8_lossy(&all.stdout);
    assert_eq!(text.lines().count(), 25);
    // `problem` empty, then `pair_used`: every demo row gives TA and DIC.
    assert!(
        text.lines().skip(1).all(|l| l.ends_with(",,ta+dic")),
        "a row has a problem:\n{text}"
    );
}

#[test]
fn project_refuses_to_overwrite_its_input() {
    let dir = tempfile::tempdir().unwrap();
    let site = dir.path().join("site.toml");
    let text = std::fs::read_to_string(root().join("sites/tala-vesi-pass.toml"))
        .unwrap()
        .replace(
            "../demo-data/",
            &format!("{}/", root().join("demo-data").display()),
        );
    std::fs::write(&site, &text).unwrap();
    let out = run(bin().args(["project"]).arg(&site).arg("-o").arg(&site));
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("one of the inputs"));
    assert_eq!(
        std::fs::read_to_string(&site).unwrap(),
        text,
        "input untouched"
    );
}

fn leftovers(dir: &Path) -> Vec<String> {
    std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with(".calcisite-") || n == "out.csv")
        .collect()
}

/// Ctrl-C while `solve` is writing: neither the output nor its temporary file remains.
#[cfg(unix)]
#[test]
fn interrupted_solve_leaves_no_file() {
    use std::io::Write;
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("big.csv");
    let mut f = std::io::BufWriter::new(std::fs::File::create(&input).unwrap());
    writeln!(f, "temp_c,salinity,ta,dic").unwrap();
    for i in 0..1_500_000u32 {
        let x = f64::from(i % 1000) / 1000.0;
        writeln!(f, "{:.3},35,2300,{:.2}", 20.0 + 8.0 * x, 1950.0 + 80.0 * x).unwrap();
    }
    drop(f);
    let output = dir.path().join("out.csv");
    let mut child = bin()
        .arg("solve")
        .arg(&input)
        .arg("-o")
        .arg(&output)
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(300));
    // SIGINT, as a terminal's Ctrl-C sends.
    let _ = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status();
    let status = child.wait().unwrap();
    if status.success() {
        // The machine was fast enough to finish first: then the output must be complete.
        let text = std::fs::read_to_string(&output).unwrap();
        assert_eq!(text.lines().count(), 1_500_001);
    } else {
        assert_eq!(status.code(), Some(130), "{status:?}");
        assert!(
            leftovers(dir.path()).is_empty(),
            "left behind: {:?}",
            leftovers(dir.path())
        );
    }
}

#[test]
fn completions_are_printed() {
    let out = run(bin().args(["completions", "bash"]));
    assert_ok(&out, "completions");
    assert!(String::from_utf8_lossy(&out.stdout).contains("calcisite"));
}

/// `init`, then the templates filled in the way a user would (invented site values and one
/// invented bottle sample per fortnight for a year), then `check` and `project` both accept
/// the site and agree on the number of rows used. The numbers are invented: open-ocean
/// surface water near TA 2300, DIC 2000 µmol/kg (common practice for tropical surface water).
#[test]
fn init_fill_in_check_and_project() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("new-site");
    let out = run(bin().arg("init").arg(&target));
    assert_ok(&out, "init");
    let site = target.join("site.toml");
    let csv = target.join("records.csv");
    // A second init refuses to overwrite and changes nothing.
    let before = std::fs::read(&site).unwrap();
    let again = run(bin().arg("init").arg(&target));
    assert_eq!(again.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&again.stderr).contains("already exists"));
    assert_eq!(std::fs::read(&site).unwrap(), before);

    // Fill in the site values (invented) ...
    let text = std::fs::read_to_string(&site).unwrap();
    let text = text
        .replace("name = \"Candidate site\"", "name = \"Invented bay\"")
        .replace("latitude_deg = 0.0", "latitude_deg = -17.5")
        .replace("longitude_deg = 0.0", "longitude_deg = 177.2")
        .replace("utc_offset = \"+00:00\"", "utc_offset = \"+12:00\"");
    std::fs::write(&site, text).unwrap();
    // ... and 24 invented samples, two per month, with a seasonal temperature cycle.
    let mut rows = std::fs::read_to_string(&csv).unwrap();
    for i in 0..24 {
        let month = i / 2 + 1;
        let day = 5 + 14 * (i % 2);
        let temp = 26.0 + 2.0 * (f64::from(month) * 0.52).cos();
        let ta = 2300.0 + f64::from(i % 3);
        let dic = 1995.0 + f64::from(i % 5);
        rows.push_str(&format!(
            "2024-{month:02}-{day:02},S1,4,{temp:.1},35.1,{ta:.1},{dic:.1},,,1.0,0.1\n"
        ));
    }
    std::fs::write(&csv, rows).unwrap();

    let out = run(bin().arg("check").arg(&site));
    assert_ok(&out, "check of the filled-in template");
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("Site: Invented bay"), "{text}");
    assert!(text.contains("TA+DIC 24"), "{text}");

    let outlook = dir.path().join("outlook.csv");
    let out = run(bin()
        .arg("project")
        .arg(&site)
        .args(["--members", "20", "-o"])
        .arg(&outlook));
    assert_ok(&out, "project of the filled-in template");
    let table = std::fs::read_to_string(&outlook).unwrap();
    assert!(
        table.starts_with("pathway,scenario,year,season,quantity"),
        "{table}"
    );
    assert!(table.lines().count() > 100, "{table}");
}
