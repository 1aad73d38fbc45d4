//! The report model: plain data that a report is built from.
//!
//! The model carries numbers as numbers (f64, i32) so that `--data-out` can write them and the
//! figures can plot them. The template never sees these raw numbers: [`super::view`] turns the
//! model into pre-formatted strings (Typst has no printf) and that view is what the template
//! reads as `/data.json`.
//!
//! Conventions:
//! * Ω_ar is dimensionless; pH on the total scale; temperature in °C; TA, DIC in µmol/kg;
//!   pCO2 in µatm; pressure in dbar.
//! * Pathways are referred to by [`PathwayInfo::id`]; seasons by their name as given in the
//!   site description. Lists are kept in the order given (the report shows them in that order),
//!   so give pathways from the lowest to the highest emissions.
//! * A missing value is `None` (or a non-finite f64, which is shown as a dash).

use serde::{Deserialize, Serialize};

mod basis;
mod exposure;
mod thermal;
pub use basis::*;
pub use exposure::*;
pub use thermal::*;

/// Everything one report (one site or a comparison of several) is made from.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ReportModel {
    /// Report title, e.g. "Aragonite saturation outlook".
    pub title: String,
    /// Optional line under the title.
    pub subtitle: Option<String>,
    /// "Prepared for" line on the first page.
    pub prepared_for: Option<String>,
    /// "Prepared by" line on the first page.
    pub prepared_by: Option<String>,
    /// Name and version of the tool that produced the numbers.
    pub tool: ToolInfo,
    /// Date of the report. Taken from the inputs (e.g. the newest sample date) so that the same
    /// inputs give the same PDF; `SOURCE_DATE_EPOCH`, when set, overrides it at render time.
    pub timestamp: ReportTime,
    /// Ω_ar threshold classes used for verdicts, crossing years and figure bands.
    pub thresholds: ThresholdClasses,
    /// Horizon years for the verdict and outlook tables, ascending (e.g. 2030, 2050, 2100).
    pub horizons: Vec<i32>,
    /// The CO2 pathways, lowest emissions first.
    pub pathways: Vec<PathwayInfo>,
    /// One entry per site; more than one makes a comparison report.
    pub sites: Vec<SiteReport>,
    /// Pathway whose end-horizon Ω_ar ranks sites in a comparison. `None`: the middle pathway.
    pub ranking_pathway: Option<String>,
    /// Limitations to list in addition to the built-in ones (one sentence each).
    pub extra_limitations: Vec<String>,
    /// Tool version, input hashes, settings and seed.
    pub reproducibility: Reproducibility,
    /// Whether to add the per-sample chemistry appendix.
    pub include_appendix: bool,
    /// The `--data-out` file, named in the appendix with its digest. Set by whoever writes it
    /// (after serialising the model, so the file cannot contain its own digest).
    #[serde(skip)]
    pub data_out: Option<OutputFile>,
    /// Indices into `sites` of the sites held as ranking summaries only (a comparison of more
    /// sites than it shows in detail): they are ranked but get no section or figures of their
    /// own. Empty: every site is shown in full.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub summary_only: Vec<usize>,
}

/// An output file written beside the report: its name and SHA-256.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct OutputFile {
    /// File name only (no folder of the machine it was written on).
    pub name: String,
    /// Lower-case hex SHA-256 of the bytes written.
    pub sha256: String,
}

/// Name and version of the tool.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ToolInfo {
    pub name: String,
    pub version: String,
}

/// A UTC date and time (the report's date and the PDF's creation timestamp).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
pub struct ReportTime {
    pub year: i32,
    pub month: u8,
    pub day: u8,
    pub hour: u8,
    pub minute: u8,
    pub second: u8,
}

impl ReportTime {
    /// A date at midnight UTC; `None` if the date does not exist.
    pub fn from_ymd(year: i32, month: u8, day: u8) -> Option<Self> {
        chrono::NaiveDate::from_ymd_opt(year, u32::from(month), u32::from(day))?;
        Some(Self {
            year,
            month,
            day,
            hour: 0,
            minute: 0,
            second: 0,
        })
    }

