//! Optional sea-surface warming per pathway, used when warming is turned on: the record's
//! temperature is raised by the pathway's SST change between the sampling year and the
//! horizon year (a delta method that leaves seasonal and short-term variability unchanged).
//!
//! For a pathway with annual CO2 over 1995–2100 the change follows the pathway's own shape:
//! it is scaled with ln CO2 of that pathway (the logarithmic CO2 forcing; common practice for
//! a screening pattern, not a climate model), anchored so that its 1995–2014 mean is zero and
//! its 2081–2100 mean equals the AR6 global-mean SST change. Other pathways use a linear ramp.

use super::pathways::{Observed, Pathway, PathwayKind, Ssp};

/// The default, in the words the README and `docs/site-format.md` repeat verbatim (a test
/// checks both).
pub const DEFAULT_STATEMENT: &str = "Warming is on by default (`warming = true`): each pathway's sea-surface warming follows the shape of its ln CO2, is zero over 1995–2014 and reaches the IPCC AR6 global-mean SST change for 2081–2100 (SSP1-2.6 +0.86 °C, SSP5-8.5 +2.89 °C, other pathways interpolated by their 2100 CO2) or the site's own `sst_change`; ensemble members draw it within 0.70–1.41 times that change (the AR6 very likely range), and it is added to every record's temperature.";

/// Global-mean SST change, 2081–2100 relative to 1995–2014, SSP1-2.6: +0.86 °C (very likely
/// 0.43–1.47). IPCC AR6 WG1 Ch. 9 (Fox-Kemper et al. 2021). Status M (from memory, medium
/// confidence, fact sheet §5). A global mean: tropical reef SST changes differ regionally.
pub const SST_CHANGE_SSP126_C: f64 = 0.86;

/// Global-mean SST change, 2081–2100 relative to 1995–2014, SSP5-8.5: +2.89 °C (very likely
/// 2.01–4.07). IPCC AR6 WG1 Ch. 9 (Fox-Kemper et al. 2021). Status M (from memory, medium
/// confidence). A global mean.
pub const SST_CHANGE_SSP585_C: f64 = 2.89;

/// Anchor year of zero change: the middle of the 1995–2014 reference period.
pub const RAMP_START_YEAR: i32 = 2005;
/// Anchor year of the full change: the middle of 2081–2100.
pub const RAMP_END_YEAR: i32 = 2090;

/// Where a pathway's SST change came from.
#[derive(Clone, Debug, PartialEq)]
pub enum WarmingOrigin {
    /// An AR6 value ([`SST_CHANGE_SSP126_C`], [`SST_CHANGE_SSP585_C`]), from memory.
    Ar6FromMemory,
    /// Interpolated (or extrapolated) between the two AR6 values by the pathway's 2100 CO2;
    /// our own rule, not a published number.
    InterpolatedByCo2,
    /// Given by the user in the site file.
    User,
    /// Stated in the site file for this pathway, with its source (e.g. a regional
    /// projection).
    Site { source: String },
}

/// SST change of one pathway: `delta_c` reached at [`RAMP_END_YEAR`].
#[derive(Clone, Debug, PartialEq)]
pub struct Warming {
    /// SST change at 2090 (the 2081–2100 mean) relative to 2005 (the 1995–2014 mean), °C.
    pub delta_c: f64,
    /// Where `delta_c` came from.
    pub origin: WarmingOrigin,
    /// The pathway's shape, when its annual CO2 covers 1995–2100.
    shape: Option<LnCo2Shape>,
}

/// `(ln C(y) - R) / (A - R)`: R the mean of ln C over 1995–2014, A over 2081–2100.
#[derive(Clone, Debug, PartialEq)]
struct LnCo2Shape {
    first_year: i32,
    /// Shape value of every year from `first_year`.
    values: Vec<f64>,
}

impl LnCo2Shape {
    /// The shape of `pathway` over the years its annual CO2 is defined (from the first
    /// observed year to 2300 or the pathway's last year); `None` when 1995–2100 is not covered
    /// or CO2 does not rise between the reference periods.
    fn of(pathway: &Pathway, observed: &Observed) -> Option<LnCo2Shape> {
        let first_year = observed.first_year().max(1850);
        let last_year = pathway.last_year().unwrap_or(2300).min(2300);
        if first_year > 1995 || last_year < 2100 {
            return None;
        }
        let ln: Vec<f64> = (first_year..=last_year)
            .map(|y| pathway.xco2_ppm(observed, y).map(f64::ln))
            .collect::<Result<_, _>>()
            .ok()?;
        let mean = |a: i32, b: i32| -> Option<f64> {
            let lo = usize::try_from(a - first_year).ok()?;
            let hi = usize::try_from(b - first_year).ok()?;
            let part = ln.get(lo..=hi)?;
            Some(part.iter().sum::<f64>() / part.len() as f64)
        };
        let reference = mean(REFERENCE_PERIOD.0, REFERENCE_PERIOD.1)?;
        let anchor = mean(ANCHOR_PERIOD.0, ANCHOR_PERIOD.1)?;
        if !(anchor - reference).is_finite() || anchor - reference <= 1e-9 {
            return None;
        }
        Some(LnCo2Shape {
            first_year,
            values: ln
                .iter()
                .map(|l| (l - reference) / (anchor - reference))
                .collect(),
        })
    }

