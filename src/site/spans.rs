//! Reading the site TOML with source positions: syntax errors and serde errors become
//! diagnostics with file, line, column and key path; later checks look up where a key is.

use std::ops::Range;
use std::path::Path;

use serde::Deserialize;
use toml::de::{DeTable, DeValue};

use super::schema::SiteFile;
use crate::diag::{Diagnostic, Diagnostics};

/// Byte offsets of line starts, for turning offsets into 1-based line/column.
#[derive(Clone, Debug)]
pub struct LineIndex {
    starts: Vec<usize>,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let mut starts = vec![0];
        starts.extend(text.match_indices('\n').map(|(i, _)| i + 1));
        LineIndex { starts }
    }

    /// 1-based line and 1-based column in characters of byte `offset`.
    pub fn line_col(&self, text: &str, offset: usize) -> (usize, usize) {
        let offset = offset.min(text.len());
        let line0 = match self.starts.binary_search(&offset) {
            Ok(i) => i,
            Err(i) => i.saturating_sub(1),
        };
        let start = self.starts.get(line0).copied().unwrap_or(0);
        let col = text
            .get(start..offset)
            .map_or(offset - start, |s| s.chars().count());
        (line0 + 1, col + 1)
    }

    /// The text of 1-based `line`, without its line ending.
    pub fn line_text<'t>(&self, text: &'t str, line: usize) -> &'t str {
        let Some(&start) = self.starts.get(line.saturating_sub(1)) else {
            return "";
        };
        let end = self.starts.get(line).copied().unwrap_or(text.len());
        text.get(start..end)
            .unwrap_or("")
            .trim_end_matches(['\n', '\r'])
    }
}

/// Where one key and its value are in the file.
#[derive(Clone, Debug)]
struct Entry {
    path: String,
    key: Range<usize>,
    value: Range<usize>,
}

/// Positions of every key and array element of a parsed TOML document, by key path
/// (`site.latitude_deg`, `records[0].units.ta`, `seasons.wet[2]`).
#[derive(Clone, Debug)]
pub struct SourceMap {
    entries: Vec<Entry>,
    lines: LineIndex,
    text: String,
}

impl SourceMap {
    fn build(text: &str, table: &DeTable<'_>) -> Self {
        let mut entries = Vec::new();
        walk_table(table, "", &mut entries);
        SourceMap {
            entries,
            lines: LineIndex::new(text),
            text: text.to_string(),
        }
    }

    /// The span of the value at `path`, if the key is written in the file.
    pub fn value_span(&self, path: &str) -> Option<Range<usize>> {
        self.entries
            .iter()
            .find(|e| e.path == path)
            .map(|e| e.value.clone())
    }

    /// The span of the key at `path` (for array elements: the element).
    pub fn key_span(&self, path: &str) -> Option<Range<usize>> {
        self.entries
            .iter()
            .find(|e| e.path == path)
            .map(|e| e.key.clone())
    }

    /// The deepest key path whose key or value contains `offset`.
    pub fn path_at(&self, offset: usize) -> Option<&str> {
        self.entries
            .iter()
            .filter(|e| e.value.contains(&offset) || e.key.contains(&offset))
            .min_by_key(|e| {
                let v = if e.value.contains(&offset) {
                    e.value.len()
                } else {
                    e.key.len()
                };
                (v, usize::MAX - e.path.len())
            })
            .map(|e| e.path.as_str())
    }

    /// A diagnostic located at byte range `span` of the file.
    pub fn locate(&self, d: Diagnostic, span: Range<usize>) -> Diagnostic {
        let (line, col) = self.lines.line_col(&self.text, span.start);
        let snippet = self.lines.line_text(&self.text, line).to_string();
        let width = self
            .text
            .get(span.clone())
            .map_or(1, |s| s.lines().next().map_or(1, |l| l.chars().count()));
        d.at(line, col).with_snippet(snippet).with_width(width)
    }

