//! The catalogue of selectable chemistry methods: one entry per published fit a site or the
//! `solve` command may choose.
//!
//! Three choices are open, each a list below:
//!
//! * [`CARBONIC_ACID`]: the K1, K2 fit of carbonic acid (CLI `--carbonic-acid`, site key
//!   `carbonic_acid`);
//! * [`TOTAL_BORON`]: the total-boron–salinity ratio (`--total-boron`, `total_boron`);
//! * [`HYDROGEN_FLUORIDE`]: the HF dissociation constant (`--hydrogen-fluoride`,
//!   `hydrogen_fluoride`).
//!
//! Each [`Entry`] holds the citation-based id, the citation, the fitted temperature and
//! salinity range, the pH scale the fit is published on and the function itself. The first
//! entry of each list is the default. Everything else is derived from these lists: the
//! accepted option values, the CLI help text, the "did you mean" suggestion, the range
//! warnings ([`super::MethodSet::range_warnings`]), the constants used by
//! [`super::Constants::new`] and the table in `docs/site-format.md` (a test parses that
//! table and compares it with the lists, so the two cannot drift apart).
//!
//! Adding a fit: write its function in `constants.rs`, add one entry here, add its rows to
//! the reference table (`tests/reference/make_chem_reference.py`, `alt_sets`) and a row to
//! the docs table.
//!
//! Parsing, for command-line flags and site files: [`MethodKind::parse`] (or `str::parse`
//! on [`super::K1K2`], [`super::BoronTotal`], [`super::KfSource`]) returns an
//! [`UnknownMethod`] that carries the bad value, the valid ids and a suggestion, so the
//! caller can place it in a file:line:column diagnostic.

use std::fmt;

use super::constants::{self as c, TempSal};
use super::scales::PhScale;

/// A K1, K2 fit: (ln K1, ln K2) on its native pH scale at one atmosphere, mol/kg-SW.
pub type CarbonicAcidFn = fn(&TempSal) -> (f64, f64);
/// Total boron from practical salinity, mol/kg-SW.
pub type TotalBoronFn = fn(f64) -> f64;
/// ln KF of hydrogen fluoride on the free scale at one atmosphere, mol/kg-SW.
pub type HydrogenFluorideFn = fn(&TempSal) -> f64;

/// One selectable method.
#[derive(Clone, Copy, Debug)]
pub struct Entry<F> {
    /// The id accepted on the command line and in site files (author and year).
    pub id: &'static str,
    /// The name the method goes by in a methods table: its authors, as the citation opens.
    pub method: &'static str,
    /// Short citation of the publication.
    pub citation: &'static str,
    /// Fitted temperature range, °C.
    pub temp_c: (f64, f64),
    /// Fitted practical-salinity range.
    pub salinity: (f64, f64),
    /// The pH scale the published fit is on (`None` for a total concentration).
    pub native_scale: Option<PhScale>,
    /// The published relationship (see `constants.rs` for units and check values).
    pub function: F,
}

