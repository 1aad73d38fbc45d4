//! Which relationship is closest to the site's habitat, and why. The site file's `habitat`
//! is free text; the choice reads a few plain words in it (common practice for reef zones:
//! reef flat; lagoon, back reef and sand; everything else).

use serde::Serialize;

use super::{ReefKind, builtin};

/// The relationship closest to a site's habitat, with the reason in words.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct HabitatChoice {
    pub relationship: &'static str,
    pub reason: String,
}

fn id_of(kind: ReefKind) -> &'static str {
    builtin()
        .into_iter()
        .find(|r| r.reef_kind == kind)
        .map_or("", |r| r.id)
}

fn mentions(text: &str, words: &[&str]) -> bool {
    words.iter().any(|w| text.contains(w))
}

/// The row closest to `habitat` (the site file's free text) given whether the site gives its
/// coral cover.
pub fn closest_to_habitat(habitat: Option<&str>, cover: Option<f64>) -> HabitatChoice {
    let text = habitat.unwrap_or("").to_lowercase();
    let shown = habitat.map_or("none given".to_string(), |h| format!("\"{}\"", h.trim()));
    if mentions(&text, &["reef flat", "reef-flat", "flat"]) {
        return HabitatChoice {
            relationship: id_of(ReefKind::ReefFlat),
            reason: format!(
                "the site's habitat ({shown}) is a reef flat, and Shaw et al. measured net \
                 calcification on the One Tree Island reef flat"
            ),
        };
    }
    let sandy = mentions(
        &text,
        &["lagoon", "back reef", "back-reef", "backreef", "sand"],
    );
    match (sandy, cover) {
        (true, Some(_)) => HabitatChoice {
            relationship: id_of(ReefKind::CoralAndSediment),
            reason: format!(
                "the site's habitat ({shown}) has a sandy bottom; Eyre et al. (2018) measured \
                 the dissolution of reef sediments, weighted here against the site's own coral \
                 cover"
            ),
        },
        (true, None) => HabitatChoice {
            relationship: id_of(ReefKind::Sediment),
            reason: format!(
                "the site's habitat ({shown}) has a sandy bottom and the site gives no coral \
                 cover; Eyre et al. (2018) measured the net calcification of reef sediments"
            ),
        },
        (false, Some(_)) => HabitatChoice {
            relationship: id_of(ReefKind::CoralAndSediment),
            reason: format!(
                "no relationship in the table was measured on this habitat ({shown}); the \
                 coral-and-sediment relationship of Eyre et al. (2018) uses the site's own \
                 coral cover"
            ),
        },
        (false, None) => HabitatChoice {
            relationship: id_of(ReefKind::GlobalAverage),
            reason: format!(
                "no relationship in the table was measured on this habitat ({shown}) and the \
                 site gives no coral cover; the global-average reef of Eyre et al. (2018) is \
                 the least specific choice"
            ),
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn habitat_words_pick_a_row_and_say_why() {
        let c = closest_to_habitat(Some("Inner reef flat"), Some(0.2));
        assert_eq!(c.relationship, "shaw_onetree");
        assert!(c.reason.contains("\"Inner reef flat\""), "{}", c.reason);
        assert_eq!(
            closest_to_habitat(Some("Back-reef lagoon"), Some(0.3)).relationship,
            "eyre2018_community"
        );
        assert_eq!(
            closest_to_habitat(Some("sand apron"), None).relationship,
            "eyre2018_sediment"
        );
        assert_eq!(
            closest_to_habitat(Some("Fore-reef slope"), Some(0.4)).relationship,
            "eyre2018_community"
        );
        let c = closest_to_habitat(None, None);
        assert_eq!(c.relationship, "eyre2018_global");
        assert!(c.reason.contains("none given"));
    }
}