    /// A diagnostic about the key at `path`: located at its value when written in the file,
    /// otherwise at the nearest enclosing table that is written, otherwise file-only.
    pub fn at_path(&self, d: Diagnostic, path: &str) -> Diagnostic {
        let d = d.with_field(path);
        let mut p = path;
        loop {
            if let Some(span) = self.value_span(p) {
                // Tables' spans cover the whole table; point at the header line instead.
                if p != path {
                    return self.locate(d, self.key_span(p).unwrap_or(span));
                }
                return self.locate(d, span);
            }
            match p.rfind(['.', '[']) {
                Some(i) => p = &p[..i],
                None => return d,
            }
        }
    }
}

fn walk_table(table: &DeTable<'_>, prefix: &str, out: &mut Vec<Entry>) {
    for (k, v) in table.iter() {
        let path = if prefix.is_empty() {
            k.get_ref().to_string()
        } else {
            format!("{prefix}.{}", k.get_ref())
        };
        out.push(Entry {
            path: path.clone(),
            key: k.span(),
            value: v.span(),
        });
        walk_value(v.get_ref(), &path, out);
    }
}

fn walk_value(v: &DeValue<'_>, path: &str, out: &mut Vec<Entry>) {
    match v {
        DeValue::Table(t) => walk_table(t, path, out),
        DeValue::Array(a) => {
            for (i, item) in a.iter().enumerate() {
                let p = format!("{path}[{i}]");
                out.push(Entry {
                    path: p.clone(),
                    key: item.span(),
                    value: item.span(),
                });
                walk_value(item.get_ref(), &p, out);
            }
        }
        _ => {}
    }
}

/// Parses and deserialises a site file. Syntax errors are all reported; a structural error
/// (unknown key, wrong type, missing key) is reported with a suggestion where one helps.
pub fn parse_site_text(file: &Path, text: &str) -> Result<(SiteFile, SourceMap), Diagnostics> {
    let (table, errors) = DeTable::parse_recoverable(text);
    let lines = LineIndex::new(text);
    if !errors.is_empty() {
        let mut ds = Diagnostics::new();
        for e in errors {
            // Name the key: toml says only "duplicate key".
            let message = match e.span().and_then(|s| text.get(s)) {
                Some(key) if e.message().trim() == "duplicate key" => {
                    format!("TOML syntax error: duplicate key `{}`", key.trim())
                }
                _ => format!("TOML syntax error: {}", e.message()),
            };
            let help = if e.message().contains("duplicate key") {
                "each key and each [section] may appear only once; a list of record files is written as several [[records]] (double brackets)"
            } else {
                "see docs/site-format.md for the layout of a site file"
            };
            let mut d = Diagnostic::error(message).with_file(file).with_help(help);
            if let Some(span) = e.span() {
                let (line, col) = lines.line_col(text, span.start);
                d = d
                    .at(line, col)
                    .with_snippet(lines.line_text(text, line))
                    .with_width(span.len().max(1));
            }
            ds.push(d);
        }
        return Err(ds);
    }
    let map = SourceMap::build(text, table.get_ref());
    let de = toml::de::Deserializer::parse(text).map_err(|e| {
        Diagnostics::from(
            Diagnostic::error(format!("TOML syntax error: {}", e.message())).with_file(file),
        )
    })?;
    match SiteFile::deserialize(de) {
        Ok(site) => Ok((site, map)),
        Err(e) => Err(Diagnostics::from(serde_error(file, &map, &e))),
    }
}