/// K1, K2 fits of carbonic acid. The first is the default.
pub const CARBONIC_ACID: &[Entry<CarbonicAcidFn>] = &[
    Entry {
        id: "lueker2000",
        method: "Lueker, Dickson & Keeling",
        citation: "Lueker, Dickson & Keeling (2000), Mar. Chem. 70:105",
        temp_c: (2.0, 35.0),
        salinity: (19.0, 43.0),
        native_scale: Some(PhScale::Total),
        function: c::ln_k1k2_total_lueker2000,
    },
    Entry {
        id: "millero2010",
        method: "Millero",
        citation: "Millero (2010), Mar. Freshwater Res. 61:139",
        temp_c: (0.0, 50.0),
        salinity: (1.0, 50.0),
        native_scale: Some(PhScale::Seawater),
        function: c::ln_k1k2_sws_millero2010,
    },
    Entry {
        id: "wmw2014",
        method: "Waters, Millero & Woosley",
        citation: "Waters, Millero & Woosley (2014), Mar. Chem. 165:66",
        temp_c: (0.0, 50.0),
        salinity: (1.0, 50.0),
        native_scale: Some(PhScale::Seawater),
        function: c::ln_k1k2_sws_wmw2014,
    },
    Entry {
        id: "sulpis2020",
        method: "Sulpis et al.",
        citation: "Sulpis et al. (2020), Ocean Sci. 16:847",
        temp_c: (-1.7, 31.8),
        salinity: (30.7, 37.6),
        native_scale: Some(PhScale::Total),
        function: c::ln_k1k2_total_sulpis2020,
    },
    Entry {
        id: "dm87",
        method: "Dickson & Millero",
        citation: "Dickson & Millero (1987), Deep-Sea Res. 34:1733 (refit of Mehrbach et al. 1973)",
        temp_c: (2.0, 35.0),
        salinity: (20.0, 40.0),
        native_scale: Some(PhScale::Seawater),
        function: c::ln_k1k2_sws_dickson_millero1987,
    },
];

/// Total-boron–salinity ratios. The first is the default.
pub const TOTAL_BORON: &[Entry<TotalBoronFn>] = &[
    Entry {
        id: "lee2010",
        method: "Lee et al.",
        citation: "Lee et al. (2010), Geochim. Cosmochim. Acta 74:1801",
        temp_c: (-2.0, 45.0),
        salinity: (0.0, 50.0),
        native_scale: None,
        function: c::total_boron_lee2010,
    },
    Entry {
        id: "uppstrom1974",
        method: "Uppström",
        citation: "Uppström (1974), Deep-Sea Res. 21:161",
        temp_c: (-2.0, 45.0),
        salinity: (0.0, 50.0),
        native_scale: None,
        function: c::total_boron_uppstrom1974,
    },
];

/// Hydrogen fluoride dissociation constants. The first is the default.
pub const HYDROGEN_FLUORIDE: &[Entry<HydrogenFluorideFn>] = &[
    Entry {
        id: "pf87",
        method: "Perez & Fraga",
        citation: "Perez & Fraga (1987), Mar. Chem. 21:161",
        temp_c: (9.0, 33.0),
        salinity: (10.0, 40.0),
        native_scale: Some(PhScale::Free),
        function: c::ln_kf_free_perez_fraga1987,
    },
    Entry {
        id: "dr79",
        method: "Dickson & Riley",
        citation: "Dickson & Riley (1979), Mar. Chem. 7:89",
        temp_c: (5.0, 35.0),
        salinity: (10.0, 48.0),
        native_scale: Some(PhScale::Free),
        function: c::ln_kf_free_dickson_riley1979,
    },
];

// Every list needs a default, and handles are stored as u8.
const _: () = assert!(!CARBONIC_ACID.is_empty() && CARBONIC_ACID.len() < 256);
const _: () = assert!(!TOTAL_BORON.is_empty() && TOTAL_BORON.len() < 256);
const _: () = assert!(!HYDROGEN_FLUORIDE.is_empty() && HYDROGEN_FLUORIDE.len() < 256);

/// Which choice an entry belongs to.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum MethodKind {
    CarbonicAcid,
    TotalBoron,
    HydrogenFluoride,
}

/// An entry without its function, the same shape for every kind (for tables and messages).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EntryInfo {
    pub kind: MethodKind,
    pub id: &'static str,
    pub citation: &'static str,
    pub temp_c: (f64, f64),
    pub salinity: (f64, f64),
    pub native_scale: Option<PhScale>,
    /// True for the first entry of its list.
    pub is_default: bool,
}

fn infos<F>(kind: MethodKind, list: &'static [Entry<F>]) -> Vec<EntryInfo> {
    list.iter()
        .enumerate()
        .map(|(i, e)| EntryInfo {
            kind,
            id: e.id,
            citation: e.citation,
            temp_c: e.temp_c,
            salinity: e.salinity,
            native_scale: e.native_scale,
            is_default: i == 0,
        })
        .collect()
}

