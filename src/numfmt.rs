//! Fixed-decimal formatting of numbers for every output of the program (a leaf utility: it
//! imports no stage).
//!
//! # The rounding rule
//!
//! A value is written with exactly `decimals` digits after the point, **correctly rounded
//! from its exact binary value**: the printed digits are the decimal with that many digits
//! nearest to the number the `f64` actually holds. When the binary value lies exactly half
//! way (possible only for values with a short binary fraction, such as 0.125 or 2.5), the
//! last digit is made even (0.125 → "0.12", 0.375 → "0.38", 2.5 → "2"). This is the rule of
//! Rust's `format!("{:.N}")`, C's `printf("%.Nf")` and Python's `"%.Nf"`, so a table
//! written here and one written by those tools from the same numbers agree digit for digit.
//! A result that rounds to zero is written without a sign ("0.00", never "-0.00").
//!
//! # Speed
//!
//! `format!` finds the digits by exact big-number arithmetic, which dominated the run time
//! of `solve` on large files. [`push_fixed`] scales by 10^decimals and rounds the product in
//! floating point, which gives the same digits except when the product lies within a few
//! units in the last place of a half; those rare values (and very large ones) take the
//! exact path. The test module checks the two paths against `format!`.

/// Powers of ten that are exact in `f64` (10^0 … 10^15).
const POW10: [f64; 16] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
];
const POW10_U64: [u64; 16] = [
    1,
    10,
    100,
    1_000,
    10_000,
    100_000,
    1_000_000,
    10_000_000,
    100_000_000,
    1_000_000_000,
    10_000_000_000,
    100_000_000_000,
    1_000_000_000_000,
    10_000_000_000_000,
    100_000_000_000_000,
    1_000_000_000_000_000,
];

/// Largest scaled magnitude taken by the fast path: below 2^52 the fraction of the scaled
/// value is exact and the digits fit a u64.
const FAST_LIMIT: f64 = 4_503_599_627_370_496.0; // 2^52

/// Append `v` with exactly `decimals` decimals (see the module doc for the rule). Returns
/// false and appends nothing when `v` is NaN or infinite; the caller chooses how to show a
/// missing value.
pub fn push_fixed(buf: &mut String, v: f64, decimals: usize) -> bool {
    if !v.is_finite() {
        return false;
    }
    if let (Some(&scale), Some(&unit)) = (POW10.get(decimals), POW10_U64.get(decimals)) {
        let p = (v * scale).abs();
        if p < FAST_LIMIT {
            // Truncation is the floor for 0 ≤ p < 2^52, and exact.
            let floor = p as u64;
            let frac = p - floor as f64; // exact below 2^52
            // The exact product v·10^d differs from p by at most half an ulp of p (10^d is
            // exact); away from a half by more than one ulp both round alike.
            let margin = p * f64::EPSILON + f64::MIN_POSITIVE;
            if (frac - 0.5).abs() > margin {
                let n = floor + u64::from(frac > 0.5);
                push_scaled(buf, n, decimals, unit, v < 0.0 && n != 0);
                return true;
            }
        }
    }
    let s = format!("{v:.decimals$}");
    match s.strip_prefix('-') {
        Some(rest) if rest.bytes().all(|b| b == b'0' || b == b'.') => buf.push_str(rest),
        _ => buf.push_str(&s),
    }
    true
}

/// `v` with exactly `decimals` decimals, or `None` when `v` is NaN or infinite.
pub fn fixed(v: f64, decimals: usize) -> Option<String> {
    let mut s = String::new();
    push_fixed(&mut s, v, decimals).then_some(s)
}

/// `v` for a sentence: at most six decimals, trailing zeros dropped (`33.044000000000004` →
/// `33.044`, `35.0` → `35`), so values converted or computed by one stage read cleanly where
/// another shows them. NaN and infinities print as Rust writes them.
pub fn tidy(v: f64) -> String {
    match fixed(v, 6) {
        Some(s) if s.contains('.') => {
            let t = s.trim_end_matches('0').trim_end_matches('.');
            if t == "-0" {
                "0".to_string()
            } else {
                t.to_string()
            }
        }
        Some(s) => s,
        None => v.to_string(),
    }
}

