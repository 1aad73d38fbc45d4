//! The method catalogue against its documentation: the table of ids in
//! `docs/site-format.md` (section `[chemistry]`) must list exactly the catalogue's entries,
//! with the same publication, fitted ranges, pH scale and default, so that the two cannot
//! drift apart. Also: the catalogue's ids are the ones the reference tables were made for.

use calcisite::chem::catalogue::{EntryInfo, MethodKind};
use calcisite::chem::scales::PhScale;
use calcisite::chem::{BoronTotal, K1K2, KfSource};

/// One row of the docs table.
#[derive(Debug)]
struct DocRow {
    line: usize,
    key: String,
    id: String,
    is_default: bool,
    citation: String,
    temp_c: (f64, f64),
    salinity: (f64, f64),
    scale: String,
}

fn range(cell: &str, line: usize) -> (f64, f64) {
    let text = cell.replace('\u{2212}', "-");
    let (a, b) = text
        .split_once(" to ")
        .unwrap_or_else(|| panic!("docs line {line}: range '{cell}' is not 'a to b'"));
    let num = |s: &str| {
        s.trim()
            .parse::<f64>()
            .unwrap_or_else(|_| panic!("docs line {line}: '{s}' is not a number"))
    };
    (num(a), num(b))
}

fn unquote(cell: &str) -> String {
    cell.trim().trim_matches('`').to_string()
}

fn doc_rows() -> Vec<DocRow> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/docs/site-format.md");
    let text = std::fs::read_to_string(path).expect("docs/site-format.md is readable");
    let mut rows = Vec::new();
    let mut in_table = false;
    for (i, line) in text.lines().enumerate() {
        let cells: Vec<&str> = line
            .trim()
            .trim_matches('|')
            .split('|')
            .map(str::trim)
            .collect();
        if line.starts_with("| key | id | publication |") {
            in_table = true;
            continue;
        }
        if !in_table || line.starts_with("|---") {
            continue;
        }
        if !line.starts_with('|') {
            if !rows.is_empty() {
                break;
            }
            continue;
        }
        assert_eq!(cells.len(), 6, "docs line {}: {line}", i + 1);
        let (id, is_default) = match cells[1].strip_suffix("(default)") {
            Some(id) => (unquote(id), true),
            None => (unquote(cells[1]), false),
        };
        rows.push(DocRow {
            line: i + 1,
            key: unquote(cells[0]),
            id,
            is_default,
            citation: cells[2].to_string(),
            temp_c: range(cells[3], i + 1),
            salinity: range(cells[4], i + 1),
            scale: cells[5].to_string(),
        });
    }
    assert!(!rows.is_empty(), "the method table was not found in {path}");
    rows
}

fn scale_word(s: Option<PhScale>) -> &'static str {
    match s {
        Some(PhScale::Total) => "total",
        Some(PhScale::Seawater) => "seawater",
        Some(PhScale::Free) => "free",
        Some(PhScale::Nbs) => "NBS",
        None => "none (a concentration)",
    }
}

#[test]
fn docs_table_lists_exactly_the_catalogue() {
    let rows = doc_rows();
    let entries: Vec<EntryInfo> = MethodKind::ALL.iter().flat_map(|k| k.entries()).collect();
    assert_eq!(
        rows.len(),
        entries.len(),
        "docs rows {:?} vs catalogue ids {:?}",
        rows.iter().map(|r| &r.id).collect::<Vec<_>>(),
        entries.iter().map(|e| e.id).collect::<Vec<_>>()
    );
    for (row, e) in rows.iter().zip(&entries) {
        let at = format!("docs/site-format.md line {}", row.line);
        assert_eq!(row.key, e.kind.site_key(), "{at}");
        assert_eq!(row.id, e.id, "{at}");
        assert_eq!(row.is_default, e.is_default, "{at}: default marker");
        assert_eq!(row.citation, e.citation, "{at}");
        assert_eq!(row.temp_c, e.temp_c, "{at}: temperature range");
        assert_eq!(row.salinity, e.salinity, "{at}: salinity range");
        assert_eq!(row.scale, scale_word(e.native_scale), "{at}: pH scale");
    }
}

#[test]
fn docs_key_table_names_the_defaults() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/docs/site-format.md");
    let text = std::fs::read_to_string(path).expect("docs/site-format.md is readable");
    for kind in MethodKind::ALL {
        let want = format!("| `{}` |", kind.site_key());
        let line = text
            .lines()
            .find(|l| l.starts_with(&want) && l.ends_with(&format!("| `{}` |", kind.default_id())))
            .unwrap_or_else(|| {
                panic!(
                    "no key row for {} with default {}",
                    kind.site_key(),
                    kind.default_id()
                )
            });
        assert!(!line.is_empty());
    }
}

/// The ids of the alternative sets in `tests/reference/alt_sets_reference.csv` (made with
/// PyCO2SYS, see tests/reference/README.md) all parse, and every non-default catalogue
/// entry has rows there: a new entry needs its reference rows.
#[test]
fn reference_table_covers_every_entry() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/alt_sets_reference.csv"
    );
    let mut rdr = csv::Reader::from_path(path).expect("reference table");
    let headers = rdr.headers().expect("header").clone();
    let col = headers.iter().position(|h| h == "set").expect("set column");
    let mut sets = std::collections::BTreeSet::new();
    for r in rdr.records() {
        let r = r.expect("row");
        sets.insert(r.get(col).unwrap_or_default().to_string());
    }
    for kind in MethodKind::ALL {
        for e in kind.entries().iter().filter(|e| !e.is_default) {
            assert!(sets.contains(e.id), "{} has no reference rows", e.id);
        }
    }
    for set in &sets {
        let known = set.parse::<K1K2>().is_ok()
            || set.parse::<BoronTotal>().is_ok()
            || set.parse::<KfSource>().is_ok();
        assert!(known, "reference set {set} is not in the catalogue");
    }
}

#[test]
fn unknown_ids_give_the_structured_error() {
    let e = "upstrom1974".parse::<BoronTotal>().unwrap_err();
    assert_eq!(e.kind, MethodKind::TotalBoron);
    assert_eq!(e.value, "upstrom1974");
    assert_eq!(e.choices, ["lee2010", "uppstrom1974"]);
    assert_eq!(e.suggestion, Some("uppstrom1974"));
    assert_eq!(
        e.to_string(),
        "unknown total-boron option 'upstrom1974' (expected lee2010 or uppstrom1974; \
         did you mean uppstrom1974?)"
    );
    let e = "pf78".parse::<KfSource>().unwrap_err();
    assert_eq!(
        e.to_string(),
        "unknown hydrogen-fluoride option 'pf78' (expected pf87 or dr79; did you mean pf87?)"
    );
}
