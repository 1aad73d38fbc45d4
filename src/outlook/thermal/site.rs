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
use crate::outlook::warming::warming_factor;
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