/// Append `n / 10^decimals` (`unit` = 10^decimals) with exactly `decimals` decimals, and a
/// minus sign first when `negative`: the digits are made in a small array and appended at
/// once.
fn push_scaled(buf: &mut String, n: u64, decimals: usize, unit: u64, negative: bool) {
    // u64 has at most 20 digits; with a sign, a point and leading zeros of a fraction of at
    // most 15 digits, 40 bytes always suffice.
    let mut out = [b'0'; 40];
    let mut pos = out.len();
    let mut put = |d: u8, pos: &mut usize| {
        *pos = pos.saturating_sub(1);
        if let Some(slot) = out.get_mut(*pos) {
            *slot = d;
        }
    };
    let (mut int, mut frac) = (n / unit, n % unit);
    for _ in 0..decimals {
        put(b'0' + (frac % 10) as u8, &mut pos);
        frac /= 10;
    }
    if decimals > 0 {
        put(b'.', &mut pos);
    }
    loop {
        put(b'0' + (int % 10) as u8, &mut pos);
        int /= 10;
        if int == 0 {
            break;
        }
    }
    if negative {
        put(b'-', &mut pos);
    }
    // Only ASCII digits, '.' and '-' were written.
    if let Some(Ok(text)) = out.get(pos..).map(std::str::from_utf8) {
        buf.push_str(text);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Worked: 33.044000000000004 rounds to 33.044000 at six decimals, zeros dropped.
    #[test]
    fn tidy_drops_noise_and_zeros() {
        assert_eq!(tidy(33.044_000_000_000_004), "33.044");
        assert_eq!(tidy(35.0), "35");
        assert_eq!(tidy(-0.000_000_1), "0");
        assert_eq!(tidy(1.123_456_789), "1.123457");
        assert_eq!(tidy(f64::NAN), "NaN");
    }
    use proptest::prelude::*;

    fn f(v: f64, d: usize) -> String {
        fixed(v, d).unwrap_or_default()
    }

    /// Worked by hand: the binary values of 0.125, 0.375 and 2.5 are exact halves (ties go
    /// to the even digit); 1.005 is held as 1.00499999999999989… and 2.675 as
    /// 2.67499999999999982…, so both round down.
    #[test]
    fn worked_examples() {
        assert_eq!(f(0.125, 2), "0.12");
        assert_eq!(f(0.375, 2), "0.38");
        assert_eq!(f(2.5, 0), "2");
        assert_eq!(f(3.5, 0), "4");
        assert_eq!(f(-2.5, 0), "-2");
        assert_eq!(f(1.005, 2), "1.00");
        assert_eq!(f(2.675, 2), "2.67");
        assert_eq!(f(2300.0, 4), "2300.0000");
        assert_eq!(f(8.0402251, 6), "8.040225");
        assert_eq!(f(-1.23456, 2), "-1.23");
        assert_eq!(f(0.000049, 4), "0.0000");
        assert_eq!(f(-0.00001, 2), "0.00");
        assert_eq!(f(-0.0, 3), "0.000");
        assert_eq!(f(7.0, 0), "7");
        assert_eq!(f(0.04, 1), "0.0");
        assert_eq!(f(-1.25, 1), "-1.2");
        assert_eq!(fixed(f64::NAN, 2), None);
        assert_eq!(fixed(f64::NEG_INFINITY, 2), None);
    }

    /// Against the standard library's exact formatter (a separate implementation), with the
    /// negative-zero rule applied to its output.
    fn std_fixed(v: f64, d: usize) -> String {
        let s = format!("{v:.d$}");
        match s.strip_prefix('-') {
            Some(rest) if rest.bytes().all(|b| b == b'0' || b == b'.') => rest.to_string(),
            _ => s,
        }
    }

    #[test]
    fn agrees_with_std_on_a_grid_and_at_near_ties() {
        for i in 0..50_000 {
            let v = -700.0 + f64::from(i) * 0.0731;
            for d in [0, 1, 2, 4, 6] {
                assert_eq!(f(v, d), std_fixed(v, d), "{v} {d}");
                assert_eq!(f(v / 1000.0, d), std_fixed(v / 1000.0, d), "{v} {d}");
            }
        }
        // Values a hair either side of decimal halves, where scaling could misround.
        for base in [0.5, 1.005, 2.675, 1234.56785, 8.0402255, 0.0000005] {
            let mut x = base;
            for _ in 0..8 {
                for d in 0..9 {
                    assert_eq!(f(x, d), std_fixed(x, d), "{x:e} {d}");
                    assert_eq!(f(-x, d), std_fixed(-x, d), "{x:e} {d}");
                }
                x = f64::from_bits(x.to_bits() + 1);
            }
        }
        for v in [1e300, -1e300, 5e-324, 4.5e15, 9.1e15, 123456789012.5] {
            for d in [0, 2, 4, 17, 20] {
                assert_eq!(f(v, d), std_fixed(v, d), "{v:e} {d}");
            }
        }
    }

    proptest! {
        #[test]
        fn agrees_with_std_on_any_finite_value(bits in any::<u64>(), d in 0usize..18) {
            let v = f64::from_bits(bits);
            prop_assume!(v.is_finite());
            prop_assert_eq!(f(v, d), std_fixed(v, d));
        }

        #[test]
        fn agrees_with_std_on_reef_values(v in -1.0e5f64..1.0e5, d in 0usize..8) {
            prop_assert_eq!(f(v, d), std_fixed(v, d));
        }
    }
}
