//! What a site's comparison rests on beyond its numbers: the restoration plan from the site
//! file and the basis of its data (how many records of which kind, the years they cover and
//! whether TA was measured or estimated). Filled by the builder from the loaded site; older
//! result files without them read as empty.

use serde::{Deserialize, Serialize};

/// The site's restoration plan as its site file states it (`[plan]`, and the coral cover of
/// `[baseline]`); every part optional.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct SitePlan {
    pub start_year: Option<i32>,
    /// The project's end year: the comparison evaluates each site's projection in it.
    pub end_year: Option<i32>,
    /// Calcifier groups to be planted, as written.
    pub target_groups: Vec<String>,
    /// Out-planting area, m².
    pub outplanting_area_m2: Option<f64>,
    /// Present-day live coral cover, fraction 0–1.
    pub coral_cover_fraction: Option<f64>,
}

/// The basis of a site's data: records used by kind, the calendar years they cover and how
/// TA was obtained.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct DataBasis {
    /// Bottle samples used in the baseline and outlook.
    pub bottle_used: usize,
    /// Sensor readings used.
    pub sensor_used: usize,
    /// First and last calendar year of the records used.
    pub first_year: Option<i32>,
    pub last_year: Option<i32>,
    /// Records used whose TA was measured.
    pub ta_measured: usize,
    /// Records used whose TA was estimated from the site's TA–salinity relationship.
    pub ta_estimated: usize,
}