    /// Seconds since 1970-01-01T00:00:00Z (as in `SOURCE_DATE_EPOCH`); `None` if out of range.
    pub fn from_unix(seconds: i64) -> Option<Self> {
        use chrono::{Datelike, Timelike};
        let dt = chrono::DateTime::from_timestamp(seconds, 0)?;
        Some(Self {
            year: dt.year(),
            month: u8::try_from(dt.month()).ok()?,
            day: u8::try_from(dt.day()).ok()?,
            hour: u8::try_from(dt.hour()).ok()?,
            minute: u8::try_from(dt.minute()).ok()?,
            second: u8::try_from(dt.second()).ok()?,
        })
    }

    /// Parses the value of `SOURCE_DATE_EPOCH` (decimal seconds since the Unix epoch).
    pub fn from_source_date_epoch(value: &str) -> Result<Self, String> {
        let trimmed = value.trim();
        let seconds: i64 = trimmed.parse().map_err(|_| {
            format!(
                "SOURCE_DATE_EPOCH={value:?} is not a whole number of seconds since 1970-01-01 UTC"
            )
        })?;
        Self::from_unix(seconds)
            .filter(|t| (1..=9999).contains(&t.year))
            .ok_or_else(|| format!("SOURCE_DATE_EPOCH={value:?} is outside years 1–9999"))
    }

    /// ISO 8601 date, e.g. `2025-03-14`.
    pub fn iso_date(&self) -> String {
        format!("{:04}-{:02}-{:02}", self.year, self.month, self.day)
    }

    /// ISO 8601 date and time in UTC, e.g. `2025-03-14T00:00:00Z`.
    pub fn iso_datetime(&self) -> String {
        format!(
            "{}T{:02}:{:02}:{:02}Z",
            self.iso_date(),
            self.hour,
            self.minute,
            self.second
        )
    }
}

/// Ω_ar threshold classes: `levels` descending, `labels` one more than `levels`, from the
/// highest class (Ω_ar ≥ levels\[0\]) to the lowest (Ω_ar < the last level).
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ThresholdClasses {
    pub levels: Vec<f64>,
    pub labels: Vec<String>,
    /// Where the levels and labels come from (shown in Methods).
    pub citation: String,
    /// Whether the levels were checked against their source. Levels that were not are printed
    /// with a plain-words caution and shade or label no value (see [`ThresholdClasses::shade`]).
    pub checked: bool,
}

impl ThresholdClasses {
    /// Index of the class a value falls in (0 = highest class). `None` for a non-finite value.
    pub fn classify(&self, omega: f64) -> Option<usize> {
        if !omega.is_finite() {
            return None;
        }
        Some(
            self.levels
                .iter()
                .take_while(|&&level| omega < level)
                .count(),
        )
    }

    /// The class that shades and labels a value printed as `printed` (the value rounded as the
    /// report prints it, so that one printed number always has one class): `None` for a
    /// non-finite value, and for every value when the levels were not checked against their
    /// source.
    pub fn shade(&self, printed: f64) -> Option<usize> {
        if self.checked {
            self.classify(printed)
        } else {
            None
        }
    }

    /// Checks the shape: levels finite, positive and strictly descending; one label more than
    /// levels.
    pub fn validate(&self) -> Result<(), String> {
        if self.levels.is_empty() {
            return Err("threshold classes: at least one Ω_ar level is needed".into());
        }
        if self.levels.iter().any(|l| !l.is_finite() || *l <= 0.0) {
            return Err("threshold classes: every Ω_ar level must be a positive number".into());
        }
        if self.levels.windows(2).any(|w| w[0] <= w[1]) {
            return Err("threshold classes: Ω_ar levels must be strictly descending".into());
        }
        if self.labels.len() != self.levels.len() + 1 {
            return Err(format!(
                "threshold classes: {} levels need {} labels, got {}",
                self.levels.len(),
                self.levels.len() + 1,
                self.labels.len()
            ));
        }
        Ok(())
    }
}

/// One atmospheric CO2 pathway.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct PathwayInfo {
    /// Short id used to refer to the pathway, e.g. "ssp2-4.5".
    pub id: String,
    /// Display label, e.g. "SSP2-4.5".
    pub label: String,
    /// Source of the CO2 (and warming) series.
    pub citation: String,
    /// Optional one-line description (e.g. "user-defined from local-plan.csv").
    pub description: Option<String>,
}

