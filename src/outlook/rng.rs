//! The project's own small pseudo-random number generator, so that an ensemble drawn with a
//! given seed gives the same numbers forever (no dependence on a crate's version).
//!
//! * [`SplitMix64`]: Steele, Lea & Flood (2014), "Fast splittable pseudorandom number
//!   generators", OOPSLA '14; the constants are those of the reference `splitmix64.c` by
//!   S. Vigna. Used only to expand seeds.
//! * [`Xoshiro256`]: xoshiro256** of Blackman & Vigna (2021), "Scrambled linear pseudorandom
//!   number generators", ACM Trans. Math. Softw. 47(4):36.
//! * Normal deviates by the Box–Muller transform (Box & Muller 1958, Ann. Math. Stat. 29:610).
//!
//! Streams are derived from a key (seed, group, member) by hashing, never from thread
//! scheduling, so results do not depend on how many threads run the ensemble.

/// SplitMix64: a 64-bit counter passed through a mixing function.
#[derive(Clone, Debug)]
pub struct SplitMix64 {
    state: u64,
}

impl SplitMix64 {
    /// A generator whose first output is `mix64(seed + 0x9E3779B97F4A7C15)`.
    pub fn new(seed: u64) -> Self {
        SplitMix64 { state: seed }
    }

    /// The next 64-bit output.
    pub fn next_u64(&mut self) -> u64 {
        self.state = self.state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        mix64(self.state)
    }
}

