//! The exposure metrics' machine-readable views: two long-format CSV tables (`project
//! --table exposure`: hours per day and share of time below each habitat threshold with the
//! daily minimum, one row per state, season, station and threshold; `project --table diel`:
//! the mean diel cycle, one row per state, season, station and local hour) and the `exposure`
//! part of the JSON document. Units are in the names (`hours_per_day_below`, `pct_time_below`,
//! `pco2_uatm`). A site without a sensor series gives the headers only; the JSON says why.

use std::io::{self, Write};

use serde::Serialize;

use super::result::{ExposureRow, ExposureState};
use crate::outlook::output::{fixed, rounded};
use crate::outlook::result::Outlook;

/// The CSV header of the exposure table.
pub const EXPOSURE_CSV_HEADER: [&str; 13] = [
    "row",
    "pathway",
    "scenario",
    "year",
    "season",
    "station",
    "days",
    "class_left",
    "threshold_omega_ar",
    "hours_per_day_below",
    "pct_time_below",
    "daily_min_omega_ar_mean",
    "daily_min_omega_ar_lowest",
];

/// The CSV header of the diel-cycle table.
pub const DIEL_CSV_HEADER: [&str; 10] = [
    "row",
    "pathway",
    "scenario",
    "year",
    "season",
    "station",
    "local_hour",
    "omega_ar",
    "ph_t",
    "pco2_uatm",
];

/// How the metrics are made, for the JSON document.
pub const METHOD: &str = "variability, not uncertainty: each station's sensor series per \
     season, as sampled and with every reading projected on its own (central constants and \
     warming, as for pct_time_below); values linear between readings, intervals longer than \
     three median intervals are gaps and count for nothing; daily figures over local days \
     with readings in at least 18 clock hours; bottle samples give no exposure metrics";

/// The leading fields of a row: kind, pathway, scenario, year, season, station.
fn keys(o: &Outlook, r: &ExposureRow) -> [String; 6] {
    let (kind, pathway, scenario, year) = match r.state {
        ExposureState::AsSampled => ("as_sampled", String::new(), "none", String::new()),
        ExposureState::Projected {
            pathway,
            scenario,
            year,
        } => (
            "projected",
            o.pathway(pathway)
                .map_or("", |p| p.name.as_str())
                .to_string(),
            o.scenario_name(scenario),
            year.to_string(),
        ),
    };
    [
        kind.to_string(),
        pathway,
        scenario.to_string(),
        year,
        o.group_label(r.group).to_string(),
        o.exposure.station_name(r.station).to_string(),
    ]
}

/// Writes the exposure table.
pub fn write_exposure_csv(o: &Outlook, w: &mut dyn Write) -> io::Result<()> {
    let mut c = csv::Writer::from_writer(w);
    c.write_record(EXPOSURE_CSV_HEADER)?;
    for r in &o.exposure.rows {
        let k = keys(o, r);
        for l in &r.below {
            let mut rec: Vec<String> = k.to_vec();
            rec.extend([
                r.days.to_string(),
                l.class_left.clone(),
                fixed(l.threshold_omega_ar, 2),
                fixed(l.hours_per_day_below, 2),
                fixed(l.pct_time_below, 1),
                fixed(r.daily_min_omega_ar_mean, 4),
                fixed(r.daily_min_omega_ar_lowest, 4),
            ]);
            c.write_record(&rec)?;
        }
    }
    c.flush()
}

/// Writes the diel-cycle table.
pub fn write_diel_csv(o: &Outlook, w: &mut dyn Write) -> io::Result<()> {
    let mut c = csv::Writer::from_writer(w);
    c.write_record(DIEL_CSV_HEADER)?;
    for r in &o.exposure.rows {
        let k = keys(o, r);
        for h in 0..24 {
            let mut rec: Vec<String> = k.to_vec();
            rec.extend([
                h.to_string(),
                fixed(r.diel.omega_ar[h], 4),
                fixed(r.diel.ph_t[h], 4),
                fixed(r.diel.pco2_uatm[h], 2),
            ]);
            c.write_record(&rec)?;
        }
    }
    c.flush()
}

/// The `exposure` part of the JSON document.
#[derive(Serialize)]
pub struct JsonExposure<'a> {
    method: &'static str,
    available: bool,
    /// Why the site gives no metrics (absent when it does).
    #[serde(skip_serializing_if = "Option::is_none")]
    reason: Option<String>,
    stations: &'a [String],
    gaps: Vec<JsonGap<'a>>,
    series: Vec<JsonSeries<'a>>,
}

#[derive(Serialize)]
struct JsonGap<'a> {
    season: &'a str,
    station: &'a str,
    reason: String,
}

#[derive(Serialize)]
struct JsonLevel<'a> {
    class_left: &'a str,
    threshold_omega_ar: Option<f64>,
    hours_per_day_below: Option<f64>,
    pct_time_below: Option<f64>,
}

#[derive(Serialize)]
struct JsonHour {
    local_hour: usize,
    omega_ar: Option<f64>,
    ph_t: Option<f64>,
    pco2_uatm: Option<f64>,
}

#[derive(Serialize)]
struct JsonSeries<'a> {
    row: String,
    pathway: String,
    scenario: String,
    year: Option<i32>,
    season: String,
    station: String,
    days: usize,
    daily_min_omega_ar_mean: Option<f64>,
    daily_min_omega_ar_lowest: Option<f64>,
    below: Vec<JsonLevel<'a>>,
    diel: Vec<JsonHour>,
}

impl<'a> From<&'a Outlook> for JsonExposure<'a> {
    fn from(o: &'a Outlook) -> Self {
        let e = &o.exposure;
        JsonExposure {
            method: METHOD,
            available: e.unavailable.is_none(),
            reason: e.unavailable.as_ref().map(ToString::to_string),
            stations: &e.stations,
            gaps: e
                .gaps
                .iter()
                .map(|g| JsonGap {
                    season: o.group_label(g.group),
                    station: e.station_name(g.station),
                    reason: g.reason.to_string(),
                })
                .collect(),
            series: e
                .rows
                .iter()
                .map(|r| {
                    let [row, pathway, scenario, _, season, station] = keys(o, r);
                    JsonSeries {
                        row,
                        pathway,
                        scenario,
                        year: match r.state {
                            ExposureState::AsSampled => None,
                            ExposureState::Projected { year, .. } => Some(year),
                        },
                        season,
                        station,
                        days: r.days,
                        daily_min_omega_ar_mean: rounded(r.daily_min_omega_ar_mean, 4),
                        daily_min_omega_ar_lowest: rounded(r.daily_min_omega_ar_lowest, 4),
                        below: r
                            .below
                            .iter()
                            .map(|l| JsonLevel {
                                class_left: &l.class_left,
                                threshold_omega_ar: rounded(l.threshold_omega_ar, 4),
                                hours_per_day_below: rounded(l.hours_per_day_below, 2),
                                pct_time_below: rounded(l.pct_time_below, 1),
                            })
                            .collect(),
                        diel: (0..24)
                            .map(|h| JsonHour {
                                local_hour: h,
                                omega_ar: rounded(r.diel.omega_ar[h], 4),
                                ph_t: rounded(r.diel.ph_t[h], 4),
                                pco2_uatm: rounded(r.diel.pco2_uatm[h], 2),
                            })
                            .collect(),
                    }
                })
                .collect(),
        }
    }
}
