//! The thermal outlook of a site: its temperature record (from the site stage), the MMM
//! (stated or estimated), the observed annual maximum DHW and the projection under the
//! outlook's pathways with the warming range sampled, members paired across pathways.

use chrono::{Datelike, NaiveDate};
use serde::Serialize;

use super::daily::{DailySeries, TimedTemp, daily_means};
use super::dhw::{Climatology, climatology};
use super::projection::{HeatInput, HeatOutlook, HeatSettings, project_heat};
use super::{HeatError, HeatFinding};
use crate::outlook::ProjectionSettings;
use crate::site::temperature::{ThermalRecord, ThermalSource};

/// Where the MMM came from.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(tag = "from", rename_all = "snake_case")]
pub enum MmmOrigin {
    /// Stated in the site file with its source and base period.
    Stated {
        source: String,
        base_period: (i32, i32),
    },
    /// Estimated from the site's own record of `years` calendar years (weak: few years, and
    /// warm-biased when those years were hot).
    Record { years: usize },
}

/// A site's thermal outlook.
#[derive(Clone, Debug, PartialEq)]
pub struct SiteHeat {
    pub source: ThermalSource,
    pub first_day: NaiveDate,
    pub last_day: NaiveDate,
    pub mmm_c: f64,
    pub mmm_origin: MmmOrigin,
    /// The record's own climatology, when it covers every month.
    pub climatology: Option<Climatology>,
    pub allowance_c_per_decade: f64,
    pub findings: Vec<HeatFinding>,
    pub outlook: HeatOutlook,
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

/// A temperature record made ready for the thermal outlook: daily means, findings and the
/// MMM (stated, or from the record's own climatology). Making it is the check `check` runs;
/// projecting it needs nothing more from the record.
#[derive(Clone, Debug, PartialEq)]
pub struct PreparedHeat {
    pub source: ThermalSource,
    /// Readings in the record.
    pub readings: usize,
    pub daily: DailySeries,
    pub findings: Vec<HeatFinding>,
    pub mmm_c: f64,
    pub mmm_origin: MmmOrigin,
    /// The record's own climatology, when it covers every month.
    pub climatology: Option<Climatology>,
    pub allowance_c_per_decade: f64,
}

/// Daily means and the MMM of a record: an error when the record cannot give a thermal
/// outlook (readings out of order or range, or no stated MMM and a record that does not cover
/// every month).
pub fn prepare(record: &ThermalRecord) -> Result<PreparedHeat, HeatError> {
    let readings: Vec<TimedTemp> = record
        .readings
        .iter()
        .map(|r| TimedTemp {
            local: r.local,
            has_time: r.has_time,
            temp_c: r.temp_c,
        })
        .collect();
    let (daily, mut findings) = daily_means(&readings)?;
    let (mmm_c, mmm_origin, climatology) = match (&record.stated_mmm, climatology(&daily)) {
        (Some(s), c) => (
            s.value_c,
            MmmOrigin::Stated {
                source: s.source.clone(),
                base_period: s.base_period,
            },
            c.ok(),
        ),
        (None, Ok(c)) => {
            let years = c.years_per_month.iter().copied().min().unwrap_or(0);
            findings.push(HeatFinding::MmmFromRecord { years });
            (c.mmm_c, MmmOrigin::Record { years }, Some(c))
        }
        (None, Err(e)) => return Err(e),
    };
    Ok(PreparedHeat {
        source: record.source.clone(),
        readings: readings.len(),
        daily,
        findings,
        mmm_c,
        mmm_origin,
        climatology,
        allowance_c_per_decade: record.allowance_c_per_decade,
    })
}

/// The thermal outlook of a prepared record under the outlook's pathways and horizon years.
pub fn site_heat(prep: &PreparedHeat, settings: &ProjectionSettings) -> SiteHeat {
    let daily = &prep.daily;
    let last_day = daily.date(daily.temp_c.len().saturating_sub(1));
    let last_year = last_day.year();
    let input = HeatInput {
        daily,
        mmm_c: prep.mmm_c,
        allowance_c_per_decade: prep.allowance_c_per_decade,
        allowance_from_year: last_year,
    };
    let end = settings
        .years
        .last()
        .copied()
        .unwrap_or(2100)
        .max(last_year + 1);
    let members = settings.ensemble.members.max(1);
    let heat_settings = HeatSettings {
        pathways: settings
            .pathways
            .iter()
            .map(|p| p.pathway.name.clone())
            .collect(),
        horizon_years: settings.years.clone(),
        onset_span: (last_year + 1, end),
        members,
    };
    let factors: Vec<f64> = (0..members).map(|m| warming_factor(m, members)).collect();
    let warming = |p: usize, year: i32, m: usize| {
        let central = settings
            .pathways
            .get(p)
            .map_or(0.0, |s| s.warming.sst_change_c(year));
        central * factors.get(m).copied().unwrap_or(1.0)
    };
    let outlook = project_heat(&input, &heat_settings, &warming);
    let mut findings = prep.findings.clone();
    findings.extend(outlook.years_left_out.iter().cloned());
    SiteHeat {
        source: prep.source.clone(),
        first_day: daily.first,
        last_day,
        mmm_c: prep.mmm_c,
        mmm_origin: prep.mmm_origin.clone(),
        climatology: prep.climatology.clone(),
        allowance_c_per_decade: prep.allowance_c_per_decade,
        findings,
        outlook,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