/// Everything about one site.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SiteReport {
    /// Short id (from the site file), used in figure file names; any text is accepted.
    pub id: String,
    pub name: String,
    /// Free-text location (region, country).
    pub location: Option<String>,
    pub latitude: Option<f64>,
    pub longitude: Option<f64>,
    pub depth_m: Option<f64>,
    /// Habitat or restoration context, one line.
    pub habitat: Option<String>,
    /// Shown prominently when set, e.g. "Demo data: an invented scenario, not measurements."
    pub data_notice: Option<String>,
    pub coverage: Coverage,
    pub qc: Vec<QcFinding>,
    /// Per-season statistics from the records, in season order.
    pub baseline: Vec<SeasonBaseline>,
    /// Season used for the verdicts, the fan charts and the ranking. `None`: the season with the
    /// lowest baseline mean Ω_ar.
    pub limiting_season: Option<String>,
    pub projection: Vec<PathwayProjection>,
    pub crossings: Vec<Crossing>,
    /// Chance that Ω_ar is below each level (optional; shown with the crossing years).
    pub probabilities: Vec<BelowProbability>,
    /// Share of time below each level (variability of the water, not uncertainty).
    pub time_below: Vec<TimeBelow>,
    pub calcification: Vec<CalcificationOutlook>,
    pub local_scenarios: Vec<LocalScenario>,
    /// Thermal stress from the site's temperature record; `None`: the site has none.
    pub thermal: Option<ThermalOutlook>,
    /// Structural uncertainty at a site with offshore source water: the three projection
    /// rules compared (empty without source water).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub projection_rules: Vec<RuleRow>,
    /// Exposure of the site's sensor series (hours per day below each level, diel cycle).
    #[serde(default)]
    pub exposure: SiteExposure,
    pub methods: Methods,
    /// The record files with what was done to their values (for the appendix).
    pub record_files: Vec<RecordFile>,
    /// Every sample for the appendix (only used when the appendix is requested).
    pub samples: Vec<SampleRow>,
    /// The restoration plan (the comparison evaluates the projection at its end year).
    #[serde(default)]
    pub plan: SitePlan,
    /// Records by kind, years covered and how TA was obtained.
    #[serde(default)]
    pub data_basis: DataBasis,
}

/// One record file of a site.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct RecordFile {
    /// Path relative to the site file (as written there).
    pub path: String,
    /// A sensor series (listed as daily summaries in the appendix) rather than bottle samples.
    pub sensor: bool,
    /// The conversions applied to the file's values (each to every row that has the value).
    pub conversions: Vec<RowFlag>,
}

/// What happened to a sample's values between the record file and the report: a conversion, an
/// estimate or a quality-control note (the appendix shows each as a letter with a key).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum RowFlag {
    /// Depth in m taken as pressure in dbar.
    DepthAsPressure,
    /// TA or DIC given in µmol/L, converted to µmol/kg with the TEOS-10 in-situ density.
    PerLitre,
    /// TA or DIC given in mmol/kg, multiplied by 1000.
    MmolPerKg,
    /// pH converted from the seawater, free or NBS scale to the total scale.
    PhScale,
    /// xCO2 (ppm, dry air) converted to pCO2.
    Xco2,
    /// TA not measured: estimated from the site's TA–salinity relationship.
    TaEstimated,
    /// TA estimated at a salinity outside the range of the bottles it was fitted to.
    TaFitExtrapolated,
    /// Solved from pH with pCO2 or fCO2, a poorly conditioned pair.
    PhCo2Pair,
    /// Measured and calculated values disagree beyond the tolerance.
    Inconsistent,
    /// Brackish water: Ω_ar indicative only.
    Brackish,
    /// Salinity below the site's floor: not in the baseline or outlook.
    BelowSalinityFloor,
    /// Not used in the baseline or outlook (no usable carbonate pair, or below the floor).
    NotUsed,
}

/// Data coverage of a site's records.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Coverage {
    /// Record files as given (display only; hashes are in [`Reproducibility`]).
    pub record_files: Vec<String>,
    pub n_records: usize,
    /// Records used in the baseline and projection (after QC).
    pub n_used: usize,
    /// ISO dates.
    pub first_date: String,
    pub last_date: String,
    pub stations: Vec<String>,
    pub seasons: Vec<SeasonCoverage>,
}