    /// The shape in `year` (held at its first and last values outside the covered years).
    fn at(&self, year: i32) -> f64 {
        let i = usize::try_from(year - self.first_year).unwrap_or(0);
        self.values
            .get(i)
            .or(self.values.last())
            .copied()
            .unwrap_or(0.0)
    }
}

/// The AR6 reference period, whose mean change is zero.
pub const REFERENCE_PERIOD: (i32, i32) = (1995, 2014);
/// The AR6 assessment period, whose mean change is `delta_c`.
pub const ANCHOR_PERIOD: (i32, i32) = (2081, 2100);

impl Warming {
    /// The default for a pathway. SSP1-2.6 and SSP5-8.5 take the AR6 values; every other
    /// pathway (SSP1-1.9, SSP2-4.5, SSP3-7.0, steady, user) takes a value interpolated linearly
    /// between them by its 2100 CO2 (or its last value before 2100), clamped to 0–5 °C.
    pub fn default_for(pathway: &Pathway, observed: &Observed) -> Warming {
        let shape = LnCo2Shape::of(pathway, observed);
        match pathway.kind {
            PathwayKind::Ssp(Ssp::Ssp126) => Warming {
                delta_c: SST_CHANGE_SSP126_C,
                origin: WarmingOrigin::Ar6FromMemory,
                shape,
            },
            PathwayKind::Ssp(Ssp::Ssp585) => Warming {
                delta_c: SST_CHANGE_SSP585_C,
                origin: WarmingOrigin::Ar6FromMemory,
                shape,
            },
            _ => Warming {
                delta_c: interpolate_by_co2(pathway.ppm_2100(observed)),
                origin: WarmingOrigin::InterpolatedByCo2,
                shape,
            },
        }
    }

    /// A user-given change (°C at 2090).
    pub fn user(delta_c: f64) -> Warming {
        Warming {
            delta_c,
            origin: WarmingOrigin::User,
            shape: None,
        }
    }

    /// The site's own change for `pathway` (°C, 2081–2100 relative to 1995–2014) with its
    /// source, following the pathway's ln CO2 shape like the default.
    pub fn stated(pathway: &Pathway, observed: &Observed, delta_c: f64, source: &str) -> Warming {
        Warming {
            delta_c,
            origin: WarmingOrigin::Site {
                source: source.trim().to_string(),
            },
            shape: LnCo2Shape::of(pathway, observed),
        }
    }

    /// SST change in `year` relative to the 1995–2014 mean, °C: `delta_c` times the pathway's
    /// ln CO2 shape (see the module documentation); without a shape, 0 up to 2005, then a
    /// linear ramp reaching `delta_c` at 2090 and continuing at the same rate afterwards.
    pub fn sst_change_c(&self, year: i32) -> f64 {
        if let Some(shape) = &self.shape {
            return self.delta_c * shape.at(year);
        }
        if year <= RAMP_START_YEAR {
            return 0.0;
        }
        self.delta_c * f64::from(year - RAMP_START_YEAR)
            / f64::from(RAMP_END_YEAR - RAMP_START_YEAR)
    }

    /// Change between a sampling year and a horizon year, °C (what is added to a record's
    /// temperature).
    pub fn change_between(&self, sample_year: i32, year: i32) -> f64 {
        self.sst_change_c(year) - self.sst_change_c(sample_year)
    }

    /// Source text for outputs.
    pub fn source(&self) -> String {
        let shape = if self.shape.is_some() {
            "; scaled with ln CO2 of the pathway, zero over 1995-2014 and the stated change over \
             2081-2100 (common practice)"
        } else {
            "; linear ramp 2005-2090"
        };
        format!("{}{shape}", self.origin_text())
    }

