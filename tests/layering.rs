//! The stages import one way: chem → site → outlook → report → pipeline → cli (DEVELOPERS.md,
//! "Stage map"). Leaf utilities (`diag`, `fsio`, `numfmt`) import no stage. This test reads every
//! `crate::…` path in `src/` (in `use` lines and in inline paths) and fails when a module
//! reaches a later stage, so the layering stays true as the code grows.
//!
//! Test modules (`#[cfg(test)]` to the end of a file) may use later stages to build fixtures;
//! everything before them counts.

use std::collections::BTreeSet;
use std::fs;
use std::path::{Path, PathBuf};

/// Rank of each top-level module; a module may import ranks lower than or equal to its own.
/// Leaf utilities have rank 0 and may import nothing but other leaves.
fn rank(module: &str) -> Option<u8> {
    Some(match module {
        "diag" | "fsio" | "numfmt" => 0,
        "chem" => 1,
        "site" => 2,
        "outlook" => 3,
        "report" => 4,
        "pipeline" => 5,
        "cli" => 6,
        _ => return None,
    })
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<PathBuf> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", dir.display()))
        .filter_map(|e| e.ok().map(|e| e.path()))
        .collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// The top-level module a file belongs to (`src/site/records/sample.rs` → `site`).
fn owner(src: &Path, file: &Path) -> String {
    let rel = file.strip_prefix(src).expect("file under src");
    let first = rel
        .components()
        .next()
        .expect("non-empty path")
        .as_os_str()
        .to_string_lossy()
        .to_string();
    first.trim_end_matches(".rs").to_string()
}

/// Every top-level module named after `crate::` in the code part of a file (comments and the
/// trailing test module excluded). Braced groups (`use crate::{a, b::c}`) are expanded.
fn imported_modules(text: &str) -> BTreeSet<String> {
    let code_end = text.find("#[cfg(test)]").unwrap_or(text.len());
    let mut found = BTreeSet::new();
    for line in text[..code_end].lines() {
        let line = match line.find("//") {
            Some(i) => &line[..i],
            None => line,
        };
        let mut rest = line;
        while let Some(i) = rest.find("crate::") {
            rest = &rest[i + "crate::".len()..];
            if let Some(group) = rest.strip_prefix('{') {
                let end = group.find('}').unwrap_or(group.len());
                for part in group[..end].split(',') {
                    let name: String = part
                        .trim()
                        .chars()
                        .take_while(|c| c.is_alphanumeric() || *c == '_')
                        .collect();
                    if !name.is_empty() {
                        found.insert(name);
                    }
                }
            } else {
                let name: String = rest
                    .chars()
                    .take_while(|c| c.is_alphanumeric() || *c == '_')
                    .collect();
                if !name.is_empty() {
                    found.insert(name);
                }
            }
        }
    }
    found
}

#[test]
fn parser_sees_plain_braced_and_inline_paths() {
    // Worked examples for the reader above: each line names the modules it must find.
    let text = "use crate::chem::Input;\nuse crate::{site::Sample, diag};\n\
                let x = crate::outlook::run(a); // crate::report in a comment\n\
                #[cfg(test)]\nuse crate::cli;\n";
    let got: Vec<String> = imported_modules(text).into_iter().collect();
    assert_eq!(got, ["chem", "diag", "outlook", "site"]);
}

#[test]
fn stages_import_one_way() {
    let src = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    assert!(files.len() > 20, "found only {} source files", files.len());
    let mut violations = Vec::new();
    for file in &files {
        let me = owner(&src, file);
        let Some(my_rank) = rank(&me) else {
            continue; // lib.rs and main.rs sit above every stage
        };
        let text = fs::read_to_string(file).expect("readable source");
        for module in imported_modules(&text) {
            let Some(their_rank) = rank(&module) else {
                continue;
            };
            let allowed = if my_rank == 0 {
                their_rank == 0
            } else {
                their_rank <= my_rank
            };
            if !allowed {
                violations.push(format!(
                    "{} ({me}) imports crate::{module}",
                    file.strip_prefix(&src).unwrap_or(file).display()
                ));
            }
        }
    }
    assert!(
        violations.is_empty(),
        "stage imports against the one-way layering:\n  {}",
        violations.join("\n  ")
    );
}

#[test]
fn every_top_level_module_has_a_rank() {
    // A new top-level module must be placed in the stage map (and in DEVELOPERS.md).
    let src = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src");
    let lib = fs::read_to_string(src.join("lib.rs")).expect("lib.rs");
    let unranked: Vec<&str> = lib
        .lines()
        .filter_map(|l| l.trim().strip_prefix("pub mod "))
        .map(|m| m.trim_end_matches(';'))
        .filter(|m| rank(m).is_none())
        .collect();
    assert!(unranked.is_empty(), "modules without a stage: {unranked:?}");
}