/// Coverage of one season.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SeasonCoverage {
    pub season: String,
    /// Which months the season spans, e.g. "Dec–Feb".
    pub months: String,
    /// The same months as numbers (1 = January), in the season's order.
    #[serde(default)]
    pub month_numbers: Vec<u32>,
    pub n_records: usize,
    pub n_used: usize,
    /// Number of distinct calendar years with at least one used record.
    pub n_years: usize,
    pub first_date: Option<String>,
    pub last_date: Option<String>,
}

/// Severity of a quality-control finding.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum QcLevel {
    /// Worth knowing; the records are used.
    Note,
    /// Used, but the reader should weigh them (e.g. outside a constant set's fitted range).
    Warning,
    /// Left out of the baseline and projection.
    Excluded,
}

/// One quality-control finding (grouped: one line per kind of problem).
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct QcFinding {
    pub level: QcLevel,
    /// How many records it concerns.
    pub count: usize,
    pub message: String,
    /// Where, e.g. "records.csv rows 12, 15, 40".
    pub location: Option<String>,
}

/// Mean, standard deviation and range of one quantity in one season.
#[derive(Debug, Clone, Copy, Serialize, Deserialize)]
pub struct Stat {
    pub mean: f64,
    /// Sample standard deviation; non-finite (NaN) when there is only one value.
    pub sd: f64,
    pub min: f64,
    pub max: f64,
}

/// Baseline statistics of one season.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SeasonBaseline {
    pub season: String,
    /// Records used.
    pub n: usize,
    pub omega_ar: Stat,
    pub ph_t: Stat,
    pub temp_c: Stat,
    pub salinity: Option<Stat>,
    pub ta: Option<Stat>,
    pub dic: Option<Stat>,
    pub pco2: Option<Stat>,
    pub omega_ca: Option<Stat>,
}

/// The 5, 25, 50, 75 and 95 % quantiles of an ensemble.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Quantiles {
    pub p05: f64,
    pub p25: f64,
    pub p50: f64,
    pub p75: f64,
    pub p95: f64,
}

/// The projection ensemble of one pathway, summarised per season.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct PathwayProjection {
    /// [`PathwayInfo::id`].
    pub pathway: String,
    pub seasons: Vec<SeasonSeries>,
}

/// Projected quantiles over the years for one season.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SeasonSeries {
    pub season: String,
    /// Ascending years; include the horizon years (tables look them up exactly).
    pub points: Vec<ProjectionPoint>,
}

/// Quantiles in one year.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ProjectionPoint {
    pub year: i32,
    pub omega_ar: Quantiles,
    pub ph_t: Option<Quantiles>,
}

/// When Ω_ar first falls below a level.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "kind", content = "year", rename_all = "snake_case")]
pub enum CrossingYear {
    /// Already below the level at the start of the projection.
    AlreadyBelow,
    /// First year below the level.
    Year(i32),
    /// Still above the level in the last projected year (given).
    NotBy(i32),
}

/// Crossing years of one level under one pathway for one season.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Crossing {
    pub pathway: String,
    pub season: String,
    /// The Ω_ar level (one of [`ThresholdClasses::levels`]).
    pub threshold: f64,
    /// From the ensemble median.
    pub median: CrossingYear,
    /// Early (pessimistic) estimate, e.g. from the 5 % quantile.
    pub early: CrossingYear,
    /// Late (optimistic) estimate, e.g. from the 95 % quantile.
    pub late: CrossingYear,
}

/// The time-weighted share of a season's records below a level: as sampled (`pathway` and
/// `year` `None`) or with each record projected on its own.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct TimeBelow {
    pub pathway: Option<String>,
    pub year: Option<i32>,
    pub season: String,
    pub threshold: f64,
    pub percent: f64,
}

/// The share of ensemble members below a level in one year.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct BelowProbability {
    pub pathway: String,
    pub year: i32,
    pub season: String,
    /// The Ω_ar level (one of [`ThresholdClasses::levels`]).
    pub threshold: f64,
    /// Percent of members with Ω_ar below the level.
    pub percent: f64,
}

/// Unit of a calcification outlook.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CalcUnit {
    /// Change relative to the present-day rate, %.
    PercentChange,
    /// Net calcification, kg CaCO3 m⁻² yr⁻¹.
    KgCaco3PerM2Year,
    /// Reef-community net ecosystem calcification, mmol CaCO3 m⁻² d⁻¹ (negative: net
    /// dissolution).
    MmolCaco3PerM2Day,
}