    fn origin_text(&self) -> String {
        let text = match &self.origin {
            WarmingOrigin::Site { source } => return format!("site file: {source}"),
            WarmingOrigin::Ar6FromMemory => {
                "IPCC AR6 WG1 Ch. 9 (Fox-Kemper et al. 2021) global-mean SST change 2081-2100 vs \
                 1995-2014 (from memory, medium confidence)"
            }
            WarmingOrigin::InterpolatedByCo2 => {
                "interpolated by 2100 CO2 between the AR6 SSP1-2.6 (+0.86 C) and SSP5-8.5 \
                 (+2.89 C) global-mean SST changes (both from memory); our rule, not a published \
                 value"
            }
            WarmingOrigin::User => "user value from the site file",
        };
        text.to_string()
    }
}

/// Linear interpolation of the 2090 SST change between the SSP1-2.6 and SSP5-8.5 values by the
/// pathway's 2100 CO2 (ppm), clamped to 0–5 °C. Our own screening rule.
pub fn interpolate_by_co2(ppm_2100: f64) -> f64 {
    let c_lo = Ssp::Ssp126.table_ppm(2100).unwrap_or(445.625);
    let c_hi = Ssp::Ssp585.table_ppm(2100).unwrap_or(1135.21);
    if !ppm_2100.is_finite() {
        return 0.0;
    }
    let d = SST_CHANGE_SSP126_C
        + (SST_CHANGE_SSP585_C - SST_CHANGE_SSP126_C) * (ppm_2100 - c_lo) / (c_hi - c_lo);
    d.clamp(0.0, 5.0)
}

/// Spread of the warming between ensemble members, as multiples of the pathway's central
/// warming at the 5 % and 95 % points: the AR6 very likely range of the global-mean SST change
/// under SSP5-8.5, 2.01–4.07 °C around 2.89 °C (IPCC AR6 WG1 Ch. 9, Fox-Kemper et al. 2021;
/// from memory, fact sheet §5), i.e. 0.70 and 1.41, applied to every pathway.
pub const WARMING_SPREAD_5_95: (f64, f64) = (2.01 / 2.89, 4.07 / 2.89);

/// The multiple of the central warming for member `m` of `n`: stratified quantiles of a
/// two-piece normal with its 5 and 95 % points at [`WARMING_SPREAD_5_95`], so that every
/// pathway uses the same factor for the same member (paired members) and the same seed is
/// not even needed. One member takes the central warming.
pub fn warming_factor(m: usize, n: usize) -> f64 {
    if n <= 1 {
        return 1.0;
    }
    let p = (m as f64 + 0.5) / n as f64;
    let z = standard_normal_quantile(p);
    let (lo, hi) = WARMING_SPREAD_5_95;
    if z < 0.0 {
        1.0 + z / 1.644_853_626_951_472_2 * (1.0 - lo)
    } else {
        1.0 + z / 1.644_853_626_951_472_2 * (hi - 1.0)
    }
}

