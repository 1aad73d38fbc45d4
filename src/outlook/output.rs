//! Views of the typed outlook ([`super::result`]) in machine-readable form (design notes,
//! "Output conventions"): long-format CSV (one row per pathway, scenario, year, season and quantity,
//! with quantile columns) and JSON with the same content plus the threshold-crossing table,
//! the probabilities of lying below each habitat threshold and the calcification outlook.
//!
//! Numbers are written with fixed decimals per quantity (CSV) or rounded to the same decimals
//! (JSON), so equal inputs give byte-identical files. Every numeric field carries its unit in
//! its name (`pco2_uatm`, `net_calc_kg_m2_yr_...`, `threshold_omega_ar`, `chance_mean_below_pct`, `pct_time_below`).

use std::borrow::Cow;
use std::fmt;
use std::io::{self, Write};
use std::str::FromStr;

use serde::Serialize;

use super::calcification::NO_SITE_RATE;
use super::result::{
    Criterion, Crossing, CrossingKind, Note, Outlook, QuantilePoint, QuantileSeries, Quantity,
    ScenarioInfo, SettingsInfo,
};

/// Cautions carried in every JSON output.
pub const CAUTIONS: [&str; 4] = [
    "Screening-level estimate, not a permit determination.",
    "Biological and local factors (coral cover, light, bleaching, reef metabolism, bioerosion) are not modelled; reef net calcification is only weakly predicted by Omega_ar alone.",
    "Warming, when on, uses global-mean SST changes (partly from memory) applied as a delta to the records; changes in variability are not modelled.",
    "Consult local permitting authorities and licensed professionals before acting on these numbers.",
];

/// What the calcification outlook leaves out.
pub const NOT_MODELLED: &str = "reef carbonate budget (gross calcification scaled by cover, \
     minus bioerosion and sediment dissolution): not modelled, since no term's source is named \
     here; no relationship has a dissolution term, so no net-zero calcification year is given";

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
    /// First years below each habitat threshold.
    Crossings,
    /// Per horizon year and habitat threshold: the chance that the season's mean lies below
    /// it (uncertainty) and the share of time below it (variability).
    Thresholds,
    /// The thermal-stress outlook: observed and projected annual maximum DHW.
    Heat,
    /// Exposure of sensor series: hours per day and share of time below each threshold.
    Exposure,
    /// Exposure of sensor series: the mean diel cycle by local hour.
    Diel,
}

impl FromStr for OutputTable {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "quantiles" => Ok(OutputTable::Quantiles),
            "crossings" => Ok(OutputTable::Crossings),
            "thresholds" => Ok(OutputTable::Thresholds),
            "heat" => Ok(OutputTable::Heat),
            "exposure" => Ok(OutputTable::Exposure),
            "diel" => Ok(OutputTable::Diel),
            o => Err(format!(
                "unknown table \"{o}\" (expected quantiles, crossings, thresholds, heat, \
                 exposure or diel)"
            )),
        }
    }
}

/// The CSV/JSON name of a quantity, with its unit.
pub fn quantity_name(q: Quantity) -> Cow<'static, str> {
    match q {
        Quantity::OmegaAr => "omega_ar".into(),
        Quantity::OmegaCa => "omega_ca".into(),
        Quantity::PhT => "ph_t".into(),
        Quantity::Pco2 => "pco2_uatm".into(),
        Quantity::Dic => "dic_umol_kg".into(),
        Quantity::Ta => "ta_umol_kg".into(),
        Quantity::Co3 => "co3_umol_kg".into(),
        Quantity::TempC => "temp_c".into(),
        Quantity::OmegaArChange => "omega_ar_change".into(),
        Quantity::PhTChange => "ph_t_change".into(),
        Quantity::CalcChangePct(id) => format!("calc_change_pct_{}", id.as_str()).into(),
        Quantity::NetCalc(id) => format!("net_calc_kg_m2_yr_{}", id.as_str()).into(),
        Quantity::Nec(id) => format!("nec_mmol_m2_d_{}", id.as_str()).into(),
        Quantity::NecChange(id) => format!("nec_change_mmol_m2_d_{}", id.as_str()).into(),
    }
}