impl MethodKind {
    /// The three choices, in the order they are documented.
    pub const ALL: [MethodKind; 3] = [
        MethodKind::CarbonicAcid,
        MethodKind::TotalBoron,
        MethodKind::HydrogenFluoride,
    ];

    /// What is chosen, in words, for messages ("unknown total-boron option 'x'").
    pub fn what(self) -> &'static str {
        match self {
            MethodKind::CarbonicAcid => "carbonic-acid constant set",
            MethodKind::TotalBoron => "total-boron option",
            MethodKind::HydrogenFluoride => "hydrogen-fluoride option",
        }
    }

    /// The short name of the constant in range warnings and methods lists.
    pub fn constant(self) -> &'static str {
        match self {
            MethodKind::CarbonicAcid => "K1/K2",
            MethodKind::TotalBoron => "total boron",
            MethodKind::HydrogenFluoride => "KF",
        }
    }

    /// The command-line option that chooses it.
    pub fn flag(self) -> &'static str {
        match self {
            MethodKind::CarbonicAcid => "--carbonic-acid",
            MethodKind::TotalBoron => "--total-boron",
            MethodKind::HydrogenFluoride => "--hydrogen-fluoride",
        }
    }

    /// The key in a site file's `[chemistry]` table.
    pub fn site_key(self) -> &'static str {
        match self {
            MethodKind::CarbonicAcid => "carbonic_acid",
            MethodKind::TotalBoron => "total_boron",
            MethodKind::HydrogenFluoride => "hydrogen_fluoride",
        }
    }

    /// Every entry of this kind, the default first.
    pub fn entries(self) -> Vec<EntryInfo> {
        match self {
            MethodKind::CarbonicAcid => infos(self, CARBONIC_ACID),
            MethodKind::TotalBoron => infos(self, TOTAL_BORON),
            MethodKind::HydrogenFluoride => infos(self, HYDROGEN_FLUORIDE),
        }
    }

    /// The accepted ids, the default first.
    pub fn ids(self) -> Vec<&'static str> {
        self.entries().iter().map(|e| e.id).collect()
    }

    /// The id of the default.
    pub fn default_id(self) -> &'static str {
        match self {
            MethodKind::CarbonicAcid => CARBONIC_ACID[0].id,
            MethodKind::TotalBoron => TOTAL_BORON[0].id,
            MethodKind::HydrogenFluoride => HYDROGEN_FLUORIDE[0].id,
        }
    }

    /// Help text for a command-line option or a documentation line: every id with its
    /// citation, the default marked.
    pub fn help(self) -> String {
        let items: Vec<String> = self
            .entries()
            .iter()
            .map(|e| {
                let default = if e.is_default { ", the default" } else { "" };
                format!("{} ({}{default})", e.id, e.citation)
            })
            .collect();
        let what = match self {
            MethodKind::CarbonicAcid => "K1, K2 fit of carbonic acid",
            MethodKind::TotalBoron => "total-boron–salinity ratio",
            MethodKind::HydrogenFluoride => "dissociation constant of hydrogen fluoride",
        };
        format!("The {what}: {}.", items.join("; "))
    }

    /// The position of `value` among this kind's ids (trimmed, case-insensitive).
    pub fn parse(self, value: &str) -> Result<usize, UnknownMethod> {
        let wanted = value.trim();
        let ids = self.ids();
        ids.iter()
            .position(|id| id.eq_ignore_ascii_case(wanted))
            .ok_or_else(|| UnknownMethod {
                kind: self,
                value: value.to_string(),
                suggestion: suggest(wanted, &ids),
                choices: ids,
            })
    }
}

