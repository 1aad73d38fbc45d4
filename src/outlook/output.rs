//! The outlook's results and their machine-readable forms (design notes, "Output
//! conventions"): long-format CSV (one row per pathway, scenario, year, season and quantity,
//! with quantile columns) and JSON with the same content plus the threshold-crossing table,
//! the probabilities of lying below each habitat threshold and the calcification outlook.
//!
//! Numbers are written with fixed decimals per quantity (CSV) or rounded to the same decimals
//! (JSON), so equal inputs give byte-identical files. Every numeric field carries its unit in
//! its name (`pco2_uatm`, `net_calc_kg_m2_yr_...`, `threshold_omega_ar`, `prob_below_pct`).

use std::fmt;
use std::io::{self, Write};
use std::str::FromStr;

use serde::Serialize;

use super::calcification::Relationship;
use super::thresholds::HabitatClasses;

/// Cautions carried in every JSON output.
pub const CAUTIONS: [&str; 4] = [
    "Screening-level estimate, not a permit determination.",
    "Biological and local factors (coral cover, light, bleaching, reef metabolism, bioerosion) are not modelled; reef net calcification is only weakly predicted by Omega_ar alone.",
    "Warming, when on, uses global-mean SST changes (partly from memory) applied as a delta to the records; changes in variability are not modelled.",
    "Consult local permitting authorities and licensed professionals before acting on these numbers.",
];

/// Output file format.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum OutputFormat {
    #[default]
    Csv,
    Json,
}

impl FromStr for OutputFormat {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "csv" => Ok(OutputFormat::Csv),
            "json" => Ok(OutputFormat::Json),
            o => Err(format!("unknown format \"{o}\" (expected csv or json)")),
        }
    }
}

impl fmt::Display for OutputFormat {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            OutputFormat::Csv => "csv",
            OutputFormat::Json => "json",
        })
    }
}

/// Which table a CSV output holds (JSON always holds all of them).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum OutputTable {
    /// The long-format quantile table (including calcification quantities).
    #[default]
    Quantiles,
    /// First years below each habitat threshold and of zero net calcification.
    Crossings,
    /// Probability of lying below each habitat threshold per horizon year.
    Thresholds,
}

impl FromStr for OutputTable {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "quantiles" => Ok(OutputTable::Quantiles),
            "crossings" => Ok(OutputTable::Crossings),
            "thresholds" => Ok(OutputTable::Thresholds),
            o => Err(format!(
                "unknown table \"{o}\" (expected quantiles, crossings or thresholds)"
            )),
        }
    }
}

/// One row of the long-format table.
#[derive(Clone, Debug, PartialEq)]
pub struct QuantileRow {
    pub pathway: String,
    /// "none" for the base case, else the local scenario's name.
    pub scenario: String,
    pub year: i32,
    /// A season label, or the all-records aggregate ("annual").
    pub season: String,
    /// Quantity name with its unit (e.g. `omega_ar`, `pco2_uatm`).
    pub quantity: String,
    /// Decimals used when writing.
    pub decimals: usize,
    /// The 5, 25, 50, 75 and 95 % quantiles (NaN when no member could be solved).
    pub q: [f64; 5],
    /// Ensemble members that were solved (ensemble off: records).
    pub members: usize,
    /// Calcification quantities: percent of members outside the relationship's fitted
    /// Omega_ar/temperature range (extrapolation), else `None`.
    pub outside_fit_pct: Option<f64>,
}

/// What a crossing row measures.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CrossingKind {
    /// Omega_ar falls strictly below a habitat threshold.
    OmegaArBelow,
    /// Net calcification reaches zero or less.
    NetCalcificationZero,
}

/// First horizon years at which the 5 %, 50 % and 95 % quantiles meet a criterion.
#[derive(Clone, Debug, PartialEq)]
pub struct CrossingRow {
    pub pathway: String,
    pub scenario: String,
    /// Season label, the aggregate, or "worst season" (lowest season quantile each year).
    pub season: String,
    pub kind: CrossingKind,
    /// Human-readable criterion, e.g. "omega_ar below adequate" or "net calcification <= 0
    /// (silverman2009)".
    pub criterion: String,
    /// Threshold value in `threshold_unit`.
    pub threshold: f64,
    pub threshold_unit: &'static str,
    /// First horizon year at which the 5th percentile, the median and the 95th percentile
    /// meet the criterion (`None`: not within the horizon). For the 5th percentile at least
    /// 5 % of the members meet it then (an early warning); for the median at least half; for
    /// the 95th percentile at least 95 % (nearly certain under the model's assumptions).
    pub first_year: [Option<i32>; 3],
    /// True when the criterion is already met by the median at the site's baseline
    /// (sampling conditions).
    pub met_at_baseline: bool,
}

