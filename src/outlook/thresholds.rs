//! Omega_ar habitat classes and threshold crossings.

use std::fmt;

/// One habitat class: its name and its lower bound on Omega_ar (`None` for the lowest class).
#[derive(Clone, Debug, PartialEq)]
pub struct Band {
    /// Class name, e.g. "adequate".
    pub name: String,
    /// Lowest Omega_ar of the class (inclusive); `None` for the open lowest class.
    pub min_omega_ar: Option<f64>,
}

/// A set of habitat classes, ordered from the highest Omega_ar to the lowest.
#[derive(Clone, Debug, PartialEq)]
pub struct HabitatClasses {
    /// The classes, high to low; only the last one has no lower bound.
    pub bands: Vec<Band>,
    /// Where the classes come from.
    pub source: String,
    /// Whether the class limits were checked against `source` (a site's own classes are
    /// taken as checked by whoever wrote them into the site file with their source). Limits
    /// that were not are kept out of every shading and labelling rule of the report.
    pub checked: bool,
}

/// Reef habitat classes on Omega_ar of Guinotte, Buddemeier & Kleypas (2003), "Future coral
/// reef habitat marginality: temporal and spatial effects of climate change in the Pacific
/// basin", Coral Reefs 22:551–558: > 4.0 optimal, 3.5–4.0 adequate, 3.0–3.5 marginal, < 3.0
/// extremely marginal. Status M (from memory, medium confidence; fact sheet §4: widely
/// reproduced, paper text not seen; a search of the stored public text found only secondary
/// pages quoting "below 3.0 extremely marginal", not the paper's table), so `checked` is false.
/// Scope: open-water surface Omega_ar, tropical reefs.
pub fn guinotte_2003() -> HabitatClasses {
    let b = |name: &str, min: Option<f64>| Band {
        name: name.to_string(),
        min_omega_ar: min,
    };
    HabitatClasses {
        bands: vec![
            b("optimal", Some(4.0)),
            b("adequate", Some(3.5)),
            b("marginal", Some(3.0)),
            b("extremely marginal", None),
        ],
        source: "Guinotte, Buddemeier & Kleypas (2003), Coral Reefs 22:551-558".to_string(),
        checked: false,
    }
}

/// Classes that do not form a valid set.
#[derive(Clone, Debug, PartialEq)]
pub struct ThresholdError(pub String);

impl fmt::Display for ThresholdError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "habitat thresholds: {}", self.0)
    }
}

impl std::error::Error for ThresholdError {}

impl HabitatClasses {
    /// User classes from (name, lower bound) pairs, high to low, plus the name of the open
    /// lowest class. Checks: at least one bound, non-empty distinct names, bounds finite,
    /// within 0–10 and strictly decreasing.
    pub fn user(
        bounded: &[(String, f64)],
        lowest_name: &str,
        source: &str,
    ) -> Result<HabitatClasses, ThresholdError> {
        if bounded.is_empty() {
            return Err(ThresholdError(
                "at least one threshold is needed".to_string(),
            ));
        }
        let mut bands = Vec::with_capacity(bounded.len() + 1);
        let mut names: Vec<&str> = Vec::new();
        for (i, (name, v)) in bounded.iter().enumerate() {
            let name_t = name.trim();
            if name_t.is_empty() {
                return Err(ThresholdError(format!(
                    "threshold {} has an empty name",
                    i + 1
                )));
            }
            if !v.is_finite() || *v <= 0.0 || *v > 10.0 {
                return Err(ThresholdError(format!(
                    "\"{name_t}\": Omega_ar {v} is outside 0-10"
                )));
            }
            if let Some(prev) = i.checked_sub(1).and_then(|j| bounded.get(j))
                && *v >= prev.1
            {
                return Err(ThresholdError(format!(
                    "thresholds must decrease: \"{name_t}\" ({v}) follows \"{}\" ({})",
                    prev.0.trim(),
                    prev.1
                )));
            }
            if names.contains(&name_t) {
                return Err(ThresholdError(format!(
                    "class name \"{name_t}\" is used twice"
                )));
            }
            names.push(name_t);
            bands.push(Band {
                name: name_t.to_string(),
                min_omega_ar: Some(*v),
            });
        }
        let low = lowest_name.trim();
        if low.is_empty() || names.contains(&low) {
            return Err(ThresholdError(format!(
                "the lowest class needs its own non-empty name (got \"{low}\")"
            )));
        }
        bands.push(Band {
            name: low.to_string(),
            min_omega_ar: None,
        });
        Ok(HabitatClasses {
            bands,
            source: source.to_string(),
            checked: true,
        })
    }

