//! The thermal-stress part of a site's report model: the temperature record, the MMM and
//! where it came from, the observed annual maximum DHW and its projection per pathway, as
//! numbers (filled from the outlook stage's `SiteHeat` by `build/thermal.rs`).

use serde::{Deserialize, Serialize};

/// Where the maximum monthly mean (MMM) came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "from", rename_all = "snake_case")]
pub enum MmmSource {
    /// Stated in the site file, with its source and base period (first and last year).
    Stated {
        source: String,
        base_period: (i32, i32),
    },
    /// Estimated from the site's own record; `years`: the fewest years behind any month.
    Record { years: usize },
}

/// The observed annual maximum DHW of one year of record.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ObservedDhw {
    pub year: i32,
    /// °C-weeks.
    pub max_dhw: f64,
}

/// The projected annual maximum DHW of one horizon year under one pathway.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct HeatPoint {
    pub year: i32,
    /// 5, 50 and 95 % of the annual maximum DHW over members × observed-year patterns,
    /// °C-weeks.
    pub max_dhw: [f64; 3],
    /// Share of those years with DHW ≥ the significant level, %.
    pub significant_pct: f64,
    /// Share of those years with DHW ≥ the severe level, %.
    pub severe_pct: f64,
}

/// One pathway's thermal outlook.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct HeatSeries {
    /// [`super::PathwayInfo::id`].
    pub pathway: String,
    pub points: Vec<HeatPoint>,
    /// The first year in which severe stress is reached in most years: 5, 50 and 95 % over
    /// members; `None`: not within the projected years.
    #[serde(with = "onset_years")]
    pub severe_most_years: [Option<i32>; 3],
    /// The last year searched for that onset (shown as "not by").
    pub searched_to: i32,
}

/// The thermal-stress outlook of one site.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ThermalOutlook {
    /// The temperature record, in words ("temperature logger file …").
    pub record: String,
    /// First and last day of the daily series, ISO dates.
    pub first_day: String,
    pub last_day: String,
    /// The maximum monthly mean, °C.
    pub mmm_c: f64,
    pub mmm_source: MmmSource,
    /// °C per decade added to the MMM after the record (0: fixed MMM).
    pub allowance_c_per_decade: f64,
    /// The two stress levels, °C-weeks (significant, severe).
    pub levels: [f64; 2],
    pub observed: Vec<ObservedDhw>,
    pub pathways: Vec<HeatSeries>,
    /// Findings about the record, worded.
    pub findings: Vec<String>,
}

impl ThermalOutlook {
    /// The series of a pathway.
    pub fn series(&self, pathway: &str) -> Option<&HeatSeries> {
        self.pathways.iter().find(|p| p.pathway == pathway)
    }
}

/// `[early, median, late]` onset years as a table with the missing ones left out: TOML (the
/// shard result files) has no empty value inside an array.
mod onset_years {
    use serde::{Deserialize, Deserializer, Serialize, Serializer};

    #[derive(Serialize, Deserialize)]
    struct Onset {
        #[serde(default, skip_serializing_if = "Option::is_none")]
        early: Option<i32>,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        median: Option<i32>,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        late: Option<i32>,
    }

    pub fn serialize<S: Serializer>(v: &[Option<i32>; 3], s: S) -> Result<S::Ok, S::Error> {
        let [early, median, late] = *v;
        Onset {
            early,
            median,
            late,
        }
        .serialize(s)
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<[Option<i32>; 3], D::Error> {
        let o = Onset::deserialize(d)?;
        Ok([o.early, o.median, o.late])
    }
}