fn serde_error(file: &Path, map: &SourceMap, e: &toml::de::Error) -> Diagnostic {
    let msg = e.message().trim();
    let span = e.span();
    let path = span
        .as_ref()
        .and_then(|s| map.path_at(s.start))
        .map(str::to_string);
    let mut d = Diagnostic::error(msg.to_string()).with_file(file);
    if let Some(s) = span.clone() {
        d = map.locate(d, s);
    }

    if let Some((word, expected)) = parse_unknown(msg, "unknown field") {
        let parent = path
            .as_deref()
            .map(|p| p.rsplit_once('.').map_or("", |(a, _)| a))
            .unwrap_or("");
        let section = if parent.is_empty() {
            "at the top level".to_string()
        } else {
            format!("in `{}`", strip_indices(parent))
        };
        d.message = format!("unknown key `{word}` {section}");
        d.field = Some(path.unwrap_or_else(|| word.clone()));
        d.help = Some(suggestion_help(&word, &expected, "valid keys"));
        if let Some(s) = map.key_span(d.field.as_deref().unwrap_or("")) {
            d = map.locate(d, s);
        }
        return d;
    }
    if let Some((word, expected)) = parse_unknown(msg, "unknown variant") {
        d.message = format!("unknown value \"{word}\"");
        d.field = path;
        d.help = Some(suggestion_help(&word, &expected, "valid values"));
        return d;
    }
    if let Some(rest) = msg.strip_prefix("missing field `") {
        let key = rest.split('`').next().unwrap_or("");
        // An empty span at the start is the document itself: a missing top-level section.
        let top_level = span.as_ref().is_some_and(|s| s.is_empty());
        if top_level {
            d.line = None;
            d.column = None;
            d.snippet = None;
            d.message = format!("missing required section `[{key}]`");
            d.help = Some(format!(
                "add a [{key}] section (see docs/site-format.md; `calcisite init DIR` writes a complete example)"
            ));
            d.field = Some(key.to_string());
            return d;
        }
        let table = path.clone().unwrap_or_default();
        let full = if table.is_empty() {
            key.to_string()
        } else {
            format!("{table}.{key}")
        };
        d.message = if table.is_empty() {
            format!("missing required section or key `{key}`")
        } else {
            format!(
                "missing required key `{key}` in `{}`",
                strip_indices(&table)
            )
        };
        d.help = Some(format!(
            "add `{key} = ...` (see docs/site-format.md for its meaning and units)"
        ));
        d.field = Some(full);
        if !table.is_empty()
            && let Some(s) = map.key_span(&table)
        {
            d = map.locate(d, s);
        }
        return d;
    }
    if msg == "wanted string or table" {
        // A fixed-set value (kind, unit, scale, method...) given as a number, list or boolean.
        let key = path
            .as_deref()
            .map(|p| p.rsplit('.').next().unwrap_or(p).to_string())
            .unwrap_or_default();
        d.message = "wrong type: expected a name in quotes".to_string();
        d.help = Some(format!(
            "write the value as a quoted name, e.g. {key} = \"...\"; docs/site-format.md lists the valid names"
        ));
        d.field = path;
        return d;
    }
    if msg.contains("untagged enum MonthRef") {
        d.message = "wrong type: a month must be a whole number or a name".to_string();
        d.help = Some("months are 1–12 or names such as \"Jan\" or \"January\"".to_string());
        d.field = path;
        return d;
    }
    if let Some(rest) = msg.strip_prefix("invalid length ") {
        // "invalid length 1, expected an array of length 2"
        let (found, expected) = rest.split_once(", expected ").unwrap_or((rest, ""));
        d.message = format!("wrong number of items: found {found}");
        let points = path.as_deref().is_some_and(|p| p.contains("points"));
        d.help = Some(if points {
            "write each point as [year, ppm], e.g. [2050, 520.0]".to_string()
        } else {
            format!("expected {expected}")
        });
        d.field = path;
        return d;
    }
    if let Some(rest) = msg.strip_prefix("invalid value: ") {
        // "invalid value: integer `-5`, expected usize"
        let (found, expected) = rest.split_once(", expected ").unwrap_or((rest, ""));
        d.message = format!("invalid value: {found}");
        if !expected.is_empty() {
            d.help = Some(format!("expected {}", friendly_type(expected)));
        }
        d.field = path;
        return d;
    }
    if let Some(rest) = msg.strip_prefix("invalid type: ") {
        // "invalid type: string \"abc\", expected f64"
        let (found, expected) = rest.split_once(", expected ").unwrap_or((rest, ""));
        d.message = format!("wrong type: found {found}");
        if !expected.is_empty() {
            d.help = Some(format!("expected {}", friendly_type(expected)));
        }
        d.field = path;
        return d;
    }
    d.field = path;
    d
}

fn friendly_type(serde_expected: &str) -> String {
    match serde_expected {
        "f64" | "f32" => "a number (e.g. 12.5)".to_string(),
        "i32" | "i64" => "a whole number (e.g. 2030)".to_string(),
        "u64" | "usize" | "u32" | "u16" | "u8" => {
            "a whole number, 0 or more (e.g. 1000)".to_string()
        }
        "a boolean" => "true or false".to_string(),
        "a string" => "a quoted string (e.g. \"text\")".to_string(),
        "a sequence" => "a list in square brackets (e.g. [1, 2])".to_string(),
        other => other.to_string(),
    }
}

