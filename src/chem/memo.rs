//! A bounded cache of constant sets by conditions: for loops that meet the same conditions
//! again and again (every reef record of a season measured against the same few source-water
//! states, in every computed year). A hit returns the very [`Constants`] that
//! [`Constants::new`] gave for bit-identical conditions, so results do not depend on it.

use std::collections::HashMap;

use super::{Conditions, Constants, MethodSet};

/// Entries kept before the cache starts over (bounded memory: about 200 bytes each).
const CAPACITY: usize = 4096;

/// Constants by the exact bits of their conditions, for one constant set.
pub struct ConstantsMemo {
    methods: MethodSet,
    map: HashMap<[u64; 5], Constants>,
}

impl ConstantsMemo {
    /// An empty cache for the constant set `methods`.
    pub fn new(methods: &MethodSet) -> ConstantsMemo {
        ConstantsMemo {
            methods: *methods,
            map: HashMap::new(),
        }
    }

    /// The constants at `c`: from the cache, or worked out and kept.
    pub fn get(&mut self, c: &Conditions) -> Constants {
        let key = [
            c.temp_c.to_bits(),
            c.salinity.to_bits(),
            c.pressure_dbar.to_bits(),
            c.silicate.to_bits(),
            c.phosphate.to_bits(),
        ];
        if let Some(k) = self.map.get(&key) {
            return *k;
        }
        if self.map.len() >= CAPACITY {
            self.map.clear();
        }
        let k = Constants::new(c, &self.methods);
        self.map.insert(key, k);
        k
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Hits and misses give what a direct evaluation gives, bit for bit, also after the cache
    /// has started over.
    #[test]
    fn cached_constants_equal_direct_ones() {
        let methods = MethodSet::default();
        let mut memo = ConstantsMemo::new(&methods);
        for round in 0..3 {
            for i in 0..(CAPACITY + 10) {
                let c = Conditions {
                    temp_c: 20.0 + (i % 97) as f64 * 0.1,
                    salinity: 34.0 + (i % 13) as f64 * 0.1,
                    pressure_dbar: (i % 7) as f64,
                    silicate: 2.0,
                    phosphate: 0.2 * (round as f64),
                };
                assert_eq!(memo.get(&c), Constants::new(&c, &methods));
            }
        }
    }
}