/// Probability of Omega_ar below one threshold at one horizon year.
#[derive(Clone, Debug, PartialEq)]
pub struct ProbabilityRow {
    pub pathway: String,
    pub scenario: String,
    pub year: i32,
    pub season: String,
    /// The class whose lower bound this is.
    pub class_left: String,
    pub threshold_omega_ar: f64,
    /// Percent of members below the threshold.
    pub prob_below_pct: f64,
    /// Class of the median Omega_ar.
    pub median_class: String,
}

/// One pathway as used.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PathwayInfo {
    pub name: String,
    pub source: String,
    /// Atmospheric CO2 at each horizon year, ppm.
    pub xco2_ppm: Vec<f64>,
    /// SST change at 2090 relative to 1995–2014, °C (applied only when warming is on).
    pub warming_2090_c: f64,
    pub warming_source: String,
}

/// One season (or the aggregate) and its baseline.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct GroupInfo {
    pub label: String,
    /// True for the all-records aggregate.
    pub aggregate: bool,
    pub records: usize,
    /// Mean Omega_ar of the records at sampling (central constants).
    pub baseline_omega_ar: f64,
    /// Mean temperature of the records, °C.
    pub baseline_temp_c: f64,
    /// Latest sampling year among the records.
    pub sample_year_max: i32,
}

/// One local scenario as used.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ScenarioInfo {
    pub name: String,
    /// (season, TA offset µmol/kg, DIC offset µmol/kg) per season.
    pub offsets: Vec<(String, f64, f64)>,
    pub start_year: Option<i32>,
}

/// The run's settings, for provenance.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SettingsInfo {
    pub seed: u64,
    /// 0 when the ensemble is off.
    pub members: usize,
    pub disequilibrium: String,
    pub warming: bool,
    pub horizon_years: Vec<i32>,
    pub constants_uncertainty: String,
    pub measurement_uncertainty: String,
    pub record_variability: String,
    pub methods: Vec<(String, String)>,
    pub observed_co2_source: String,
}

/// Everything the outlook produced.
#[derive(Clone, Debug, PartialEq)]
pub struct Outlook {
    pub site: String,
    pub settings: SettingsInfo,
    pub pathways: Vec<PathwayInfo>,
    pub groups: Vec<GroupInfo>,
    pub scenarios: Vec<ScenarioInfo>,
    pub rows: Vec<QuantileRow>,
    pub crossings: Vec<CrossingRow>,
    pub probabilities: Vec<ProbabilityRow>,
    pub classes: HabitatClasses,
    pub relationships: Vec<Relationship>,
    pub calcification_baseline_kg_m2_yr: f64,
    pub calcification_baseline_source: String,
    /// Warnings and notes (range flags, failed members, skipped seasons).
    pub notes: Vec<String>,
}

impl Outlook {
    /// The quantile series of one quantity: (year, [p05, p25, p50, p75, p95]).
    pub fn series(
        &self,
        pathway: &str,
        scenario: &str,
        season: &str,
        quantity: &str,
    ) -> Vec<(i32, [f64; 5])> {
        self.rows
            .iter()
            .filter(|r| {
                r.pathway == pathway
                    && r.scenario == scenario
                    && r.season == season
                    && r.quantity == quantity
            })
            .map(|r| (r.year, r.q))
            .collect()
    }

    /// Writes the outlook in `format` (`table` selects the CSV table).
    pub fn write(
        &self,
        w: &mut dyn Write,
        format: OutputFormat,
        table: OutputTable,
    ) -> io::Result<()> {
        match (format, table) {
            (OutputFormat::Json, _) => self.write_json(w),
            (OutputFormat::Csv, OutputTable::Quantiles) => self.write_quantiles_csv(w),
            (OutputFormat::Csv, OutputTable::Crossings) => self.write_crossings_csv(w),
            (OutputFormat::Csv, OutputTable::Thresholds) => self.write_thresholds_csv(w),
        }
    }