    /// The class of an Omega_ar value (NaN: the lowest class).
    pub fn classify(&self, omega_ar: f64) -> &str {
        for b in &self.bands {
            match b.min_omega_ar {
                Some(m) if omega_ar >= m => return &b.name,
                Some(_) => continue,
                None => return &b.name,
            }
        }
        self.bands.last().map(|b| b.name.as_str()).unwrap_or("")
    }

    /// The thresholds (lower bounds) with the name of the class each one leaves.
    pub fn thresholds(&self) -> Vec<(String, f64)> {
        self.bands
            .iter()
            .filter_map(|b| b.min_omega_ar.map(|m| (b.name.clone(), m)))
            .collect()
    }
}

/// The first year whose value lies strictly below `threshold` (`None`: never within the
/// series). `years` and `values` have equal length; NaN values are skipped.
pub fn first_year_below(years: &[i32], values: &[f64], threshold: f64) -> Option<i32> {
    years
        .iter()
        .zip(values)
        .find(|(_, v)| !v.is_nan() && **v < threshold)
        .map(|(y, _)| *y)
}

/// The first year whose value is at or below `level` (used for net calcification reaching 0).
pub fn first_year_at_or_below(years: &[i32], values: &[f64], level: f64) -> Option<i32> {
    years
        .iter()
        .zip(values)
        .find(|(_, v)| !v.is_nan() && **v <= level)
        .map(|(y, _)| *y)
}

/// Fraction (0–1) of the finite values below `threshold` (NaN when there are none).
pub fn fraction_below(values: &[f64], threshold: f64) -> f64 {
    let (mut n, mut below) = (0usize, 0usize);
    for v in values.iter().filter(|v| v.is_finite()) {
        n += 1;
        if *v < threshold {
            below += 1;
        }
    }
    if n == 0 {
        f64::NAN
    } else {
        below as f64 / n as f64
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Guinotte et al. (2003) classes (from memory): > 4.0 optimal, 3.5–4.0 adequate,
    /// 3.0–3.5 marginal, < 3.0 extremely marginal.
    #[test]
    fn guinotte_classes() {
        let c = guinotte_2003();
        assert_eq!(c.classify(4.2), "optimal");
        assert_eq!(c.classify(3.8), "adequate");
        assert_eq!(c.classify(3.2), "marginal");
        assert_eq!(c.classify(2.5), "extremely marginal");
        assert_eq!(c.classify(f64::NAN), "extremely marginal");
        let t = c.thresholds();
        assert_eq!(t.len(), 3);
        assert_eq!(t[1], ("adequate".to_string(), 3.5));
    }

    #[test]
    fn user_classes_validate() {
        let ok = HabitatClasses::user(
            &[("good".into(), 3.3), ("poor".into(), 2.5)],
            "very poor",
            "site file",
        )
        .unwrap();
        assert_eq!(ok.classify(2.7), "poor");
        let e = HabitatClasses::user(&[("a".into(), 3.0), ("b".into(), 3.5)], "c", "x")
            .unwrap_err()
            .to_string();
        assert!(e.contains("must decrease"), "{e}");
        assert!(HabitatClasses::user(&[], "c", "x").is_err());
        assert!(HabitatClasses::user(&[("a".into(), -1.0)], "c", "x").is_err());
        assert!(HabitatClasses::user(&[("a".into(), 3.0)], "a", "x").is_err());
    }

    #[test]
    fn crossing_years_and_probabilities() {
        let years = [2024, 2030, 2040, 2050];
        let v = [3.9, 3.6, 3.4, 3.1];
        assert_eq!(first_year_below(&years, &v, 3.5), Some(2040));
        assert_eq!(first_year_below(&years, &v, 3.0), None);
        assert_eq!(first_year_below(&years, &v, 4.0), Some(2024));
        assert_eq!(
            first_year_at_or_below(&years, &[1.0, 0.5, 0.0, -0.1], 0.0),
            Some(2040)
        );
        assert_eq!(fraction_below(&[1.0, 2.0, 3.0, f64::NAN], 2.5), 2.0 / 3.0);
        assert!(fraction_below(&[f64::NAN], 2.5).is_nan());
    }
}