/// The SplitMix64 finaliser (a bijective 64-bit mixing function).
pub fn mix64(mut z: u64) -> u64 {
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// xoshiro256** (Blackman & Vigna), 256 bits of state, period 2^256 − 1.
#[derive(Clone, Debug)]
pub struct Xoshiro256 {
    s: [u64; 4],
    /// The second Box–Muller deviate, kept for the next call of [`Xoshiro256::normal`].
    spare_normal: Option<f64>,
}

impl Xoshiro256 {
    /// A generator started from an explicit state. An all-zero state is replaced by the
    /// SplitMix64 expansion of 0 (the all-zero state is a fixed point of the recurrence).
    pub fn from_state(s: [u64; 4]) -> Self {
        if s == [0; 4] {
            return Self::seed_from_u64(0);
        }
        Xoshiro256 {
            s,
            spare_normal: None,
        }
    }

    /// A generator whose state is four successive SplitMix64 outputs from `seed`, as the
    /// xoshiro authors recommend.
    pub fn seed_from_u64(seed: u64) -> Self {
        let mut sm = SplitMix64::new(seed);
        let s = [sm.next_u64(), sm.next_u64(), sm.next_u64(), sm.next_u64()];
        // SplitMix64 is a bijection of a counter, so four outputs are never all zero.
        Xoshiro256 {
            s,
            spare_normal: None,
        }
    }

    /// The generator of one ensemble stream, derived from a key of independent parts
    /// (for example seed, group and member). Equal keys give equal streams.
    pub fn for_stream(key: &[u64]) -> Self {
        let mut h = 0x6A09_E667_F3BC_C908_u64; // any fixed odd start value
        for &k in key {
            h = mix64(h ^ mix64(k.wrapping_add(0x9E37_79B9_7F4A_7C15)));
        }
        Self::seed_from_u64(h)
    }

    /// The next 64-bit output.
    pub fn next_u64(&mut self) -> u64 {
        let s = &mut self.s;
        let result = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        result
    }

    /// A uniform deviate in [0, 1) with 53 random bits.
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 * (1.0 / 9_007_199_254_740_992.0)
    }

    /// A uniform integer in `0..n` (multiply-high method; `n == 0` gives 0).
    pub fn below(&mut self, n: usize) -> usize {
        let wide = u128::from(self.next_u64()) * (n as u128);
        (wide >> 64) as usize
    }

    /// A standard normal deviate by the Box–Muller transform; the pair's second value is
    /// kept and returned by the next call.
    pub fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare_normal.take() {
            return z;
        }
        // u1 in (0, 1] so that ln(u1) is finite.
        let u1 = 1.0 - self.uniform();
        let u2 = self.uniform();
        let r = (-2.0 * u1.ln()).sqrt();
        let theta = std::f64::consts::TAU * u2;
        self.spare_normal = Some(r * theta.sin());
        r * theta.cos()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reference outputs of `splitmix64.c` for the seed 1234567, as carried in several public
    /// test suites (e.g. Rosetta Code "Pseudo-random numbers/Splitmix64").
    #[test]
    fn splitmix64_reproduces_reference_outputs() {
        let mut sm = SplitMix64::new(1_234_567);
        let expected = [
            6_457_827_717_110_365_317_u64,
            3_203_168_211_198_807_973,
            9_817_491_932_198_370_423,
            4_593_380_528_125_082_431,
            16_408_922_859_458_223_821,
        ];
        for e in expected {
            assert_eq!(sm.next_u64(), e);
        }
        // First output from state 0 (reference splitmix64.c): 0xE220A8397B1DCDAF.
        assert_eq!(SplitMix64::new(0).next_u64(), 0xE220_A839_7B1D_CDAF);
    }

    /// Reference outputs of the xoshiro256** C implementation from the state {1, 2, 3, 4},
    /// as used in the test of the `rand_xoshiro` crate ("produced with the reference
    /// implementation").
    #[test]
    fn xoshiro256starstar_reproduces_reference_outputs() {
        let mut x = Xoshiro256::from_state([1, 2, 3, 4]);
        let expected = [
            11_520_u64,
            0,
            1_509_978_240,
            1_215_971_899_390_074_240,
            1_216_172_134_540_287_360,
            607_988_272_756_665_600,
            16_172_922_978_634_559_625,
            8_476_171_486_693_032_832,
            10_595_114_339_597_558_777,
            2_904_607_092_377_533_576,
        ];
        for e in expected {
            assert_eq!(x.next_u64(), e);
        }
    }

    #[test]
    fn streams_are_reproducible_and_distinct() {
        let a: Vec<u64> = {
            let mut r = Xoshiro256::for_stream(&[42, 3, 7]);
            (0..8).map(|_| r.next_u64()).collect()
        };
        let b: Vec<u64> = {
            let mut r = Xoshiro256::for_stream(&[42, 3, 7]);
            (0..8).map(|_| r.next_u64()).collect()
        };
        let c: Vec<u64> = {
            let mut r = Xoshiro256::for_stream(&[42, 7, 3]);
            (0..8).map(|_| r.next_u64()).collect()
        };
        assert_eq!(a, b);
        assert_ne!(a, c);
    }

    /// Common practice: the sample mean and variance of 200,000 standard normal deviates lie
    /// within a few standard errors of 0 and 1; uniforms stay in [0, 1).
    #[test]
    fn normal_and_uniform_moments() {
        let mut r = Xoshiro256::seed_from_u64(2024);
        let n = 200_000;
        let (mut s1, mut s2) = (0.0, 0.0);
        for _ in 0..n {
            let z = r.normal();
            s1 += z;
            s2 += z * z;
        }
        let mean = s1 / n as f64;
        let var = s2 / n as f64 - mean * mean;
        assert!(mean.abs() < 0.01, "mean {mean}");
        assert!((var - 1.0).abs() < 0.015, "var {var}");
        let mut u_sum = 0.0;
        for _ in 0..n {
            let u = r.uniform();
            assert!((0.0..1.0).contains(&u));
            u_sum += u;
        }
        assert!((u_sum / n as f64 - 0.5).abs() < 0.005);
    }

    #[test]
    fn below_stays_in_range_and_covers_it() {
        let mut r = Xoshiro256::seed_from_u64(9);
        let mut seen = [0usize; 7];
        for _ in 0..7000 {
            let i = r.below(7);
            assert!(i < 7);
            seen[i] += 1;
        }
        assert!(seen.iter().all(|&c| c > 800), "{seen:?}");
        assert_eq!(r.below(0), 0);
    }
}
