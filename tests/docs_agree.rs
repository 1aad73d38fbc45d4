//! The documents state the same defaults as the code, word for word.

use std::path::Path;

fn read(rel: &str) -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(rel))
        .unwrap_or_else(|e| panic!("{rel}: {e}"))
}

/// The warming default (issue: "one default, stated identically in the README, the
/// site-format docs and the code").
#[test]
fn warming_default_is_stated_identically() {
    let statement = calcisite::outlook::warming::DEFAULT_STATEMENT;
    for doc in ["README.md", "docs/site-format.md"] {
        assert!(
            read(doc).contains(statement),
            "{doc} does not repeat outlook::warming::DEFAULT_STATEMENT verbatim"
        );
    }
}