/// Decimals a quantity is written with.
pub fn quantity_decimals(q: Quantity) -> usize {
    match q {
        Quantity::OmegaAr | Quantity::OmegaCa | Quantity::PhT => 4,
        Quantity::OmegaArChange | Quantity::PhTChange => 4,
        Quantity::Pco2 | Quantity::Dic | Quantity::Ta | Quantity::Co3 => 2,
        Quantity::TempC => 3,
        Quantity::CalcChangePct(_) => 2,
        Quantity::NetCalc(_) => 4,
        Quantity::Nec(_) | Quantity::NecChange(_) => 2,
    }
}

/// A crossing criterion as written: its text, threshold and the threshold's unit.
pub fn criterion_text(c: &Criterion) -> (String, f64, &'static str) {
    match c {
        Criterion::OmegaArBelow {
            class,
            threshold_omega_ar,
        } => (
            format!("omega_ar below {class}"),
            *threshold_omega_ar,
            "omega_ar",
        ),
        Criterion::NetDissolution {
            relationship,
            omega_zero,
        } => (
            format!("nec at or below zero ({})", relationship.as_str()),
            *omega_zero,
            "omega_ar",
        ),
    }
}

impl fmt::Display for Note {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Note::SeasonWithoutRecords { season } => {
                write!(
                    f,
                    "season \"{season}\" has no usable records; not projected"
                )
            }
            Note::RelationshipNotScalable {
                relationship,
                group,
                baseline_omega_ar,
            } => write!(
                f,
                "calcification relationship {} cannot be scaled for \"{group}\": baseline \
                 Omega_ar {baseline_omega_ar:.3} gives no positive rate",
                relationship.as_str()
            ),
            Note::BaselineOutsideFit {
                relationship,
                group,
                baseline_omega_ar,
                baseline_temp_c,
            } => write!(
                f,
                "calcification relationship {}: the baseline of \"{group}\" (Omega_ar \
                 {baseline_omega_ar:.3}, {baseline_temp_c:.2} degC) lies outside its fitted \
                 range (extrapolation)",
                relationship.as_str()
            ),
            Note::ConstantsRange {
                outside,
                total,
                warming,
                examples,
            } => write!(
                f,
                "constants range: {outside} of {total} record conditions (record temperature{}) \
                 lie outside a constant set's fitted range; they were solved anyway. Examples: \
                 {}",
                if *warming {
                    " and warmed temperatures"
                } else {
                    ""
                },
                examples.join("; ")
            ),
            Note::UnsolvedMembers {
                member_years,
                first,
            } => write!(
                f,
                "{member_years} member-years could not be solved and were left out of the \
                 quantiles; first: {first}"
            ),
            Note::NecUnavailable {
                relationship,
                reason,
            } => write!(
                f,
                "reef net calcification ({}) is not given: {reason}",
                relationship.as_str()
            ),
        }
    }
}

/// One row of the long-format quantile table.
pub struct QuantileRow<'a> {
    pub pathway: &'a str,
    pub scenario: &'a str,
    pub season: &'a str,
    pub quantity: Quantity,
    pub point: &'a QuantilePoint,
}