    /// The long-format quantile table as CSV.
    pub fn write_quantiles_csv(&self, w: &mut dyn Write) -> io::Result<()> {
        let mut c = csv::Writer::from_writer(w);
        c.write_record([
            "pathway",
            "scenario",
            "year",
            "season",
            "quantity",
            "p05",
            "p25",
            "p50",
            "p75",
            "p95",
            "members",
            "outside_fit_pct",
        ])?;
        for r in &self.rows {
            let mut rec: Vec<String> = vec![
                r.pathway.clone(),
                r.scenario.clone(),
                r.year.to_string(),
                r.season.clone(),
                r.quantity.clone(),
            ];
            rec.extend(r.q.iter().map(|v| fixed(*v, r.decimals)));
            rec.push(r.members.to_string());
            rec.push(r.outside_fit_pct.map_or(String::new(), |v| fixed(v, 1)));
            c.write_record(&rec)?;
        }
        c.flush()?;
        Ok(())
    }

    /// The crossing table as CSV (empty year: not within the horizon).
    pub fn write_crossings_csv(&self, w: &mut dyn Write) -> io::Result<()> {
        let mut c = csv::Writer::from_writer(w);
        c.write_record([
            "pathway",
            "scenario",
            "season",
            "criterion",
            "threshold",
            "threshold_unit",
            "first_year_p05",
            "first_year_p50",
            "first_year_p95",
            "met_at_baseline",
        ])?;
        for r in &self.crossings {
            let y = |v: Option<i32>| v.map_or(String::new(), |y| y.to_string());
            c.write_record([
                r.pathway.clone(),
                r.scenario.clone(),
                r.season.clone(),
                r.criterion.clone(),
                fixed(r.threshold, 2),
                r.threshold_unit.to_string(),
                y(r.first_year[0]),
                y(r.first_year[1]),
                y(r.first_year[2]),
                r.met_at_baseline.to_string(),
            ])?;
        }
        c.flush()?;
        Ok(())
    }

    /// Probabilities below each habitat threshold as CSV.
    pub fn write_thresholds_csv(&self, w: &mut dyn Write) -> io::Result<()> {
        let mut c = csv::Writer::from_writer(w);
        c.write_record([
            "pathway",
            "scenario",
            "year",
            "season",
            "class_left",
            "threshold_omega_ar",
            "prob_below_pct",
            "median_class",
        ])?;
        for r in &self.probabilities {
            c.write_record([
                r.pathway.clone(),
                r.scenario.clone(),
                r.year.to_string(),
                r.season.clone(),
                r.class_left.clone(),
                fixed(r.threshold_omega_ar, 2),
                fixed(r.prob_below_pct, 1),
                r.median_class.clone(),
            ])?;
        }
        c.flush()?;
        Ok(())
    }

    /// Everything as one JSON document.
    pub fn write_json(&self, w: &mut dyn Write) -> io::Result<()> {
        let doc = JsonDoc::from(self);
        serde_json::to_writer_pretty(&mut *w, &doc).map_err(io::Error::other)?;
        w.write_all(b"\n")
    }
}

/// `v` with `decimals` fixed decimals (rounding rule of [`crate::numfmt`]); NaN or infinite
/// as an empty field; never "-0.00".
pub fn fixed(v: f64, decimals: usize) -> String {
    crate::numfmt::fixed(v, decimals).unwrap_or_default()
}

/// `v` rounded to `decimals` for JSON (`None` for NaN/infinite; −0 becomes 0).
pub fn rounded(v: f64, decimals: usize) -> Option<f64> {
    if !v.is_finite() {
        return None;
    }
    let f = 10f64.powi(decimals as i32);
    let r = (v * f).round() / f;
    Some(if r == 0.0 { 0.0 } else { r })
}

#[derive(Serialize)]
struct JsonDoc<'a> {
    format: &'static str,
    format_version: u32,
    site: &'a str,
    settings: &'a SettingsInfo,
    cautions: [&'static str; 4],
    pathways: Vec<JsonPathway<'a>>,
    seasons: Vec<JsonGroup<'a>>,
    scenarios: &'a [ScenarioInfo],
    quantiles: Vec<JsonRow<'a>>,
    thresholds: JsonThresholds<'a>,
    calcification: JsonCalc<'a>,
    notes: &'a [String],
}

