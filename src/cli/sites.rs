//! The site list file of `report --site-list` and the `--shard K/N` selection over it.
//!
//! A site list holds one site file per line, relative to the list's folder (or absolute);
//! blank lines and lines starting with `#` are skipped. A site is known by its line number,
//! which names its result file in a sharded run.

use std::path::{Path, PathBuf};

/// One listed site.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Listed {
    /// Line of the list file (1 = first), or position on the command line.
    pub line: usize,
    /// The site file, resolved against the list's folder.
    pub path: PathBuf,
    /// The site file as written in the list.
    pub shown: String,
}

/// Reads a site list; the message names the list file and line.
pub fn read_site_list(list: &Path) -> Result<Vec<Listed>, String> {
    let bytes = std::fs::read(list).map_err(|e| format!("cannot read {}: {e}", list.display()))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        format!(
            "{}: not UTF-8 text (byte {}); a site list is plain text, one site file per line",
            list.display(),
            e.utf8_error().valid_up_to()
        )
    })?;
    let folder = list.parent().unwrap_or(Path::new(""));
    let mut out = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let entry = raw.trim();
        if entry.is_empty() || entry.starts_with('#') {
            continue;
        }
        let p = Path::new(entry);
        let path = if p.is_absolute() {
            p.to_path_buf()
        } else {
            folder.join(p)
        };
        out.push(Listed {
            line: i + 1,
            path,
            shown: entry.to_string(),
        });
    }
    if out.is_empty() {
        return Err(format!(
            "{}: lists no site file (one path per line, relative to the list; # starts a comment)",
            list.display()
        ));
    }
    Ok(out)
}

/// Shard `index` of `count` (both from 1): the listed sites at positions index, index + count,
/// index + 2·count, … (every count-th site, so that shards get similar mixes).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    pub index: usize,
    pub count: usize,
}

impl Shard {
    /// Whether the site at 0-based position `i` of the list belongs to this shard.
    pub fn takes(&self, i: usize) -> bool {
        i % self.count == self.index - 1
    }
}

impl std::fmt::Display for Shard {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}/{}", self.index, self.count)
    }
}

/// Parses `K/N` (shard K of N, K from 1 to N).
pub fn parse_shard(s: &str) -> Result<Shard, String> {
    let (k, n) = s
        .split_once('/')
        .ok_or_else(|| format!("{s:?} is not of the form K/N (shard K of N, e.g. 2/8)"))?;
    let num = |t: &str, what: &str| {
        t.trim()
            .parse::<usize>()
            .map_err(|_| format!("{s:?}: the {what} {t:?} is not a whole number"))
    };
    let index = num(k, "shard index")?;
    let count = num(n, "shard count")?;
    if count == 0 {
        return Err(format!("{s:?}: the shard count must be at least 1"));
    }
    if index == 0 || index > count {
        return Err(format!(
            "shard index {index} is out of range: shards are numbered 1 to {count}"
        ));
    }
    Ok(Shard { index, count })
}

/// A hash of what the per-site numbers depend on beyond the site files (whose own hashes are
/// in each result): the site list's bytes and the seed override. Results made with another
/// list or seed are refused by `--merge`.
pub fn settings_hash(list: &Path, seed: Option<u64>) -> Result<String, String> {
    use sha2::{Digest, Sha256};
    let bytes = std::fs::read(list).map_err(|e| format!("cannot read {}: {e}", list.display()))?;
    let mut h = Sha256::new();
    h.update(b"site list\n");
    h.update(&bytes);
    h.update(format!("\nseed {seed:?}\n").as_bytes());
    Ok(h.finalize().iter().map(|b| format!("{b:02x}")).collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn list_lines_resolve_against_the_list_folder_and_skip_comments() {
        let dir = tempfile::tempdir().unwrap();
        let list = dir.path().join("sites.txt");
        std::fs::write(
            &list,
            "# candidates\n\nnorth/site.toml\n  # indented comment\n south.toml  \n",
        )
        .unwrap();
        let l = read_site_list(&list).unwrap();
        assert_eq!(l.len(), 2);
        // Line numbers count every line of the file, comments and blanks included.
        assert_eq!((l[0].line, l[1].line), (3, 5));
        assert_eq!(l[0].path, dir.path().join("north/site.toml"));
        assert_eq!(l[1].shown, "south.toml");
    }

    #[test]
    fn an_empty_list_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let list = dir.path().join("sites.txt");
        std::fs::write(&list, "# nothing yet\n").unwrap();
        assert!(
            read_site_list(&list)
                .unwrap_err()
                .contains("lists no site file")
        );
    }

    #[test]
    fn shards_split_the_list_round_robin() {
        let s = parse_shard("2/3").unwrap();
        // Positions 0..7 with 3 shards: shard 2 takes positions 1 and 4.
        let taken: Vec<usize> = (0..6).filter(|&i| s.takes(i)).collect();
        assert_eq!(taken, vec![1, 4]);
        // Every position goes to exactly one shard.
        for i in 0..20 {
            let owners = (1..=3)
                .filter(|&k| Shard { index: k, count: 3 }.takes(i))
                .count();
            assert_eq!(owners, 1);
        }
        assert_eq!(s.to_string(), "2/3");
    }

    #[test]
    fn bad_shards_are_refused_with_the_reason() {
        assert!(parse_shard("5/4").unwrap_err().contains("out of range"));
        assert!(parse_shard("0/4").unwrap_err().contains("out of range"));
        assert!(parse_shard("1/0").unwrap_err().contains("at least 1"));
        assert!(
            parse_shard("x/4")
                .unwrap_err()
                .contains("not a whole number")
        );
        assert!(parse_shard("3").unwrap_err().contains("K/N"));
    }

    #[test]
    fn the_settings_hash_follows_the_list_and_the_seed() {
        let dir = tempfile::tempdir().unwrap();
        let list = dir.path().join("sites.txt");
        std::fs::write(&list, "a.toml\n").unwrap();
        let a = settings_hash(&list, None).unwrap();
        assert_eq!(a, settings_hash(&list, None).unwrap());
        assert_ne!(a, settings_hash(&list, Some(1)).unwrap());
        std::fs::write(&list, "b.toml\n").unwrap();
        assert_ne!(a, settings_hash(&list, None).unwrap());
    }
}