/// Calcification outlook from one published relationship.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct CalcificationOutlook {
    /// Name of the relationship, e.g. "Chan & Connolly (2013) linear".
    pub relationship: String,
    pub citation: String,
    pub unit: CalcUnit,
    /// Range of Ω_ar (and T) the relationship was fitted on, as text.
    pub valid_range: String,
    /// Present-day value in `unit` (for percent change: 0).
    pub baseline: Option<f64>,
    pub series: Vec<CalcSeries>,
    pub note: Option<String>,
}

/// One pathway's calcification series.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct CalcSeries {
    pub pathway: String,
    pub points: Vec<CalcPoint>,
}

/// Calcification quantiles in one year.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct CalcPoint {
    pub year: i32,
    pub value: Quantiles,
    /// True when the inputs lie outside the relationship's fitted range.
    pub extrapolated: bool,
}

/// A local scenario (e.g. alkalinity enhancement) evaluated against the pathways.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct LocalScenario {
    pub name: String,
    pub description: String,
    pub rows: Vec<ScenarioRow>,
}

/// One result row of a local scenario.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ScenarioRow {
    pub pathway: String,
    pub year: i32,
    pub season: String,
    pub omega_ar: Quantiles,
    /// Median Ω_ar without the scenario, for comparison.
    pub reference_median: Option<f64>,
}

/// One season's mean Ω_ar in one year under the ratio, additive and source-offsets rules
/// (central values, records projected on their own).
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct RuleRow {
    /// [`PathwayInfo::id`].
    pub pathway: String,
    pub season: String,
    pub year: i32,
    pub ratio: f64,
    pub additive: f64,
    pub source_offsets: f64,
    /// Largest minus smallest of the three.
    pub spread: f64,
}

/// The methods used for one site.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Methods {
    /// Every constant set and conversion, e.g. quantity "K1, K2", method "Lueker et al. (2000)".
    pub chemistry: Vec<MethodEntry>,
    /// Projection settings (disequilibrium mode, warming, ensemble size, ...).
    pub projection: Vec<Setting>,
    /// Free-text notes (e.g. how depth was converted to pressure).
    pub notes: Vec<String>,
}

/// One method with its full citation.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct MethodEntry {
    pub quantity: String,
    pub method: String,
    pub citation: String,
}

/// A named setting.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Setting {
    pub name: String,
    pub value: String,
}

/// One sample for the chemistry appendix.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SampleRow {
    /// Record file name.
    pub file: String,
    /// Data row in that file (1 = first row after the header).
    pub row: u64,
    pub date: String,
    pub station: String,
    pub season: String,
    pub temp_c: f64,
    pub salinity: f64,
    pub pressure_dbar: f64,
    pub ta: Option<f64>,
    pub dic: Option<f64>,
    pub ph_t: Option<f64>,
    pub pco2: Option<f64>,
    pub omega_ar: Option<f64>,
    pub omega_ca: Option<f64>,
    /// Names of the measured parameters (`ta`, `dic`, `ph_t`, `pco2`, `fco2`); the others are
    /// calculated.
    pub measured: Vec<String>,
    /// Conversions, estimates and QC notes of this row, in [`RowFlag`] order.
    pub flags: Vec<RowFlag>,
    /// Whether the sample was used in the baseline.
    pub used: bool,
}

/// Everything needed to reproduce the report.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Reproducibility {
    /// Command line, if wanted in the report.
    pub command: Option<String>,
    pub inputs: Vec<InputFile>,
    pub settings: Vec<Setting>,
    pub seed: u64,
    pub ensemble_members: usize,
}

/// One input file and its hash.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct InputFile {
    /// e.g. "site", "records", "pathway".
    pub role: String,
    pub path: String,
    /// Lower-case hex SHA-256 of the file's bytes.
    pub sha256: String,
    pub bytes: u64,
}

impl InputFile {
    /// Reads a file and fills in its hash and size.
    pub fn hash(role: &str, path: &std::path::Path) -> std::io::Result<Self> {
        use sha2::{Digest, Sha256};
        use std::io::Read;
        let mut file = std::fs::File::open(path)?;
        let mut hasher = Sha256::new();
        let mut buf = vec![0u8; 64 * 1024];
        let mut total: u64 = 0;
        loop {
            let n = file.read(&mut buf)?;
            if n == 0 {
                break;
            }
            let chunk = buf.get(..n).unwrap_or(&[]);
            hasher.update(chunk);
            total = total.saturating_add(n as u64);
        }
        let sha256 = hex(&hasher.finalize());
        Ok(Self {
            role: role.to_string(),
            path: path.display().to_string(),
            sha256,
            bytes: total,
        })
    }
}

