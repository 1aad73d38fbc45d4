//! Order statistics of the ensemble.

use super::super::QUANTILE_LEVELS;

/// Quantile of sorted finite values by linear interpolation between order statistics
/// (Hyndman & Fan 1996 type 7, the default of R and NumPy). `p` in [0, 1]; NaN for an empty
/// slice.
pub fn quantile_sorted(sorted: &[f64], p: f64) -> f64 {
    let n = sorted.len();
    if n == 0 {
        return f64::NAN;
    }
    let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(n - 1);
    let (a, b) = match (sorted.get(lo), sorted.get(hi)) {
        (Some(a), Some(b)) => (*a, *b),
        _ => return f64::NAN,
    };
    a + (h - lo as f64) * (b - a)
}

/// The five reported quantiles of the finite values in `values` (reordered in place), equal
/// to [`quantile_sorted`] on the sorted values. Uses repeated selection instead of a full
/// sort: levels are taken from the highest down, each selection working only on the part
/// left of the previous one, so the cost is a few passes over the data.
pub fn five_quantiles(values: &mut Vec<f64>) -> [f64; 5] {
    values.retain(|v| v.is_finite());
    let n = values.len();
    let mut out = [f64::NAN; 5];
    if n == 0 {
        return out;
    }
    // Invariant: every value in values[..end] is <= every value in values[end..].
    let mut end = n;
    for (slot, level) in out.iter_mut().zip(QUANTILE_LEVELS).rev() {
        let h = (n - 1) as f64 * f64::from(level) / 100.0;
        let lo = (h.floor() as usize).min(n - 1);
        if lo < end {
            if let Some(part) = values.get_mut(..end) {
                part.select_nth_unstable_by(lo, f64::total_cmp);
            }
            end = lo;
        }
        let a = values.get(lo).copied().unwrap_or(f64::NAN);
        let frac = h - lo as f64;
        *slot = if frac > 0.0 {
            // The next order statistic is the smallest value right of `lo`.
            let b = values
                .get(lo + 1..)
                .unwrap_or(&[])
                .iter()
                .copied()
                .fold(f64::INFINITY, f64::min);
            if b.is_finite() { a + frac * (b - a) } else { a }
        } else {
            a
        };
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Outside check: NumPy's documentation example, `np.percentile([[10, 7, 4], [3, 2, 1]], 50)`
    /// is 3.5 (linear interpolation, NumPy's default).
    #[test]
    fn quantile_matches_numpy_documentation_example() {
        let mut v = vec![10.0, 7.0, 4.0, 3.0, 2.0, 1.0];
        v.sort_by(f64::total_cmp);
        assert_eq!(quantile_sorted(&v, 0.5), 3.5);
        assert_eq!(quantile_sorted(&v, 0.0), 1.0);
        assert_eq!(quantile_sorted(&v, 1.0), 10.0);
        assert!(quantile_sorted(&[], 0.5).is_nan());
        assert_eq!(quantile_sorted(&[2.0], 0.95), 2.0);
    }

    mod props {
        use super::super::*;
        use proptest::prelude::*;

        proptest! {
            /// Selection-based quantiles equal those of the fully sorted values.
            #[test]
            fn five_quantiles_equal_sorted_quantiles(
                mut v in proptest::collection::vec(-1e3f64..1e3, 0..300),
                nans in 0usize..3
            ) {
                let mut sorted = v.clone();
                sorted.sort_by(f64::total_cmp);
                v.extend(std::iter::repeat_n(f64::NAN, nans));
                let got = five_quantiles(&mut v);
                for (g, l) in got.iter().zip(QUANTILE_LEVELS) {
                    let e = quantile_sorted(&sorted, f64::from(l) / 100.0);
                    prop_assert!((g.is_nan() && e.is_nan()) || (g - e).abs() <= 1e-9 * (1.0 + e.abs()));
                }
            }
        }
    }
}