/// The standard normal quantile (Acklam's rational approximation, relative error below
/// 1.2e-9; P. J. Acklam 2003, "An algorithm for computing the inverse normal cumulative
/// distribution function", from memory).
pub fn standard_normal_quantile(p: f64) -> f64 {
    const A: [f64; 6] = [
        -3.969_683_028_665_376e1,
        2.209_460_984_245_205e2,
        -2.759_285_104_469_687e2,
        1.383_577_518_672_69e2,
        -3.066_479_806_614_716e1,
        2.506_628_277_459_239,
    ];
    const B: [f64; 5] = [
        -5.447_609_879_822_406e1,
        1.615_858_368_580_409e2,
        -1.556_989_798_598_866e2,
        6.680_131_188_771_972e1,
        -1.328_068_155_288_572e1,
    ];
    const C: [f64; 6] = [
        -7.784_894_002_430_293e-3,
        -3.223_964_580_411_365e-1,
        -2.400_758_277_161_838,
        -2.549_732_539_343_734,
        4.374_664_141_464_968,
        2.938_163_982_698_783,
    ];
    const D: [f64; 4] = [
        7.784_695_709_041_462e-3,
        3.224_671_290_700_398e-1,
        2.445_134_137_142_996,
        3.754_408_661_907_416,
    ];
    let p = p.clamp(1e-300, 1.0 - 1e-16);
    let tail = |q: f64| {
        (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5])
            / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0)
    };
    if p < 0.02425 {
        tail((-2.0 * p.ln()).sqrt())
    } else if p > 1.0 - 0.02425 {
        -tail((-2.0 * (1.0 - p).ln()).sqrt())
    } else {
        let q = p - 0.5;
        let r = q * q;
        (((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q
            / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ramp_hits_anchor_values() {
        let w = Warming::user(2.0);
        assert_eq!(w.sst_change_c(1990), 0.0);
        assert_eq!(w.sst_change_c(2005), 0.0);
        assert!((w.sst_change_c(2090) - 2.0).abs() < 1e-12);
        assert!((w.sst_change_c(2100) - 2.0 * 95.0 / 85.0).abs() < 1e-12);
        // Mean over 2081-2100 of the annual ramp equals the change at 2090.5, close to delta.
        let mean: f64 = (2081..=2100).map(|y| w.sst_change_c(y)).sum::<f64>() / 20.0;
        assert!((mean - 2.0 * 85.5 / 85.0).abs() < 1e-12);
        assert!((w.change_between(2024, 2024)).abs() < 1e-12);
        assert!(w.change_between(2024, 2050) > 0.0);
    }

    /// Check by construction of the stated method (the AR6 anchoring, from memory): the
    /// shaped change averages to zero over 1995-2014 and to the AR6 value over 2081-2100, and
    /// it follows the pathway: under SSP1-1.9, whose CO2 peaks near 2040 and then falls, the
    /// warming peaks and falls too; under the steady pathway it stops after the last
    /// observed year.
    #[test]
    fn shaped_warming_is_anchored_and_follows_the_pathway() {
        let obs = Observed::noaa();
        let mean = |w: &Warming, a: i32, b: i32| {
            (a..=b).map(|y| w.sst_change_c(y)).sum::<f64>() / f64::from(b - a + 1)
        };
        let p = Pathway::builtin("SSP5-8.5").unwrap();
        let w = Warming::default_for(&p, &obs);
        assert!(w.shape.is_some());
        assert!(mean(&w, 1995, 2014).abs() < 1e-12);
        assert!((mean(&w, 2081, 2100) - 2.89).abs() < 1e-12);
        let p = Pathway::builtin("SSP1-1.9").unwrap();
        let w = Warming::default_for(&p, &obs);
        let peak = (2025..=2100)
            .max_by(|a, b| w.sst_change_c(*a).total_cmp(&w.sst_change_c(*b)))
            .unwrap();
        assert!((2030..=2060).contains(&peak), "{peak}");
        assert!(w.sst_change_c(2100) < w.sst_change_c(peak));
        let w = Warming::default_for(&Pathway::builtin("steady").unwrap(), &obs);
        assert!(w.change_between(2025, 2100).abs() < 1e-12);
        assert!(w.source().contains("ln CO2"));
    }

    #[test]
    fn defaults_follow_ar6_values_and_co2_order() {
        let obs = Observed::noaa();
        let d: Vec<f64> = Pathway::all_ssps()
            .iter()
            .map(|p| Warming::default_for(p, &obs).delta_c)
            .collect();
        // From memory (AR6 WG1 Ch. 9): SSP1-2.6 +0.86, SSP5-8.5 +2.89 °C.
        assert_eq!(d[1], 0.86);
        assert_eq!(d[4], 2.89);
        // Interpolated values keep the CO2 order.
        assert!(d.windows(2).all(|w| w[0] < w[1]), "{d:?}");
        assert!(d[2] > 0.86 && d[3] < 2.89);
    }

    /// Check values of the standard normal quantile (any statistics table): z(0.95) =
    /// 1.644854, z(0.975) = 1.959964, z(0.5) = 0, z(0.01) = −2.326348.
    #[test]
    fn normal_quantiles_match_tables() {
        assert!((standard_normal_quantile(0.95) - 1.644_854).abs() < 1e-6);
        assert!((standard_normal_quantile(0.975) - 1.959_964).abs() < 1e-6);
        assert!(standard_normal_quantile(0.5).abs() < 1e-12);
        assert!((standard_normal_quantile(0.01) + 2.326_348).abs() < 1e-6);
    }

    /// The member factors span the stated range: of 1,000 stratified members, about 5 % lie
    /// below 2.01/2.89 and 5 % above 4.07/2.89, and the median member is the central value.
    #[test]
    fn member_factors_follow_the_stated_range() {
        let n = 1000;
        let f: Vec<f64> = (0..n).map(|m| warming_factor(m, n)).collect();
        let below = f.iter().filter(|x| **x < 2.01 / 2.89).count();
        let above = f.iter().filter(|x| **x > 4.07 / 2.89).count();
        assert!((45..=55).contains(&below), "{below}");
        assert!((45..=55).contains(&above), "{above}");
        assert!((f[499] - 1.0).abs() < 0.01 && (f[500] - 1.0).abs() < 0.01);
        assert!(f.windows(2).all(|w| w[1] > w[0]));
        assert_eq!(warming_factor(0, 1), 1.0);
    }
}
