//! `report` over a site list, in one run and in shards run as separate processes of the real
//! binary: the merged ranking, ranking tables and comparison PDF must be byte-identical to the
//! single run's (the outside reference here is the single run itself, made by a separate
//! process through the one-pass path), each per-site PDF must equal `report SITE -o` on that
//! site alone, and a merge must refuse results made with another seed.
#![cfg(feature = "pdf")]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_calcisite")
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str], cwd: &Path) -> Output {
    Command::new(bin())
        .args(args)
        .current_dir(cwd)
        .env_remove("SOURCE_DATE_EPOCH")
        .output()
        .expect("the binary runs")
}

fn ok(out: &Output) {
    assert!(
        out.status.success(),
        "status {:?}\n{}",
        out.status,
        String::from_utf8_lossy(&out.stderr)
    );
}

/// A list of the three demo sites (relative to the list in `sites/`, with a comment and a
/// blank line) written into `sites/` under a unique name; removed on drop.
struct DemoList(PathBuf);

impl DemoList {
    fn new(tag: &str) -> Self {
        let p = root()
            .join("sites")
            .join(format!(".test-{tag}-{}.txt", std::process::id()));
        std::fs::write(
            &p,
            "# the invented demo sites\ntala-vesi-forereef.toml\n\ntala-vesi-lagoon.toml\ntala-vesi-pass.toml\n",
        )
        .unwrap();
        DemoList(p)
    }
}

impl Drop for DemoList {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.0);
    }
}

#[test]
fn shards_merged_equal_one_run_byte_for_byte() {
    let list = DemoList::new("shards");
    let l = list.0.to_str().unwrap();
    let tmp = tempfile::tempdir().unwrap();
    let t = |name: &str| tmp.path().join(name).to_str().unwrap().to_string();
    let cwd = root();

    // One run: two of the three sites in detail, both ranking tables, one PDF per site.
    let single = run(
        &[
            "report",
            "--site-list",
            l,
            "--detail",
            "2",
            "-o",
            &t("one.pdf"),
            "--ranking-out",
            &t("one.csv"),
            "--ranking-out",
            &t("one.json"),
            "--each-site-pdf",
            &t("each"),
        ],
        &cwd,
    );
    ok(&single);

    // Three shards as separate processes, then the merge.
    for k in 1..=3 {
        let shard = format!("{k}/3");
        ok(&run(
            &[
                "report",
                "--site-list",
                l,
                "--shard",
                &shard,
                "--results",
                &t("results"),
            ],
            &cwd,
        ));
    }
    let merged = run(
        &[
            "report",
            "--site-list",
            l,
            "--detail",
            "2",
            "--merge",
            &t("results"),
            "-o",
            &t("merged.pdf"),
            "--ranking-out",
            &t("merged.csv"),
            "--ranking-out",
            &t("merged.json"),
        ],
        &cwd,
    );
    ok(&merged);
    for (a, b) in [
        ("one.pdf", "merged.pdf"),
        ("one.csv", "merged.csv"),
        ("one.json", "merged.json"),
    ] {
        let x = std::fs::read(tmp.path().join(a)).unwrap();
        let y = std::fs::read(tmp.path().join(b)).unwrap();
        assert!(
            x == y,
            "{a} and {b} differ ({} and {} bytes)",
            x.len(),
            y.len()
        );
    }

    // The ranking table has the three sites, ranks 1 to 3 (sites that tie share a rank and
    // the next rank skips, as in 1, 1, 3), with the list's line numbers
    // (lines 2, 4 and 5 of the list: line 1 is a comment, line 3 blank).
    let csv = std::fs::read_to_string(tmp.path().join("one.csv")).unwrap();
    let rows: Vec<&str> = csv.lines().skip(1).collect();
    assert_eq!(rows.len(), 3);
    let mut lines: Vec<&str> = rows.iter().map(|r| r.split(',').nth(1).unwrap()).collect();
    lines.sort();
    assert_eq!(lines, vec!["2", "4", "5"]);
    let mut previous = 0;
    for (k, r) in rows.iter().enumerate() {
        let rank: usize = r.split(',').next().unwrap().parse().unwrap();
        assert!(rank == k + 1 || rank == previous, "rank of row {k}: {r}");
        previous = rank;
    }

    // Each per-site PDF is the report of that site alone (given as the list gives it: the
    // report prints input paths as given).
    let site = root().join("sites/tala-vesi-pass.toml");
    let alone = run(
        &["report", site.to_str().unwrap(), "-o", &t("pass.pdf")],
        &cwd,
    );
    ok(&alone);
    let a = std::fs::read(tmp.path().join("pass.pdf")).unwrap();
    let b = std::fs::read(tmp.path().join("each/0005-tala-vesi-pass.pdf")).unwrap();
    assert!(a == b, "the per-site PDF differs from the one-site report");

    // Results made without a seed are not merged into a run with one.
    let other = run(
        &[
            "report",
            "--site-list",
            l,
            "--seed",
            "7",
            "--merge",
            &t("results"),
            "-o",
            &t("other.pdf"),
        ],
        &cwd,
    );
    assert_eq!(other.status.code(), Some(1));
    let err = String::from_utf8_lossy(&other.stderr);
    assert!(
        err.contains("was made with other settings than this merge"),
        "{err}"
    );
    assert!(!tmp.path().join("other.pdf").exists());

    // A missing shard is named.
    std::fs::remove_file(tmp.path().join("results/site-00004.toml")).unwrap();
    let missing = run(
        &[
            "report",
            "--site-list",
            l,
            "--merge",
            &t("results"),
            "-o",
            &t("m.pdf"),
        ],
        &cwd,
    );
    assert_eq!(missing.status.code(), Some(1));
    let err = String::from_utf8_lossy(&missing.stderr);
    assert!(
        err.contains("no result for 1 listed site(s): line 4 (tala-vesi-lagoon.toml)"),
        "{err}"
    );
}