/// A value that names no entry of the catalogue. `Display` gives a complete sentence, e.g.
/// "unknown total-boron option 'lee' (expected lee2010 or uppstrom1974; did you mean
/// lee2010?)"; the fields let a caller build its own diagnostic.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UnknownMethod {
    /// Which choice was being parsed.
    pub kind: MethodKind,
    /// The value as given.
    pub value: String,
    /// Every valid id, the default first.
    pub choices: Vec<&'static str>,
    /// The id closest to the value, when one is close enough to be a likely typo.
    pub suggestion: Option<&'static str>,
}

impl UnknownMethod {
    /// "a, b or c".
    pub fn expected(&self) -> String {
        match self.choices.split_last() {
            None => String::new(),
            Some((last, [])) => (*last).to_string(),
            Some((last, rest)) => format!("{} or {last}", rest.join(", ")),
        }
    }
}

impl fmt::Display for UnknownMethod {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "unknown {} '{}' (expected {}",
            self.kind.what(),
            self.value,
            self.expected()
        )?;
        if let Some(s) = self.suggestion {
            write!(f, "; did you mean {s}?")?;
        }
        f.write_str(")")
    }
}

impl std::error::Error for UnknownMethod {}

/// Levenshtein distance between two short ASCII-insensitive strings (by chars).
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().flat_map(char::to_lowercase).collect();
    let b: Vec<char> = b.chars().flat_map(char::to_lowercase).collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for (i, ca) in a.iter().enumerate() {
        if let Some(first) = cur.first_mut() {
            *first = i + 1;
        }
        for (j, cb) in b.iter().enumerate() {
            let sub = prev.get(j).copied().unwrap_or(0) + usize::from(ca != cb);
            let del = prev.get(j + 1).copied().unwrap_or(0) + 1;
            let ins = cur.get(j).copied().unwrap_or(0) + 1;
            if let Some(slot) = cur.get_mut(j + 1) {
                *slot = sub.min(del).min(ins);
            }
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev.last().copied().unwrap_or(0)
}

/// The id a mistyped value most likely meant: one that starts with the value (a year left
/// off, "uppstrom" → uppstrom1974) or that, with or without its year, is within a third of
/// the value's length in edits (at least 2; "upstrom" → uppstrom1974).
fn suggest(value: &str, ids: &[&'static str]) -> Option<&'static str> {
    let low = value.to_ascii_lowercase();
    if low.len() >= 2
        && let Some(id) = ids.iter().find(|id| id.starts_with(&low))
    {
        return Some(id);
    }
    let len = low.chars().count();
    // At least two edits, but fewer than the value has characters ("x" suggests nothing).
    let limit = (len / 3).max(2).min(len.saturating_sub(1));
    ids.iter()
        .map(|id| {
            let name = id.trim_end_matches(|c: char| c.is_ascii_digit());
            let d = edit_distance(&low, id);
            let d = if name.is_empty() {
                d
            } else {
                d.min(edit_distance(&low, name))
            };
            (d, *id)
        })
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, id)| id)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A methods table names a method by its authors: the words its citation opens with,
    /// before the year (the citations are the publications' own author lists).
    #[test]
    fn method_names_open_their_citations() {
        let all = crate::chem::MethodSet::default().method_citations();
        let listed = CARBONIC_ACID
            .iter()
            .map(|e| (e.method, e.citation))
            .chain(TOTAL_BORON.iter().map(|e| (e.method, e.citation)))
            .chain(HYDROGEN_FLUORIDE.iter().map(|e| (e.method, e.citation)))
            .chain(all.iter().map(|c| (c.method, c.citation)));
        for (method, citation) in listed {
            assert!(
                citation.starts_with(&format!("{method} (")),
                "{method} / {citation}"
            );
        }
        assert_eq!(
            all.first().map(|c| c.method),
            Some("Lueker, Dickson & Keeling")
        );
    }

    #[test]
    fn messages_name_the_choice_not_a_type() {
        let e = MethodKind::TotalBoron.parse("x").unwrap_err();
        assert_eq!(
            e.to_string(),
            "unknown total-boron option 'x' (expected lee2010 or uppstrom1974)"
        );
        let e = MethodKind::CarbonicAcid.parse("lueker").unwrap_err();
        assert_eq!(e.suggestion, Some("lueker2000"));
        assert_eq!(
            e.to_string(),
            "unknown carbonic-acid constant set 'lueker' (expected lueker2000, millero2010, \
             wmw2014, sulpis2020 or dm87; did you mean lueker2000?)"
        );
        assert_eq!(e.value, "lueker");
        assert_eq!(e.choices.len(), CARBONIC_ACID.len());
    }

    #[test]
    fn suggestions_catch_typos_and_nothing_else() {
        let k = MethodKind::CarbonicAcid;
        let f = MethodKind::HydrogenFluoride;
        assert_eq!(
            k.parse("luecker2000").unwrap_err().suggestion,
            Some("lueker2000")
        );
        assert_eq!(k.parse("wmw2041").unwrap_err().suggestion, Some("wmw2014"));
        assert_eq!(k.parse("dm78").unwrap_err().suggestion, Some("dm87"));
        assert_eq!(k.parse("zzzzzzzz").unwrap_err().suggestion, None);
        assert_eq!(f.parse("x").unwrap_err().suggestion, None);
        assert_eq!(f.parse("dr").unwrap_err().suggestion, Some("dr79"));
        assert_eq!(f.parse("").unwrap_err().suggestion, None);
        let b = MethodKind::TotalBoron;
        assert_eq!(
            b.parse("upstrom").unwrap_err().suggestion,
            Some("uppstrom1974")
        );
        assert_eq!(b.parse("le2010").unwrap_err().suggestion, Some("lee2010"));
    }

    #[test]
    fn ids_parse_case_insensitively_and_trimmed() {
        assert_eq!(MethodKind::CarbonicAcid.parse(" DM87 "), Ok(4));
        assert_eq!(MethodKind::TotalBoron.parse("uppstrom1974"), Ok(1));
    }

    #[test]
    fn edit_distance_worked_examples() {
        // Textbook examples: kitten → sitting takes 3 edits; flaw → lawn takes 2.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("flaw", "lawn"), 2);
        assert_eq!(edit_distance("", "abc"), 3);
    }

    #[test]
    fn ids_are_unique_and_lowercase_and_ranges_ordered() {
        for kind in MethodKind::ALL {
            let ids = kind.ids();
            for (i, id) in ids.iter().enumerate() {
                assert!(!ids[..i].contains(id), "{id} twice");
                assert_eq!(*id, id.to_ascii_lowercase());
            }
            for e in kind.entries() {
                assert!(
                    e.temp_c.0 < e.temp_c.1 && e.salinity.0 < e.salinity.1,
                    "{e:?}"
                );
            }
        }
    }

    /// `Constants::new` converts K1, K2 from the total, seawater or free scale and treats KF
    /// as free-scale; an entry on any other scale would be converted wrongly.
    #[test]
    fn native_scales_are_ones_the_constants_code_converts() {
        for e in CARBONIC_ACID {
            assert!(
                matches!(
                    e.native_scale,
                    Some(PhScale::Total | PhScale::Seawater | PhScale::Free)
                ),
                "{}",
                e.id
            );
        }
        for e in HYDROGEN_FLUORIDE {
            assert_eq!(e.native_scale, Some(PhScale::Free), "{}", e.id);
        }
        for e in TOTAL_BORON {
            assert_eq!(e.native_scale, None, "{}", e.id);
        }
    }

    #[test]
    fn help_lists_every_id_and_the_default() {
        let h = MethodKind::TotalBoron.help();
        assert!(h.contains("lee2010 (Lee et al. (2010)"), "{h}");
        assert!(h.contains("the default"), "{h}");
        assert!(h.contains("uppstrom1974"), "{h}");
    }
}
