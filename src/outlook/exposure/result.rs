//! The typed exposure of a site: for every station with a sub-daily (sensor) series and
//! every season, the metrics of its readings as sampled and of the same readings each
//! projected on its own under every pathway, scenario and horizon year.

use super::ExposureError;
use crate::outlook::result::{GroupId, PathwayId, ScenarioId};

/// The state of the water the metrics describe.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ExposureState {
    /// The readings as sampled (the same under every pathway).
    AsSampled,
    /// Every reading projected on its own (central constants and warming).
    Projected {
        pathway: PathwayId,
        scenario: ScenarioId,
        year: i32,
    },
}

/// The exposure of one series to one habitat threshold.
#[derive(Clone, Debug, PartialEq)]
pub struct LevelExposure {
    /// The class whose lower bound this is.
    pub class_left: String,
    pub threshold_omega_ar: f64,
    /// Mean hours per complete day with Omega_ar below the threshold.
    pub hours_per_day_below: f64,
    /// Time-weighted percent of the covered time below the threshold.
    pub pct_time_below: f64,
}

/// The mean of the readings in each local clock hour, 0–23 (NaN: no reading in that hour).
#[derive(Clone, Debug, PartialEq)]
pub struct DielCycle {
    pub omega_ar: [f64; 24],
    pub ph_t: [f64; 24],
    /// µatm.
    pub pco2_uatm: [f64; 24],
}

/// The metrics of one station's series in one season and state.
#[derive(Clone, Debug, PartialEq)]
pub struct ExposureRow {
    pub state: ExposureState,
    /// A season (the metrics are per season).
    pub group: GroupId,
    /// Index into [`ExposureOutlook::stations`].
    pub station: usize,
    /// Complete days the daily figures are averaged over.
    pub days: usize,
    pub diel: DielCycle,
    /// Mean over the complete days of each day's lowest Omega_ar.
    pub daily_min_omega_ar_mean: f64,
    /// The lowest daily minimum of Omega_ar.
    pub daily_min_omega_ar_lowest: f64,
    /// Per habitat threshold, high to low.
    pub below: Vec<LevelExposure>,
}

impl ExposureRow {
    /// The exposure to one threshold.
    pub fn level(&self, threshold_omega_ar: f64) -> Option<&LevelExposure> {
        self.below
            .iter()
            .find(|l| l.threshold_omega_ar == threshold_omega_ar)
    }
}

/// A station's sensor series that gives no metrics in a season, and why.
#[derive(Clone, Debug, PartialEq)]
pub struct ExposureGap {
    pub group: GroupId,
    pub station: usize,
    pub reason: ExposureError,
}

/// The exposure metrics of a site.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct ExposureOutlook {
    /// Names of the stations with a sensor series (rows and gaps refer to them by index).
    pub stations: Vec<String>,
    /// Why the site gives no metrics at all (`None` when some series gives them); a site of
    /// bottle samples only says that the metrics need sub-daily data.
    pub unavailable: Option<ExposureError>,
    /// As sampled first (by season and station), then by pathway, scenario, year, season and
    /// station.
    pub rows: Vec<ExposureRow>,
    /// Sensor series that give no metrics in a season.
    pub gaps: Vec<ExposureGap>,
}

impl ExposureOutlook {
    /// The row of one state, season and station.
    pub fn row(
        &self,
        state: ExposureState,
        group: GroupId,
        station: usize,
    ) -> Option<&ExposureRow> {
        self.rows
            .iter()
            .find(|r| r.state == state && r.group == group && r.station == station)
    }

    /// The name of a station.
    pub fn station_name(&self, station: usize) -> &str {
        self.stations.get(station).map_or("", String::as_str)
    }
}