fn strip_indices(p: &str) -> String {
    let mut out = String::with_capacity(p.len());
    let mut depth = 0;
    for c in p.chars() {
        match c {
            '[' => depth += 1,
            ']' => depth -= 1,
            _ if depth == 0 => out.push(c),
            _ => {}
        }
    }
    out
}

/// Parses serde's "unknown field `x`, expected one of `a`, `b`" / "expected `a`" /
/// "there are no fields" messages into the word and the expected list.
fn parse_unknown(msg: &str, prefix: &str) -> Option<(String, Vec<String>)> {
    let rest = msg.strip_prefix(prefix)?.trim_start();
    let rest = rest.strip_prefix('`')?;
    let end = rest.find('`')?;
    let word = rest[..end].to_string();
    let tail = &rest[end + 1..];
    let expected = tail
        .split('`')
        .enumerate()
        .filter(|(i, _)| i % 2 == 1)
        .map(|(_, s)| s.to_string())
        .collect();
    Some((word, expected))
}

fn suggestion_help(word: &str, expected: &[String], what: &str) -> String {
    let list = expected
        .iter()
        .map(|s| format!("`{s}`"))
        .collect::<Vec<_>>()
        .join(", ");
    match did_you_mean(word, expected.iter().map(String::as_str)) {
        Some(s) if list.is_empty() => format!("did you mean `{s}`?"),
        Some(s) => format!("did you mean `{s}`? {what}: {list}"),
        None if list.is_empty() => "this section takes no keys".to_string(),
        None => format!("{what}: {list}"),
    }
}

/// Levenshtein edit distance over characters, ignoring ASCII case.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().map(|c| c.to_ascii_lowercase()).collect();
    let b: Vec<char> = b.chars().map(|c| c.to_ascii_lowercase()).collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for (i, ca) in a.iter().enumerate() {
        cur[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

/// The closest candidate to `word` when it is close enough to be a likely misspelling
/// (distance ≤ max(1, len/3)), or one that contains / is contained in `word`.
pub fn did_you_mean<'a>(
    word: &str,
    candidates: impl IntoIterator<Item = &'a str>,
) -> Option<&'a str> {
    let lw = word.to_ascii_lowercase();
    let limit = (word.chars().count() / 3).max(1);
    let mut best: Option<(usize, &'a str)> = None;
    for c in candidates {
        let lc = c.to_ascii_lowercase();
        let mut d = edit_distance(word, c);
        if lw.len() >= 3 && lc.len() >= 3 && (lc.contains(&lw) || lw.contains(&lc)) {
            d = d.min(limit);
        }
        if d <= limit && best.is_none_or(|(bd, _)| d < bd) {
            best = Some((d, c));
        }
    }
    best.map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_col_counts_characters() {
        let t = "a = 1\nµb = 2\n";
        let li = LineIndex::new(t);
        assert_eq!(li.line_col(t, 0), (1, 1));
        let off = t.find('b').unwrap_or(0);
        assert_eq!(li.line_col(t, off), (2, 2));
        assert_eq!(li.line_text(t, 2), "µb = 2");
        assert_eq!(li.line_text(t, 9), "");
    }

    #[test]
    fn edit_distance_known_values() {
        // Classic textbook pair (Levenshtein): kitten → sitting needs 3 edits.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("Lat", "lat"), 0);
    }

    #[test]
    fn suggestions() {
        let keys = ["latitude_deg", "longitude_deg", "depth_min_m"];
        assert_eq!(did_you_mean("latitud_deg", keys), Some("latitude_deg"));
        assert_eq!(did_you_mean("latitude", keys), Some("latitude_deg"));
        assert_eq!(did_you_mean("colour", keys), None);
    }

    #[test]
    fn parses_serde_unknown_messages() {
        let (w, e) = parse_unknown(
            "unknown field `latitde_deg`, expected one of `name`, `latitude_deg`",
            "unknown field",
        )
        .unwrap_or_default();
        assert_eq!(w, "latitde_deg");
        assert_eq!(e, vec!["name".to_string(), "latitude_deg".to_string()]);
    }
}
