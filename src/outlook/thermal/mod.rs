//! Thermal stress from the site's own temperatures: daily means, the maximum monthly mean
//! (MMM) climatology, HotSpots and Degree Heating Weeks (DHW), and their projection under each
//! pathway by the delta method.
//!
//! ```text
//! timed temperatures ──► daily means (local date, completeness rule, short gaps filled)
//!                    ──► monthly climatology ──► MMM (or the site's stated MMM)
//! daily means + MMM  ──► HotSpot = T − MMM; DHW = Σ HotSpots ≥ 1 °C over 84 days / 7
//!                    ──► annual maximum DHW per observed year
//! + pathway warming  ──► the same, each observed year shifted by the member's warming
//!                        (one pattern of variability each), against the fixed MMM
//! ```
//!
//! Definitions (published metrics, keeping their names):
//! - HotSpot: daily temperature minus the MMM, counted only when positive; DHW accumulates the
//!   HotSpots of at least 1 °C over the trailing 12 weeks (84 days) and divides by 7, giving
//!   °C-weeks (Liu, Strong & Skirving 2003, Eos 84(15):137–141; Skirving et al. 2020, Remote
//!   Sensing 12(23):3856). A HotSpot of 0.8 °C adds nothing.
//! - The two stress levels used here, DHW ≥ 4 °C-weeks (significant bleaching expected) and
//!   DHW ≥ 8 °C-weeks (severe bleaching with likely mortality), are the thresholds in common
//!   use with this metric (common practice; stated in the satellite monitoring literature that
//!   defines DHW, e.g. Liu et al. 2003).
//! - The "most years" onset follows the idea of annual severe bleaching of van Hooidonk et al.
//!   (2016, Sci. Rep. 6:39666), who date the onset of DHW > 8 °C-weeks every year; here the
//!   onset is the first year in which more than half of the observed years' patterns reach
//!   8 °C-weeks, a rule of our own that a short site record can support.
//!
//! What is not modelled, and is said wherever these numbers are shown: changes in variability
//! (each observed year is shifted, not reshaped); in-situ loggers read warmer or cooler than
//! the satellite SST that the thresholds were calibrated on; an MMM estimated from a few
//! years of the site's own record is weak and warm-biased when those years were hot.

pub mod daily;
pub mod dhw;
pub mod output;
pub mod projection;
pub mod site;

pub use daily::{DailySeries, TimedTemp, daily_means};
pub use dhw::{Climatology, DhwSeries, annual_maxima, climatology, dhw_series};
pub use projection::{HeatOutlook, HeatPathway, HeatYear, project_heat};

use std::fmt;

use chrono::NaiveDate;

/// DHW at or above which significant bleaching is expected, °C-weeks (common practice).
pub const DHW_SIGNIFICANT: f64 = 4.0;
/// DHW at or above which severe bleaching with likely mortality is expected, °C-weeks (common
/// practice).
pub const DHW_SEVERE: f64 = 8.0;
/// A HotSpot counts towards DHW only from this many °C above the MMM (Skirving et al. 2020).
pub const HOTSPOT_MIN_C: f64 = 1.0;
/// The DHW accumulation window, days (12 weeks; Liu et al. 2003).
pub const DHW_WINDOW_DAYS: usize = 84;

/// Days a gap may last and still be filled by linear interpolation between the days either
/// side; longer gaps leave the days missing, and every DHW window that contains one is left
/// out (our rule: three days is short against the 84-day window and the persistence of
/// reef-water temperature anomalies).
pub const MAX_FILLED_GAP_DAYS: usize = 3;
/// A logger sampling hourly or more often needs observations in at least this many distinct
/// clock hours for a day's mean (our rule: 20 of 24 hours keeps the diel cycle represented).
pub const MIN_HOURS_PER_DAY: usize = 20;
/// A logger sampling less often than hourly needs at least this share of the samples its
/// median interval implies for a day's mean (the same 20-of-24 share as above).
pub const MIN_DAY_SHARE: f64 = 20.0 / 24.0;
/// A calendar month enters the climatology with at least this many daily means.
pub const MIN_DAYS_PER_MONTH: usize = 20;
/// An observed year's maximum DHW counts when DHW is defined on at least this share of its
/// days (our rule: the record must cover the year's warm season whichever hemisphere the
/// site is in; a record that starts on 1 January loses its first 83 days to the window).
pub const MIN_YEAR_SHARE: f64 = 0.9;
/// Plausible in-situ water temperatures, °C; readings outside are refused with a message.
pub const TEMP_RANGE_C: (f64, f64) = (-2.0, 40.0);

/// Something about the temperature record worth telling the reader; worded where shown.
#[derive(Clone, Debug, PartialEq)]
pub enum HeatFinding {
    /// A day with too few observations for a mean (left missing).
    IncompleteDays { days: usize, first: NaiveDate },
    /// A short gap filled by linear interpolation.
    GapFilled { from: NaiveDate, days: usize },
    /// A long gap left missing; DHW windows containing it are left out.
    GapLeftOut { from: NaiveDate, days: usize },
    /// An observed year without enough DHW coverage to give its maximum.
    YearLeftOut { year: i32, covered_days: usize },
    /// The MMM was estimated from the site's own record of so many years.
    MmmFromRecord { years: usize },
}

/// Why thermal stress cannot be computed from a record.
#[derive(Clone, Debug, PartialEq)]
pub enum HeatError {
    /// Times must increase strictly; `index` is the 0-based position of the offending reading.
    NotIncreasing { index: usize },
    /// A reading outside [`TEMP_RANGE_C`].
    OutOfRange { index: usize, temp_c: f64 },
    /// No stated MMM and the record does not cover every calendar month.
    ClimatologyIncomplete { months_missing: Vec<u32> },
    /// No reading at all.
    Empty,
}

impl fmt::Display for HeatError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            HeatError::NotIncreasing { index } => write!(
                f,
                "reading {} is not later than the one before it (times must increase, with no duplicates)",
                index + 1
            ),
            HeatError::OutOfRange { index, temp_c } => write!(
                f,
                "reading {} has temperature {temp_c} °C, outside {}–{} °C",
                index + 1,
                TEMP_RANGE_C.0,
                TEMP_RANGE_C.1
            ),
            HeatError::ClimatologyIncomplete { months_missing } => write!(
                f,
                "the record does not cover every calendar month with {MIN_DAYS_PER_MONTH} or more daily means \
                 (missing months: {}); give a longer record or state the MMM with its source in the site file",
                months_missing
                    .iter()
                    .map(u32::to_string)
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
            HeatError::Empty => f.write_str("the temperature record has no readings"),
        }
    }
}

impl std::error::Error for HeatError {}
