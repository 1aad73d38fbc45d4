//! The thermal outlook's machine-readable views: a long-format CSV table (`project --table
//! heat`) and the `thermal_stress` part of the JSON document. Units are in the names
//! (`degc`, `degc_weeks`, `pct`).

use std::io::{self, Write};

use serde::Serialize;

use super::site::{MmmOrigin, SiteHeat};
use super::{DHW_SEVERE, DHW_SIGNIFICANT, HeatFinding};
use crate::numfmt::fixed;
use crate::site::temperature::ThermalSource;

/// The CSV header of the heat table.
pub const HEAT_CSV_HEADER: &str = "row,pathway,year,max_dhw_p05_degc_weeks,max_dhw_p50_degc_weeks,max_dhw_p95_degc_weeks,years_dhw_ge_4_pct,years_dhw_ge_8_pct,severe_most_years_from_p05,severe_most_years_from_p50,severe_most_years_from_p95";

fn num(v: f64, d: usize) -> String {
    fixed(v, d).unwrap_or_default()
}

fn year(y: Option<i32>) -> String {
    y.map(|y| y.to_string()).unwrap_or_default()
}

/// Writes the heat table: `observed` rows (annual maximum DHW of each year of record, in the
/// median column), `projected` rows (pathway × horizon year) and one `onset` row per pathway
/// (the first year in which DHW ≥ 8 °C-weeks is reached in most years; empty: not within the
/// horizon). A site without a temperature record gives the header only.
pub fn write_heat_csv(heat: Option<&SiteHeat>, w: &mut dyn Write) -> io::Result<()> {
    writeln!(w, "{HEAT_CSV_HEADER}")?;
    let Some(h) = heat else { return Ok(()) };
    for (y, v) in &h.outlook.observed {
        writeln!(w, "observed,,{y},,{},,,,,,", num(*v, 2))?;
    }
    for p in &h.outlook.pathways {
        for y in &p.years {
            writeln!(
                w,
                "projected,{},{},{},{},{},{},{},,,",
                p.name,
                y.year,
                num(y.max_dhw_q[0], 2),
                num(y.max_dhw_q[1], 2),
                num(y.max_dhw_q[2], 2),
                num(100.0 * y.share_significant, 1),
                num(100.0 * y.share_severe, 1),
            )?;
        }
        writeln!(
            w,
            "onset,{},,,,,,,{},{},{}",
            p.name,
            year(p.onset_q[0]),
            year(p.onset_q[1]),
            year(p.onset_q[2])
        )?;
    }
    Ok(())
}

/// The `thermal_stress` part of the JSON document.
#[derive(Serialize)]
pub struct JsonHeat<'a> {
    source: String,
    record_first_day: String,
    record_last_day: String,
    mmm_degc: Option<f64>,
    mmm: &'a MmmOrigin,
    adaptation_allowance_degc_per_decade: f64,
    significant_threshold_degc_weeks: f64,
    severe_threshold_degc_weeks: f64,
    observed_max_dhw: Vec<JsonObserved>,
    pathways: Vec<JsonHeatPathway<'a>>,
    findings: Vec<String>,
}

#[derive(Serialize)]
struct JsonObserved {
    year: i32,
    max_dhw_degc_weeks: Option<f64>,
}

#[derive(Serialize)]
struct JsonHeatPathway<'a> {
    name: &'a str,
    years: Vec<JsonHeatYear>,
    severe_most_years_from: [Option<i32>; 3],
}

#[derive(Serialize)]
struct JsonHeatYear {
    year: i32,
    max_dhw_degc_weeks: [Option<f64>; 3],
    years_dhw_ge_4_pct: Option<f64>,
    years_dhw_ge_8_pct: Option<f64>,
}

fn round(v: f64, d: i32) -> Option<f64> {
    v.is_finite().then(|| {
        let f = 10f64.powi(d);
        (v * f).round() / f
    })
}

/// Words for a finding (shown in the JSON and by the report).
pub fn finding_text(f: &HeatFinding) -> String {
    match f {
        HeatFinding::IncompleteDays { days, first } => format!(
            "{days} day(s) with too few readings for a daily mean (first {first}); left missing"
        ),
        HeatFinding::GapFilled { from, days } => {
            format!("gap of {days} day(s) from {from} filled by linear interpolation")
        }
        HeatFinding::GapLeftOut { from, days } => {
            format!("gap of {days} day(s) from {from} left out; DHW is not computed over it")
        }
        HeatFinding::YearLeftOut { year, covered_days } => format!(
            "{year}: DHW defined on only {covered_days} days; no annual maximum for that year"
        ),
        HeatFinding::MmmFromRecord { years } => format!(
            "MMM estimated from the site's own record ({years} year(s) per month at the least): weak, and warm-biased if those years were hot; loggers also read differently from satellite SST"
        ),
    }
}

/// Words for the record's source.
pub fn source_text(s: &ThermalSource) -> String {
    match s {
        ThermalSource::Logger { file, .. } => format!("temperature logger file {file}"),
        ThermalSource::SensorRecords { station } => {
            format!("sensor records, station {station}")
        }
    }
}

impl<'a> From<&'a SiteHeat> for JsonHeat<'a> {
    fn from(h: &'a SiteHeat) -> Self {
        JsonHeat {
            source: source_text(&h.source),
            record_first_day: h.first_day.to_string(),
            record_last_day: h.last_day.to_string(),
            mmm_degc: round(h.mmm_c, 2),
            mmm: &h.mmm_origin,
            adaptation_allowance_degc_per_decade: h.allowance_c_per_decade,
            significant_threshold_degc_weeks: DHW_SIGNIFICANT,
            severe_threshold_degc_weeks: DHW_SEVERE,
            observed_max_dhw: h
                .outlook
                .observed
                .iter()
                .map(|(y, v)| JsonObserved {
                    year: *y,
                    max_dhw_degc_weeks: round(*v, 2),
                })
                .collect(),
            pathways: h
                .outlook
                .pathways
                .iter()
                .map(|p| JsonHeatPathway {
                    name: &p.name,
                    years: p
                        .years
                        .iter()
                        .map(|y| JsonHeatYear {
                            year: y.year,
                            max_dhw_degc_weeks: y.max_dhw_q.map(|v| round(v, 2)),
                            years_dhw_ge_4_pct: round(100.0 * y.share_significant, 1),
                            years_dhw_ge_8_pct: round(100.0 * y.share_severe, 1),
                        })
                        .collect(),
                    severe_most_years_from: p.onset_q,
                })
                .collect(),
            findings: h.findings.iter().map(finding_text).collect(),
        }
    }
}
