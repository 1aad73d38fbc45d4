//! Number formatting for the report. Every number the reader sees is formatted here, once, so
//! that tables, the first page and the appendix agree, and tests can format expected values the
//! same way.
//!
//! Negative numbers use the typographic minus sign (U+2212); a missing or non-finite value is
//! shown as an en dash.

/// Shown for a missing or non-finite value.
pub const MISSING: &str = "–";

/// A number with a fixed count of decimals; U+2212 for negatives; `–` when not finite.
pub fn number(x: f64, decimals: usize) -> String {
    // Digits and rounding from `numfmt` (a rounded zero has no sign there).
    let Some(s) = crate::numfmt::fixed(x, decimals) else {
        return MISSING.to_string();
    };
    match s.strip_prefix('-') {
        Some(rest) => format!("\u{2212}{rest}"),
        None => s,
    }
}

/// Like [`number`] but with an explicit `+` for positive values (changes, differences).
pub fn signed(x: f64, decimals: usize) -> String {
    let s = number(x, decimals);
    if x.is_finite() && !s.starts_with('\u{2212}') && s.bytes().any(|b| (b'1'..=b'9').contains(&b))
    {
        format!("+{s}")
    } else {
        s
    }
}

/// An optional number.
pub fn opt(x: Option<f64>, decimals: usize) -> String {
    x.map_or_else(|| MISSING.to_string(), |v| number(v, decimals))
}

/// Ω_ar and Ω_ca: two decimals.
pub fn omega(x: f64) -> String {
    number(x, 2)
}

/// pH (total scale): three decimals.
pub fn ph(x: f64) -> String {
    number(x, 3)
}

/// Temperature, °C: one decimal.
pub fn temp(x: f64) -> String {
    number(x, 1)
}

/// Salinity: two decimals.
pub fn salinity(x: f64) -> String {
    number(x, 2)
}

/// TA, DIC (µmol/kg) and pCO2 (µatm): whole numbers.
pub fn micro(x: f64) -> String {
    number(x, 0)
}

/// Degree Heating Weeks, °C-weeks: one decimal.
pub fn dhw(x: f64) -> String {
    number(x, 1)
}

/// The maximum monthly mean, °C: two decimals (as a stated climatology value is given).
pub fn mmm(x: f64) -> String {
    number(x, 2)
}

/// Pressure, dbar: one decimal.
pub fn pressure(x: f64) -> String {
    number(x, 1)
}

/// A threshold level as written in the classes (e.g. "3.5").
pub fn level(x: f64) -> String {
    number(x, 1)
}

/// Calcification: percent change, signed whole numbers; kg CaCO3 m⁻² yr⁻¹, two decimals.
pub fn calc(x: f64, unit: super::model::CalcUnit) -> String {
    match unit {
        super::model::CalcUnit::PercentChange => signed(x, 0),
        super::model::CalcUnit::KgCaco3PerM2Year => number(x, 2),
        super::model::CalcUnit::MmolCaco3PerM2Day => number(x, 1),
    }
}

/// The Ω_ar range of threshold class `k` (0 = highest): "≥ 4.0", "3.5–4.0", "< 3.0".
pub fn class_range_text(classes: &super::model::ThresholdClasses, k: usize) -> String {
    let n = classes.levels.len();
    if n == 0 {
        return String::new();
    }
    if k == 0 {
        format!("≥ {}", level(classes.levels[0]))
    } else if k >= n {
        format!("< {}", level(classes.levels[n - 1]))
    } else {
        format!(
            "{}–{}",
            level(classes.levels[k]),
            level(classes.levels[k - 1])
        )
    }
}

/// A range of two already formatted values: "a–b", or "a to b" when either carries a sign
/// (an en dash between signed numbers would read as a minus).
pub fn range(a: &str, b: &str) -> String {
    let signed = |s: &str| s.starts_with(['\u{2212}', '+', '-']);
    if signed(a) || signed(b) {
        format!("{a} to {b}")
    } else {
        format!("{a}–{b}")
    }
}

/// Latitude or longitude in degrees with hemisphere, e.g. "17.25° S".
pub fn coordinate(x: f64, positive: char, negative: char) -> String {
    if !x.is_finite() {
        return MISSING.to_string();
    }
    let hemi = if x < 0.0 { negative } else { positive };
    format!("{:.3}° {hemi}", x.abs())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn formats_fixed_decimals_with_true_minus() {
        assert_eq!(omega(3.456), "3.46");
        assert_eq!(ph(8.0), "8.000");
        assert_eq!(number(-1.25, 1), "\u{2212}1.2"); // round-half-even of the binary value
        assert_eq!(number(-0.001, 2), "0.00");
        assert_eq!(number(f64::NAN, 2), "–");
        assert_eq!(signed(12.4, 0), "+12");
        assert_eq!(signed(-12.6, 0), "\u{2212}13");
        assert_eq!(signed(0.2, 0), "0");
        assert_eq!(coordinate(-17.25, 'N', 'S'), "17.250° S");
        assert_eq!(opt(None, 2), "–");
        assert_eq!(range("3.10", "3.90"), "3.10–3.90");
        assert_eq!(range(&signed(-4.0, 0), &signed(4.0, 0)), "\u{2212}4 to +4");
    }

    #[test]
    fn class_ranges_name_both_ends_of_each_class() {
        // Levels 4.0 > 3.5 > 3.0 make four classes: above the first level, between each pair
        // of neighbours and below the last.
        let classes = crate::report::model::ThresholdClasses {
            levels: vec![4.0, 3.5, 3.0],
            labels: vec![String::new(); 4],
            citation: String::new(),
            checked: true,
        };
        let texts: Vec<String> = (0..4).map(|k| class_range_text(&classes, k)).collect();
        assert_eq!(texts, ["≥ 4.0", "3.5–4.0", "3.0–3.5", "< 3.0"]);
    }

    proptest! {
        #[test]
        fn number_round_trips_within_half_a_unit(x in -1.0e6f64..1.0e6, d in 0usize..4) {
            let s = number(x, d).replace('\u{2212}', "-");
            let back: f64 = s.parse().unwrap();
            prop_assert!((back - x).abs() <= 0.5 * 10f64.powi(-(d as i32)) + 1e-9);
        }

        #[test]
        fn never_panics_on_any_float(bits in any::<u64>(), d in 0usize..6) {
            let x = f64::from_bits(bits);
            let _ = number(x, d);
            let _ = signed(x, d);
            let _ = coordinate(x, 'E', 'W');
        }
    }
}
