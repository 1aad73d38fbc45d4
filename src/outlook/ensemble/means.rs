//! Bootstrap-weighted means of the station-day values: the inner loop of every member.
//!
//! A member's mean state in each computed year is the mean of the group's station-day
//! values weighted by how often its bootstrap draw picked each station-day. That is
//! members × station-days × years × quantities multiply-adds per task, the largest single
//! cost of a long sensor series. [`StationDays`] keeps each station-day's years in one row
//! and knows which rows are entirely finite, so that the common case is a branch-free
//! multiply-add the compiler vectorises; rows with a missing value take the careful path.
//! Both paths add in station-day order, so the result is the same, bit for bit, as a
//! year-by-year mean ([`weighted_mean`]).

use super::central::{NQ, Values};

/// Mean of `vals` over units with multiplicities `counts`, quantity by quantity over the
/// finite values (NaN where no unit has a finite value).
pub(super) fn weighted_mean<'v>(
    counts: &[u32],
    vals: impl Fn(usize) -> Option<&'v Values>,
) -> Values {
    let mut sum = [0.0; NQ];
    let mut n = [0.0; NQ];
    for (u, &c) in counts.iter().enumerate() {
        if c == 0 {
            continue;
        }
        let Some(v) = vals(u) else { continue };
        for i in 0..NQ {
            if v[i].is_finite() {
                sum[i] += f64::from(c) * v[i];
                n[i] += f64::from(c);
            }
        }
    }
    std::array::from_fn(|i| if n[i] > 0.0 { sum[i] / n[i] } else { f64::NAN })
}

/// One variant's station-day values: `values[unit * years + k]`, and for each unit whether
/// all its values are finite.
pub(super) struct StationDays {
    values: Vec<Values>,
    years: usize,
    finite: Vec<bool>,
}

impl StationDays {
    /// `values[unit * years + k]` for `years` computed years.
    pub(super) fn new(values: Vec<Values>, years: usize) -> StationDays {
        let finite = if years == 0 {
            Vec::new()
        } else {
            values
                .chunks(years)
                .map(|row| row.iter().flatten().all(|x| x.is_finite()))
                .collect()
        };
        StationDays {
            values,
            years,
            finite,
        }
    }

    /// The weighted mean in every computed year, written to `out` (`years` entries): the
    /// same as [`weighted_mean`] of each year's values.
    pub(super) fn means(&self, counts: &[u32], sum: &mut Vec<Values>, out: &mut Vec<Values>) {
        let nk = self.years;
        sum.clear();
        sum.resize(nk, [0.0; NQ]);
        // Counts of the units whose values are all finite (one number for every cell), and
        // of the finite values of the other units, cell by cell; whole numbers, so adding
        // them in two parts is exact.
        let mut n_all = 0.0;
        let mut n_part = vec![[0.0; NQ]; 0];
        for (u, &c) in counts.iter().enumerate() {
            if c == 0 {
                continue;
            }
            let Some(row) = self.values.get(u * nk..(u + 1) * nk) else {
                continue;
            };
            let c = f64::from(c);
            if self.finite.get(u).copied().unwrap_or(false) {
                for (s, v) in sum.iter_mut().zip(row) {
                    for i in 0..NQ {
                        s[i] += c * v[i];
                    }
                }
                n_all += c;
            } else {
                if n_part.is_empty() {
                    n_part.resize(nk, [0.0; NQ]);
                }
                for ((s, n), v) in sum.iter_mut().zip(n_part.iter_mut()).zip(row) {
                    for i in 0..NQ {
                        if v[i].is_finite() {
                            s[i] += c * v[i];
                            n[i] += c;
                        }
                    }
                }
            }
        }
        out.clear();
        out.extend(sum.iter().enumerate().map(|(k, s)| {
            std::array::from_fn(|i| {
                let n = n_all + n_part.get(k).map_or(0.0, |n| n[i]);
                if n > 0.0 { s[i] / n } else { f64::NAN }
            })
        }));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Station-day values with a NaN in one unit, and counts with zeros: every year's mean
    /// equals the year-by-year mean bit for bit, and a hand-worked cell.
    #[test]
    fn means_equal_the_year_by_year_mean() {
        let (units, years) = (7, 5);
        let mut values: Vec<Values> = (0..units * years)
            .map(|j| std::array::from_fn(|i| ((j * 31 + i * 7) % 13) as f64 * 0.37 + 1.0 / 3.0))
            .collect();
        values[2 * years + 3][4] = f64::NAN; // unit 2, year 3, quantity 4
        let counts = [2u32, 0, 1, 3, 0, 1, 1];
        let days = StationDays::new(values.clone(), years);
        let (mut sum, mut out) = (Vec::new(), Vec::new());
        days.means(&counts, &mut sum, &mut out);
        assert_eq!(out.len(), years);
        for (k, got) in out.iter().enumerate() {
            let direct = weighted_mean(&counts, |u| values.get(u * years + k));
            for i in 0..NQ {
                assert_eq!(
                    got[i].to_bits(),
                    direct[i].to_bits(),
                    "year {k}, quantity {i}"
                );
            }
        }
        // Year 3, quantity 4 leaves unit 2 out: (2·v0 + 3·v3 + v5 + v6) / 7, worked here.
        let v = |u: usize| values[u * years + 3][4];
        let hand = (2.0 * v(0) + 3.0 * v(3) + v(5) + v(6)) / 7.0;
        assert!((out[3][4] - hand).abs() < 1e-12);
        // A cell no counted unit has a finite value for is NaN.
        let only_two = [0u32, 0, 4, 0, 0, 0, 0];
        days.means(&only_two, &mut sum, &mut out);
        assert!(out[3][4].is_nan());
        assert!(out[3][3].is_finite());
    }
}