#[derive(Serialize)]
struct JsonPathway<'a> {
    name: &'a str,
    source: &'a str,
    xco2_ppm: Vec<JsonYearValue>,
    warming_2090_c: Option<f64>,
    warming_source: &'a str,
}

#[derive(Serialize)]
struct JsonYearValue {
    year: i32,
    value: Option<f64>,
}

#[derive(Serialize)]
struct JsonGroup<'a> {
    label: &'a str,
    aggregate: bool,
    records: usize,
    baseline_omega_ar: Option<f64>,
    baseline_temp_c: Option<f64>,
    sample_year_max: i32,
}

#[derive(Serialize)]
struct JsonRow<'a> {
    pathway: &'a str,
    scenario: &'a str,
    year: i32,
    season: &'a str,
    quantity: &'a str,
    p05: Option<f64>,
    p25: Option<f64>,
    p50: Option<f64>,
    p75: Option<f64>,
    p95: Option<f64>,
    members: usize,
    #[serde(skip_serializing_if = "Option::is_none")]
    outside_fit_pct: Option<f64>,
}

#[derive(Serialize)]
struct JsonClass<'a> {
    name: &'a str,
    min_omega_ar: Option<f64>,
}

#[derive(Serialize)]
struct JsonCrossing<'a> {
    pathway: &'a str,
    scenario: &'a str,
    season: &'a str,
    kind: CrossingKind,
    criterion: &'a str,
    threshold: Option<f64>,
    threshold_unit: &'a str,
    first_year_p05: Option<i32>,
    first_year_p50: Option<i32>,
    first_year_p95: Option<i32>,
    met_at_baseline: bool,
}

#[derive(Serialize)]
struct JsonProbability<'a> {
    pathway: &'a str,
    scenario: &'a str,
    year: i32,
    season: &'a str,
    class_left: &'a str,
    threshold_omega_ar: Option<f64>,
    prob_below_pct: Option<f64>,
    median_class: &'a str,
}

#[derive(Serialize)]
struct JsonThresholds<'a> {
    source: &'a str,
    classes: Vec<JsonClass<'a>>,
    crossings: Vec<JsonCrossing<'a>>,
    probabilities: Vec<JsonProbability<'a>>,
}

#[derive(Serialize)]
struct JsonRelationship<'a> {
    id: &'a str,
    source: &'a str,
    form: &'a str,
    parameters: &'a str,
    units: &'a str,
    fitted_omega_ar_min: Option<f64>,
    fitted_omega_ar_max: Option<f64>,
    fitted_temp_c_min: Option<f64>,
    fitted_temp_c_max: Option<f64>,
    scope: &'a str,
    status: &'a str,
}

#[derive(Serialize)]
struct JsonCalc<'a> {
    baseline_rate_kg_m2_yr: Option<f64>,
    baseline_rate_source: &'a str,
    method: &'static str,
    relationships: Vec<JsonRelationship<'a>>,
    zero_years: Vec<JsonCrossing<'a>>,
}

fn json_crossing(r: &CrossingRow) -> JsonCrossing<'_> {
    JsonCrossing {
        pathway: &r.pathway,
        scenario: &r.scenario,
        season: &r.season,
        kind: r.kind,
        criterion: &r.criterion,
        threshold: rounded(r.threshold, 4),
        threshold_unit: r.threshold_unit,
        first_year_p05: r.first_year[0],
        first_year_p50: r.first_year[1],
        first_year_p95: r.first_year[2],
        met_at_baseline: r.met_at_baseline,
    }
}