impl Outlook {
    /// The rows of the long-format table: by pathway, scenario, year, group and quantity.
    pub fn quantile_rows(&self) -> Vec<QuantileRow<'_>> {
        let mut rows = Vec::with_capacity(self.series.len() * self.settings.horizon_years.len());
        for (pid, p) in self.pathway_ids() {
            for (sid, scenario) in self.scenario_ids() {
                let mut block: Vec<(&QuantileSeries, std::slice::Iter<'_, QuantilePoint>)> = self
                    .series
                    .iter()
                    .filter(|s| s.pathway == pid && s.scenario == sid)
                    .map(|s| (s, s.points.iter()))
                    .collect();
                // Year by year: the next point of every series of the block.
                loop {
                    let mut any = false;
                    for (s, points) in block.iter_mut() {
                        if let Some(point) = points.next() {
                            any = true;
                            rows.push(QuantileRow {
                                pathway: &p.name,
                                scenario,
                                season: self.group_label(s.group),
                                quantity: s.quantity,
                                point,
                            });
                        }
                    }
                    if !any {
                        break;
                    }
                }
            }
        }
        rows
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
            (OutputFormat::Csv, OutputTable::Heat) => {
                super::thermal::output::write_heat_csv(self.heat.as_ref(), w)
            }
            (OutputFormat::Csv, OutputTable::Exposure) => {
                super::exposure::output::write_exposure_csv(self, w)
            }
            (OutputFormat::Csv, OutputTable::Diel) => {
                super::exposure::output::write_diel_csv(self, w)
            }
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
        for r in self.quantile_rows() {
            let d = quantity_decimals(r.quantity);
            let mut rec: Vec<String> = vec![
                r.pathway.to_string(),
                r.scenario.to_string(),
                r.point.year.to_string(),
                r.season.to_string(),
                quantity_name(r.quantity).into_owned(),
            ];
            rec.extend(r.point.q.levels().iter().map(|v| fixed(*v, d)));
            rec.push(r.point.members.to_string());
            rec.push(
                r.point
                    .outside_fit_pct
                    .map_or(String::new(), |v| fixed(v, 1)),
            );
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
            let (criterion, threshold, unit) = criterion_text(&r.criterion);
            c.write_record([
                self.pathway(r.pathway)
                    .map_or("", |p| p.name.as_str())
                    .to_string(),
                self.scenario_name(r.scenario).to_string(),
                self.crossing_group_label(r.group).to_string(),
                criterion,
                fixed(threshold, 2),
                unit.to_string(),
                y(r.first_year.p05),
                y(r.first_year.p50),
                y(r.first_year.p95),
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
            "chance_mean_below_pct",
            "pct_time_below",
            "median_class",
        ])?;
        for r in &self.probabilities {
            let time = self.time_below_at(
                Some(r.pathway),
                r.scenario,
                r.group,
                Some(r.year),
                r.threshold_omega_ar,
            );
            c.write_record([
                self.pathway(r.pathway)
                    .map_or("", |p| p.name.as_str())
                    .to_string(),
                self.scenario_name(r.scenario).to_string(),
                r.year.to_string(),
                self.group_label(r.group).to_string(),
                r.class_left.clone(),
                fixed(r.threshold_omega_ar, 2),
                fixed(r.prob_below_pct, 1),
                fixed(time.unwrap_or(f64::NAN), 1),
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
    // The same rounding as the CSV (`crate::numfmt`), so the two forms never disagree.
    let r: f64 = crate::numfmt::fixed(v, decimals)?.parse().ok()?;
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
    notes: Vec<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    thermal_stress: Option<super::thermal::output::JsonHeat<'a>>,
    /// Structural uncertainty (sites with source water): mean Omega_ar of the records
    /// projected on their own by each rule, central values.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    projection_rules: Vec<JsonRules<'a>>,
    /// Variability: the exposure metrics of sensor series.
    exposure: super::exposure::output::JsonExposure<'a>,
}

#[derive(Serialize)]
struct JsonRules<'a> {
    pathway: &'a str,
    season: &'a str,
    year: i32,
    omega_ar_ratio: Option<f64>,
    omega_ar_additive: Option<f64>,
    omega_ar_source_offsets: Option<f64>,
    spread: Option<f64>,
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
    quantity: Cow<'static, str>,
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
    criterion: String,
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
    /// Uncertainty: chance that the season's mean lies below the threshold.
    chance_mean_below_pct: Option<f64>,
    /// Variability: time-weighted share of the records below the threshold.
    pct_time_below: Option<f64>,
    median_class: &'a str,
}

#[derive(Serialize)]
struct JsonTimeBelow<'a> {
    season: &'a str,
    class_left: &'a str,
    threshold_omega_ar: Option<f64>,
    pct_time_below: Option<f64>,
}

#[derive(Serialize)]
struct JsonThresholds<'a> {
    source: &'a str,
    classes: Vec<JsonClass<'a>>,
    crossings: Vec<JsonCrossing<'a>>,
    probabilities: Vec<JsonProbability<'a>>,
    /// Share of time below each threshold in the records as sampled.
    time_below_as_sampled: Vec<JsonTimeBelow<'a>>,
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
    measures: &'a str,
}

#[derive(Serialize)]
struct JsonCalc<'a> {
    /// Reef-community NEC from field relationships: the rows, the site's cover, measured NEC
    /// and the row closest to its habitat.
    nec: &'a super::nec::NecSettings,
    baseline_rate_kg_m2_yr: Option<f64>,
    baseline_rate_source: &'a str,
    not_modelled: &'static str,
    method: &'static str,
    relationships: Vec<JsonRelationship<'a>>,
}

fn json_crossing<'a>(o: &'a Outlook, r: &Crossing) -> JsonCrossing<'a> {
    let (criterion, threshold, unit) = criterion_text(&r.criterion);
    JsonCrossing {
        pathway: o.pathway(r.pathway).map_or("", |p| p.name.as_str()),
        scenario: o.scenario_name(r.scenario),
        season: o.crossing_group_label(r.group),
        kind: r.criterion.kind(),
        criterion,
        threshold: rounded(threshold, 4),
        threshold_unit: unit,
        first_year_p05: r.first_year.p05,
        first_year_p50: r.first_year.p50,
        first_year_p95: r.first_year.p95,
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
                .quantile_rows()
                .into_iter()
                .map(|r| {
                    let d = quantity_decimals(r.quantity);
                    let q = &r.point.q;
                    JsonRow {
                        pathway: r.pathway,
                        scenario: r.scenario,
                        year: r.point.year,
                        season: r.season,
                        quantity: quantity_name(r.quantity),
                        p05: rounded(q.p05, d),
                        p25: rounded(q.p25, d),
                        p50: rounded(q.p50, d),
                        p75: rounded(q.p75, d),
                        p95: rounded(q.p95, d),
                        members: r.point.members,
                        outside_fit_pct: r.point.outside_fit_pct.and_then(|v| rounded(v, 1)),
                    }
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
                    .filter(|r| r.criterion.kind() == CrossingKind::OmegaArBelow)
                    .map(|r| json_crossing(o, r))
                    .collect(),
                probabilities: o
                    .probabilities
                    .iter()
                    .map(|r| JsonProbability {
                        pathway: o.pathway(r.pathway).map_or("", |p| p.name.as_str()),
                        scenario: o.scenario_name(r.scenario),
                        year: r.year,
                        season: o.group_label(r.group),
                        class_left: &r.class_left,
                        threshold_omega_ar: rounded(r.threshold_omega_ar, 4),
                        chance_mean_below_pct: rounded(r.prob_below_pct, 1),
                        pct_time_below: o
                            .time_below_at(
                                Some(r.pathway),
                                r.scenario,
                                r.group,
                                Some(r.year),
                                r.threshold_omega_ar,
                            )
                            .and_then(|v| rounded(v, 1)),
                        median_class: &r.median_class,
                    })
                    .collect(),
                time_below_as_sampled: o
                    .time_below
                    .iter()
                    .filter(|t| t.year.is_none())
                    .map(|t| JsonTimeBelow {
                        season: o.group_label(t.group),
                        class_left: &t.class_left,
                        threshold_omega_ar: rounded(t.threshold_omega_ar, 4),
                        pct_time_below: rounded(t.pct_time_below, 1),
                    })
                    .collect(),
            },
            calcification: JsonCalc {
                nec: &o.nec,
                baseline_rate_kg_m2_yr: o.site_rate.as_ref().and_then(|r| rounded(r.kg_m2_yr, 4)),
                baseline_rate_source: o
                    .site_rate
                    .as_ref()
                    .map_or(NO_SITE_RATE, |r| r.source.as_str()),
                not_modelled: NOT_MODELLED,
                method: "paired: relative factor G(Omega_ar, T in the year)/G(Omega_ar, T of the \
                         same member at present: same record draws, constants and temperature); \
                         quantities calc_change_pct_<id> in `quantiles`; net calcification \
                         (net_calc_kg_m2_yr_<id>) = the site's measured rate x factor, only when \
                         the site file gives a measured rate",
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
                        measures: r.measures,
                    })
                    .collect(),
            },
            notes: o.notes.iter().map(|n| n.to_string()).collect(),
            thermal_stress: o.heat.as_ref().map(Into::into),
            projection_rules: o
                .rule_comparison
                .iter()
                .map(|r| JsonRules {
                    pathway: o.pathway(r.pathway).map_or("", |p| p.name.as_str()),
                    season: o.group_label(r.group),
                    year: r.year,
                    omega_ar_ratio: rounded(r.omega_ar[0], 4),
                    omega_ar_additive: rounded(r.omega_ar[1], 4),
                    omega_ar_source_offsets: rounded(r.omega_ar[2], 4),
                    spread: rounded(r.spread(), 4),
                })
                .collect(),
            exposure: o.into(),
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
