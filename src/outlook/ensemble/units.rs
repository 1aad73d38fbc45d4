//! Sampling units of a season and the bootstrap of the season's mean.
//!
//! A season's mean is time-weighted: every station-day ([`SamplingUnit`]) counts once, and
//! the records inside a station-day count equally, so an hourly sensor series does not
//! outweigh bottles taken once a day. The uncertainty of that mean from sampling is estimated
//! by resampling the station-days with replacement (the bootstrap of a mean; Efron &
//! Tibshirani 1993, *An Introduction to the Bootstrap*, ch. 6). Days of a continuous sensor
//! series are autocorrelated, so for them consecutive station-days are drawn in blocks (the
//! moving-block bootstrap of Künsch 1989, Ann. Stat. 17:1217) of length round(n^(1/3)), the
//! order of block length usual for variance estimation (common practice).

use std::collections::BTreeMap;

use super::super::projection::{ProjectionRecord, SamplingUnit};
use super::super::rng::Xoshiro256;

/// The station-days of one group.
#[derive(Clone, Debug)]
pub(super) struct Units {
    /// Per unit, in time order within each station: positions in the group's record list.
    pub records: Vec<Vec<usize>>,
    /// Block length of the bootstrap (1 unless the units come from a continuous series).
    pub block: usize,
}

/// Sort key of a record's unit: its station-day, or the record itself when it has none.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum Key {
    Day(u32, i32),
    Own(usize),
}

impl Units {
    /// The units of the records `group` (indices into `all`).
    pub fn of(all: &[ProjectionRecord], group: &[usize]) -> Units {
        let mut by_key: BTreeMap<Key, Vec<usize>> = BTreeMap::new();
        let mut continuous = 0usize;
        for (local, &ri) in group.iter().enumerate() {
            let key = match all.get(ri).and_then(|r| r.unit) {
                Some(SamplingUnit {
                    station,
                    day,
                    continuous: c,
                    ..
                }) => {
                    continuous += usize::from(c);
                    Key::Day(station, day)
                }
                None => Key::Own(ri),
            };
            by_key.entry(key).or_default().push(local);
        }
        let records: Vec<Vec<usize>> = by_key.into_values().collect();
        // Blocks when most records come from a continuous series.
        let block = if 2 * continuous > group.len() {
            block_length(records.len())
        } else {
            1
        };
        Units { records, block }
    }

    pub fn len(&self) -> usize {
        self.records.len()
    }

    /// Weight of each record (by position in the group) in the time-weighted mean:
    /// 1 / (units × records in its unit). The weights sum to one.
    pub fn record_weights(&self, n_records: usize) -> Vec<f64> {
        let mut w = vec![0.0; n_records];
        let nu = self.records.len() as f64;
        for unit in &self.records {
            let each = 1.0 / (nu * unit.len() as f64);
            for &l in unit {
                if let Some(x) = w.get_mut(l) {
                    *x = each;
                }
            }
        }
        w
    }

    /// How often each unit is drawn in one bootstrap resample of as many units as there
    /// are (blocks of [`Units::block`] consecutive units, each block start uniform).
    pub fn draw_counts(&self, rng: &mut Xoshiro256, counts: &mut Vec<u32>) {
        let n = self.records.len();
        counts.clear();
        counts.resize(n, 0);
        if n == 0 {
            return;
        }
        let b = self.block.clamp(1, n);
        let starts = n - b + 1;
        let mut drawn = 0usize;
        while drawn < n {
            let s = rng.below(starts);
            for u in s..(s + b).min(s + n - drawn) {
                if let Some(c) = counts.get_mut(u) {
                    *c += 1;
                }
            }
            drawn += b.min(n - drawn);
        }
    }
}

/// Block length for `n` units of a continuous series: round(n^(1/3)), at least 1.
pub(super) fn block_length(n: usize) -> usize {
    ((n as f64).cbrt().round() as usize).max(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn record(station: u32, day: i32, continuous: bool) -> ProjectionRecord {
        ProjectionRecord {
            label: String::new(),
            season: 0,
            sample_year: 2024,
            temp_c: 27.0,
            salinity: 35.0,
            pressure_dbar: 1.0,
            silicate: 0.0,
            phosphate: 0.0,
            ta: 2300.0,
            pco2: 400.0,
            measured: None,
            unit: Some(SamplingUnit {
                station,
                day,
                continuous,
                minute: None,
            }),
            source: None,
        }
    }

    /// Worked arithmetic: three bottles on day 1 at station 0, one on day 2, and 24 hourly
    /// readings on day 1 at station 1 make three units of weight 1/3 each; inside them each
    /// record weighs 1/9, 1/3 and 1/72.
    #[test]
    fn station_days_weigh_equally() {
        let mut all: Vec<ProjectionRecord> = (0..3).map(|_| record(0, 1, false)).collect();
        all.push(record(0, 2, false));
        all.extend((0..24).map(|_| record(1, 1, true)));
        let group: Vec<usize> = (0..all.len()).collect();
        let u = Units::of(&all, &group);
        assert_eq!(u.len(), 3);
        let w = u.record_weights(group.len());
        assert!((w[0] - 1.0 / 9.0).abs() < 1e-15);
        assert!((w[3] - 1.0 / 3.0).abs() < 1e-15);
        assert!((w[10] - 1.0 / 72.0).abs() < 1e-15);
        assert!((w.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        // Most records are continuous, but 3 units give a block of round(3^(1/3)) = 1.
        assert_eq!(u.block, 1);
    }

    /// Worked arithmetic: 365 days of a sensor series take blocks of round(365^(1/3)) = 7
    /// (7.14); a resample always holds as many units as there are.
    #[test]
    fn sensor_days_are_drawn_in_blocks() {
        let all: Vec<ProjectionRecord> = (0..365).map(|d| record(0, d, true)).collect();
        let group: Vec<usize> = (0..all.len()).collect();
        let u = Units::of(&all, &group);
        assert_eq!(u.block, 7);
        let mut rng = Xoshiro256::seed_from_u64(7);
        let mut counts = Vec::new();
        for _ in 0..50 {
            u.draw_counts(&mut rng, &mut counts);
            assert_eq!(counts.iter().map(|&c| c as usize).sum::<usize>(), 365);
        }
    }
}