impl<'a> From<&'a Outlook> for JsonDoc<'a> {
    fn from(o: &'a Outlook) -> Self {
        let years = &o.settings.horizon_years;
        JsonDoc {
            format: "calcisite-outlook",
            format_version: 1,
            site: &o.site,
            settings: &o.settings,
            cautions: CAUTIONS,
            pathways: o
                .pathways
                .iter()
                .map(|p| JsonPathway {
                    name: &p.name,
                    source: &p.source,
                    xco2_ppm: years
                        .iter()
                        .zip(&p.xco2_ppm)
                        .map(|(y, v)| JsonYearValue {
                            year: *y,
                            value: rounded(*v, 3),
                        })
                        .collect(),
                    warming_2090_c: rounded(p.warming_2090_c, 3),
                    warming_source: &p.warming_source,
                })
                .collect(),
            seasons: o
                .groups
                .iter()
                .map(|g| JsonGroup {
                    label: &g.label,
                    aggregate: g.aggregate,
                    records: g.records,
                    baseline_omega_ar: rounded(g.baseline_omega_ar, 4),
                    baseline_temp_c: rounded(g.baseline_temp_c, 3),
                    sample_year_max: g.sample_year_max,
                })
                .collect(),
            scenarios: &o.scenarios,
            quantiles: o
                .rows
                .iter()
                .map(|r| JsonRow {
                    pathway: &r.pathway,
                    scenario: &r.scenario,
                    year: r.year,
                    season: &r.season,
                    quantity: &r.quantity,
                    p05: rounded(r.q[0], r.decimals),
                    p25: rounded(r.q[1], r.decimals),
                    p50: rounded(r.q[2], r.decimals),
                    p75: rounded(r.q[3], r.decimals),
                    p95: rounded(r.q[4], r.decimals),
                    members: r.members,
                    outside_fit_pct: r.outside_fit_pct.and_then(|v| rounded(v, 1)),
                })
                .collect(),
            thresholds: JsonThresholds {
                source: &o.classes.source,
                classes: o
                    .classes
                    .bands
                    .iter()
                    .map(|b| JsonClass {
                        name: &b.name,
                        min_omega_ar: b.min_omega_ar,
                    })
                    .collect(),
                crossings: o
                    .crossings
                    .iter()
                    .filter(|r| r.kind == CrossingKind::OmegaArBelow)
                    .map(json_crossing)
                    .collect(),
                probabilities: o
                    .probabilities
                    .iter()
                    .map(|r| JsonProbability {
                        pathway: &r.pathway,
                        scenario: &r.scenario,
                        year: r.year,
                        season: &r.season,
                        class_left: &r.class_left,
                        threshold_omega_ar: rounded(r.threshold_omega_ar, 4),
                        prob_below_pct: rounded(r.prob_below_pct, 1),
                        median_class: &r.median_class,
                    })
                    .collect(),
            },
            calcification: JsonCalc {
                baseline_rate_kg_m2_yr: rounded(o.calcification_baseline_kg_m2_yr, 4),
                baseline_rate_source: &o.calcification_baseline_source,
                method: "relative factor G(Omega_ar, T)/G(baseline season mean Omega_ar, T) per \
                         member; net calcification = baseline rate x factor; quantities \
                         calc_change_pct_<id> and net_calc_kg_m2_yr_<id> in `quantiles`",
                relationships: o
                    .relationships
                    .iter()
                    .map(|r| JsonRelationship {
                        id: r.id,
                        source: r.source,
                        form: r.form_text,
                        parameters: r.parameters,
                        units: r.units,
                        fitted_omega_ar_min: rounded(r.omega_range.0, 3),
                        fitted_omega_ar_max: rounded(r.omega_range.1, 3),
                        fitted_temp_c_min: r.temp_range_c.and_then(|t| rounded(t.0, 2)),
                        fitted_temp_c_max: r.temp_range_c.and_then(|t| rounded(t.1, 2)),
                        scope: r.scope,
                        status: r.status,
                    })
                    .collect(),
                zero_years: o
                    .crossings
                    .iter()
                    .filter(|r| r.kind == CrossingKind::NetCalcificationZero)
                    .map(json_crossing)
                    .collect(),
            },
            notes: &o.notes,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fixed_formatting_is_stable() {
        assert_eq!(fixed(1.23456, 4), "1.2346");
        assert_eq!(fixed(-0.00001, 2), "0.00");
        assert_eq!(fixed(-1.5, 1), "-1.5");
        assert_eq!(fixed(f64::NAN, 3), "");
        assert_eq!(rounded(1.23456, 2), Some(1.23));
        assert_eq!(rounded(-0.0001, 2), Some(0.0));
        assert_eq!(rounded(f64::INFINITY, 2), None);
    }

    #[test]
    fn formats_parse() {
        assert_eq!("JSON".parse::<OutputFormat>().unwrap(), OutputFormat::Json);
        assert!("xml".parse::<OutputFormat>().is_err());
        assert_eq!(
            "crossings".parse::<OutputTable>().unwrap(),
            OutputTable::Crossings
        );
    }
}
