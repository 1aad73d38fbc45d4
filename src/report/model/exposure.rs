//! The exposure part of a site's report model: the hours per day below each class limit and
//! the mean diel cycle of Ω_ar of each sensor series, as sampled and with every reading
//! projected on its own (filled from the outlook's typed exposure by `build/exposure.rs`).
//! Variability of the water, not the uncertainty of a mean.

use serde::{Deserialize, Serialize};

/// Why a site gives no exposure metrics.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ExposureUnavailable {
    /// Bottle samples only: the metrics need sub-daily data.
    NeedsSubDaily,
    /// Sensor series without a day of readings in enough clock hours.
    NoCompleteDay,
}

/// Hours per day below one level.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct HoursBelow {
    /// The Ω_ar level (one of the class limits).
    pub threshold: f64,
    pub hours_per_day: f64,
}

/// One station's sensor series in one season: as sampled (`pathway` and `year` `None`) or
/// with every reading projected on its own under a pathway in a year.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExposureSeries {
    pub pathway: Option<String>,
    pub year: Option<i32>,
    pub season: String,
    pub station: String,
    /// Complete days behind the daily figures.
    pub days: usize,
    /// Mean Ω_ar in each local clock hour 0–23 (NaN: no reading in that hour).
    pub diel_omega_ar: Vec<f64>,
    /// Mean of the daily minima of Ω_ar.
    pub daily_min_omega_ar: f64,
    pub hours_below: Vec<HoursBelow>,
}

impl ExposureSeries {
    /// Hours per day below `level`.
    pub fn hours(&self, level: f64) -> Option<f64> {
        self.hours_below
            .iter()
            .find(|h| h.threshold == level)
            .map(|h| h.hours_per_day)
    }
}

/// The exposure metrics of a site.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct SiteExposure {
    /// Why there are none (`None` when some sensor series gives them).
    pub unavailable: Option<ExposureUnavailable>,
    /// Stations with a sensor series that gives metrics.
    pub stations: Vec<String>,
    pub series: Vec<ExposureSeries>,
}

impl SiteExposure {
    /// The series of a state (`pathway`/`year` `None`: as sampled), season and station.
    pub fn find(
        &self,
        pathway: Option<&str>,
        year: Option<i32>,
        season: &str,
        station: &str,
    ) -> Option<&ExposureSeries> {
        self.series.iter().find(|s| {
            s.pathway.as_deref() == pathway
                && s.year == year
                && s.season == season
                && s.station == station
        })
    }
}