/// Lower-case hex of a digest.
pub fn hex(digest: &[u8]) -> String {
    digest.iter().map(|b| format!("{b:02x}")).collect()
}

/// Lower-case hex SHA-256 of some bytes.
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::{Digest, Sha256};
    hex(&Sha256::digest(bytes))
}

impl ReportModel {
    /// Whether site `i` is shown in full (a section and figures of its own), not only ranked.
    pub fn in_detail(&self, i: usize) -> bool {
        !self.summary_only.contains(&i)
    }
}

impl SiteReport {
    /// The season used for verdicts and fan charts (see [`SiteReport::limiting_season`]).
    pub fn limiting_season(&self) -> Option<&str> {
        if let Some(s) = &self.limiting_season {
            return Some(s.as_str());
        }
        self.baseline
            .iter()
            .filter(|b| b.omega_ar.mean.is_finite())
            .min_by(|a, b| a.omega_ar.mean.total_cmp(&b.omega_ar.mean))
            .map(|b| b.season.as_str())
    }

    /// The crossing of `level` by `season` under `pathway`.
    pub fn crossing(&self, pathway: &str, season: &str, level: f64) -> Option<&Crossing> {
        self.crossings
            .iter()
            .find(|c| c.pathway == pathway && c.season == season && c.threshold == level)
    }

    /// The projection series of a pathway and season.
    pub fn series(&self, pathway: &str, season: &str) -> Option<&SeasonSeries> {
        self.projection
            .iter()
            .find(|p| p.pathway == pathway)?
            .seasons
            .iter()
            .find(|s| s.season == season)
    }
}

impl SeasonSeries {
    /// The point of an exact year.
    pub fn at(&self, year: i32) -> Option<&ProjectionPoint> {
        self.points.iter().find(|p| p.year == year)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn classes() -> ThresholdClasses {
        ThresholdClasses {
            levels: vec![4.0, 3.5, 3.0],
            labels: vec!["a".into(), "b".into(), "c".into(), "d".into()],
            citation: String::new(),
            checked: true,
        }
    }

    #[test]
    fn classify_uses_lower_bounds_inclusive() {
        let c = classes();
        assert_eq!(c.classify(4.2), Some(0));
        assert_eq!(c.classify(4.0), Some(0));
        assert_eq!(c.classify(3.99), Some(1));
        assert_eq!(c.classify(3.5), Some(1));
        assert_eq!(c.classify(3.2), Some(2));
        assert_eq!(c.classify(2.9), Some(3));
        assert_eq!(c.classify(f64::NAN), None);
    }

    #[test]
    fn validate_rejects_bad_shapes() {
        assert!(classes().validate().is_ok());
        let mut c = classes();
        c.levels = vec![3.0, 3.5, 4.0];
        assert!(c.validate().is_err());
        let mut c = classes();
        c.labels.pop();
        assert!(c.validate().is_err());
        let mut c = classes();
        c.levels[1] = f64::NAN;
        assert!(c.validate().is_err());
    }

    #[test]
    fn source_date_epoch_parses_and_rejects() {
        // 1700000000 s = 2023-11-14T22:13:20Z (checked with GNU `date -u -d @1700000000`).
        let t = ReportTime::from_source_date_epoch("1700000000").unwrap();
        assert_eq!(t.iso_datetime(), "2023-11-14T22:13:20Z");
        assert!(ReportTime::from_source_date_epoch("yesterday").is_err());
        assert!(ReportTime::from_source_date_epoch("-99999999999999").is_err());
        assert!(ReportTime::from_ymd(2025, 2, 30).is_none());
    }

    #[test]
    fn input_file_hash_matches_known_digest() {
        // SHA-256("abc") from FIPS 180-2, appendix B.1.
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("abc.txt");
        std::fs::write(&p, b"abc").unwrap();
        let f = InputFile::hash("records", &p).unwrap();
        assert_eq!(
            f.sha256,
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(f.bytes, 3);
    }
}
