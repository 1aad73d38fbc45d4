//! The documents state the same defaults as the code, word for word.

use std::path::Path;

fn read(rel: &str) -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(rel))
        .unwrap_or_else(|e| panic!("{rel}: {e}"))
}

/// The offset rule of the source-offsets projection (issue 12: "state the offset rule in
/// docs and in the report's methods"), the same words in the code and the site-file docs.
#[test]
fn source_water_offset_rule_is_stated_identically() {
    let rule = calcisite::outlook::source_water::OFFSET_RULE;
    assert!(
        read("docs/site-format.md").contains(rule),
        "docs/site-format.md does not repeat outlook::source_water::OFFSET_RULE verbatim"
    );
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
