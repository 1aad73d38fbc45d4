//! The site description file (TOML): types as parsed, with their defaults.
//!
//! Every section and key is documented field by field in `docs/site-format.md`. Unknown keys are
//! rejected (`deny_unknown_fields`) so that a misspelt key is reported with a suggestion instead
//! of being ignored. Range and cross-field checks are in [`super::validate`].

use std::collections::BTreeMap;
use std::path::PathBuf;

use serde::{Deserialize, Serialize};

use crate::chem::catalogue::MethodKind;

/// The whole site file.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct SiteFile {
    pub site: SiteInfo,
    #[serde(default)]
    pub plan: Plan,
    #[serde(default)]
    pub baseline: BaselineInputs,
    /// One `[[records]]` table per record file; at least one is required.
    #[serde(default)]
    pub records: Vec<RecordSpec>,
    #[serde(default)]
    pub seasons: SeasonsSpec,
    #[serde(default)]
    pub projection: ProjectionSpec,
    #[serde(default)]
    pub calcification: CalcificationSpec,
    #[serde(default)]
    pub uncertainty: UncertaintySpec,
    #[serde(default)]
    pub thresholds: ThresholdsSpec,
    #[serde(default)]
    pub chemistry: ChemistrySpec,
    /// Local alkalinity/DIC scenarios (`[[scenario]]` tables), e.g. an alkalinity-enhancement
    /// trial or a seagrass-bed effect.
    #[serde(default)]
    pub scenario: Vec<LocalScenario>,
    #[serde(default)]
    pub report: ReportSpec,
    /// `[thermal]`: the temperature record for the thermal-stress outlook (optional).
    #[serde(default)]
    pub thermal: Option<crate::site::temperature::ThermalSpec>,
    /// `[source_water]`: the offshore water the reef's metabolism works on (optional): a
    /// station of the records, how it follows the atmosphere, or an offshore TA/DIC.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub source_water: Option<SourceWaterSpec>,
}

/// How the offshore source water follows the atmosphere under a pathway.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
pub enum SourceFollows {
    /// Its pCO2 keeps its ratio to the air pCO2 (default).
    #[default]
    Ratio,
    /// Its pCO2 keeps its difference from the air pCO2.
    Additive,
}

/// `[source_water]`: offshore source water apart from reef metabolism. Rows of record files
/// marked `source_water = true`, or of the station named here, are source water: they stay
/// out of the reef's baseline and outlook, and each reef record is measured against them
/// (same season and local hour when the source has readings in that hour, else the season
/// mean). Without source-water rows, `ta_umol_kg` and `dic_umol_kg` (with `source`) give an
/// offshore state to use instead.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct SourceWaterSpec {
    /// Station whose rows are offshore source water.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub station: Option<String>,
    /// How the source water follows the atmosphere ("ratio" or "additive").
    #[serde(default)]
    pub follows_atmosphere: SourceFollows,
    /// Offshore total alkalinity, µmol/kg (when the site has no source-water rows).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ta_umol_kg: Option<f64>,
    /// Offshore DIC, µmol/kg (with `ta_umol_kg`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dic_umol_kg: Option<f64>,
    /// Offshore temperature, °C (default: each reef record's own).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temp_c: Option<f64>,
    /// Offshore salinity (default: each reef record's own).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub salinity: Option<f64>,
    /// Where the offshore TA and DIC come from (required with them).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub source: Option<String>,
}

impl SourceWaterSpec {
    /// True when the site file states an offshore TA and DIC.
    pub fn has_stated_values(&self) -> bool {
        self.ta_umol_kg.is_some() || self.dic_umol_kg.is_some()
    }
}

/// `[site]`: what and where the candidate site is.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct SiteInfo {
    pub name: String,
    #[serde(default)]
    pub region: Option<String>,
    /// Decimal degrees north, −90…90.
    pub latitude_deg: f64,
    /// Decimal degrees east, −180…180.
    pub longitude_deg: f64,
    /// Shallowest depth of the planted area, m (≥ 0).
    pub depth_min_m: f64,
    /// Deepest depth of the planted area, m (≥ depth_min_m, ≤ 1000).
    pub depth_max_m: f64,
    /// Reef zone or habitat, free text (e.g. "back-reef lagoon", "fore-reef slope").
    #[serde(default)]
    pub habitat: Option<String>,
    /// Area of the candidate site, m².
    #[serde(default)]
    pub area_m2: Option<f64>,
    /// Offset of local time from UTC that applies to record times written without an offset,
    /// "+HH:MM" or "-HH:MM" (e.g. "+10:00").
    pub utc_offset: String,
}

/// `[plan]`: the restoration plan in brief.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct Plan {
    #[serde(default)]
    pub outplanting_area_m2: Option<f64>,
    /// Calcifier groups to be planted, free text (e.g. "branching Acropora", "massive Porites").
    #[serde(default)]
    pub target_groups: Vec<String>,
    #[serde(default)]
    pub project_start_year: Option<i32>,
    #[serde(default)]
    pub project_end_year: Option<i32>,
}

/// Global-average reef calcification used when the site file gives none:
/// ≈1.5 kg CaCO3 m⁻² yr⁻¹.
///
/// Source: Andersson, Bates & Mackenzie (2007), Aquatic Geochemistry 13:237, citing earlier
/// estimates (verified on the publisher's abstract page, see the project's fact sheet §3).
/// A global average over reef types; reef flats, lagoons and high-cover zones differ several-fold.
pub const DEFAULT_NET_CALCIFICATION_KG_M2_YR: f64 = 1.5;

/// Citation for [`DEFAULT_NET_CALCIFICATION_KG_M2_YR`].
pub const DEFAULT_NET_CALCIFICATION_SOURCE: &str = "global-average reef calcification, Andersson, Bates & Mackenzie (2007), Aquatic Geochemistry 13:237";

/// `[baseline]`: the site's present calcification, when known.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct BaselineInputs {
    /// Measured or estimated net community calcification, kg CaCO3 m⁻² yr⁻¹.
    #[serde(default)]
    pub net_calcification_kg_m2_yr: Option<f64>,
    /// Live coral cover as a fraction 0…1.
    #[serde(default)]
    pub coral_cover_fraction: Option<f64>,
    /// Where the site's numbers come from (survey, paper), free text.
    #[serde(default)]
    pub source: Option<String>,
    /// Rows with a salinity below this are left out of the baseline and the outlook (they
    /// stay in the per-sample appendix); default [`DEFAULT_SALINITY_FLOOR`].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub salinity_floor: Option<f64>,
}

/// Default salinity floor of the baseline and the outlook: 5, the lower end of the salinity
/// range over which the aragonite and calcite solubility of Mucci (1983) was fitted (S 5–44,
/// the range the chemistry module warns outside of). Below it Omega_ar rests on no fitted
/// constant at all.
pub const DEFAULT_SALINITY_FLOOR: f64 = 5.0;

impl BaselineInputs {
    /// The salinity floor in use: the site's, or [`DEFAULT_SALINITY_FLOOR`].
    pub fn salinity_floor(&self) -> f64 {
        self.salinity_floor.unwrap_or(DEFAULT_SALINITY_FLOOR)
    }

    /// The calcification rate to use and where it comes from: the site's own value, or the
    /// documented literature default.
    pub fn net_calcification(&self) -> (f64, String) {
        match self.net_calcification_kg_m2_yr {
            Some(v) => (
                v,
                self.source
                    .clone()
                    .unwrap_or_else(|| "site file [baseline]".to_string()),
            ),
            None => (
                DEFAULT_NET_CALCIFICATION_KG_M2_YR,
                format!("default: {DEFAULT_NET_CALCIFICATION_SOURCE}"),
            ),
        }
    }
}

/// Whether a record file holds discrete (lab) samples or a logged sensor series.
#[derive(Clone, Copy, Debug, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
pub enum RecordKind {
    Bottle,
    Sensor,
}

/// How dates are written in a record file.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
pub enum DateFormat {
    /// ISO 8601: `2024-03-05`, `2024-03-05T14:30`, `2024-03-05 14:30:00+10:00`, `...Z`.
    #[default]
    #[serde(rename = "iso")]
    Iso,
    /// `05/03/2024` (5 March), also with `.` or `-` separators, optionally followed by a time.
    #[serde(rename = "day-first")]
    DayFirst,
    /// `03/05/2024` (5 March), also with `.` or `-` separators, optionally followed by a time.
    #[serde(rename = "month-first")]
    MonthFirst,
}

/// What to do with a row whose value is outside the documented physical limits.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
pub enum OutOfRange {
    /// Report an error per row and stop (default).
    #[default]
    Error,
    /// Report a warning and drop the row (for sensor series with known spikes).
    Drop,
}

/// `[[records]]`: one record file.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct RecordSpec {
    /// Path of the CSV file, relative to the site file.
    pub path: PathBuf,
    pub kind: RecordKind,
    /// Station name for every row, overriding any station column.
    #[serde(default)]
    pub station: Option<String>,
    #[serde(default)]
    pub date_format: DateFormat,
    /// Fixed depth of the sampler in m (taken as that many dbar), used when the file has
    /// neither a depth nor a pressure column. Defaults to the middle of the site's depth range.
    #[serde(default)]
    pub depth_m: Option<f64>,
    /// Salinity used for every row when the file has no salinity column.
    #[serde(default)]
    pub salinity: Option<f64>,
    /// Extra cell values that mean "no value" besides the built-in ones
    /// (empty, `NA`, `N/A`, `NaN`, `nan`, `-`), e.g. `["-999", "-9999"]`.
    #[serde(default)]
    pub missing: Vec<String>,
    #[serde(default)]
    pub on_out_of_range: OutOfRange,
    #[serde(default)]
    pub columns: ColumnMap,
    #[serde(default)]
    pub units: RecordUnits,
    /// The file holds offshore source water, not reef water (see [`SourceWaterSpec`]).
    #[serde(default, skip_serializing_if = "is_false")]
    pub source_water: bool,
}

fn is_false(b: &bool) -> bool {
    !*b
}

/// `[records.columns]`: the header in the file for each quantity. Quantities left out are
/// looked up under their canonical header (the key name; `ph` also as `ph_t`; `co2` as `pco2`,
/// `fco2` or `xco2`).
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ColumnMap {
    #[serde(default)]
    pub date: Option<String>,
    /// A separate time-of-day column, combined with `date`.
    #[serde(default)]
    pub time: Option<String>,
    #[serde(default)]
    pub station: Option<String>,
    #[serde(default)]
    pub temp_c: Option<String>,
    #[serde(default)]
    pub salinity: Option<String>,
    #[serde(default)]
    pub depth_m: Option<String>,
    #[serde(default)]
    pub pressure_dbar: Option<String>,
    #[serde(default)]
    pub ta: Option<String>,
    #[serde(default)]
    pub dic: Option<String>,
    #[serde(default)]
    pub ph: Option<String>,
    #[serde(default)]
    pub co2: Option<String>,
    #[serde(default)]
    pub silicate: Option<String>,
    #[serde(default)]
    pub phosphate: Option<String>,
}

/// Concentration units accepted for TA, DIC and nutrients.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
pub enum ConcUnit {
    #[default]
    #[serde(rename = "umol/kg", alias = "µmol/kg")]
    UmolPerKg,
    /// Converted with the TEOS-10 seawater density at the sample's T, S and pressure.
    #[serde(rename = "umol/L", alias = "µmol/L", alias = "umol/l")]
    UmolPerL,
    #[serde(rename = "mmol/kg")]
    MmolPerKg,
}

/// pH scale of the record's pH column.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
pub enum PhScaleName {
    #[default]
    Total,
    Sws,
    Free,
    Nbs,
}

/// Which CO2 quantity the record's `co2` column holds.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "snake_case")]
pub enum Co2Kind {
    /// Partial pressure, µatm.
    #[default]
    Pco2Uatm,
    /// Fugacity, µatm.
    Fco2Uatm,
    /// Dry-air mole fraction in equilibrium with the water, ppm; converted to pCO2 at
    /// 1 atm total pressure with the water vapour pressure of Weiss & Price (1980).
    Xco2Ppm,
}

/// Temperature unit (only degrees Celsius, ITS-90, is accepted).
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
pub enum TempUnit {
    #[default]
    #[serde(rename = "degC", alias = "°C")]
    DegC,
}

/// `[records.units]`.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct RecordUnits {
    #[serde(default)]
    pub ta: ConcUnit,
    #[serde(default)]
    pub dic: ConcUnit,
    #[serde(default)]
    pub silicate: ConcUnit,
    #[serde(default)]
    pub phosphate: ConcUnit,
    #[serde(default)]
    pub ph: PhScaleName,
    /// When absent, inferred from which of `pco2`, `fco2`, `xco2` is a header in the file.
    #[serde(default)]
    pub co2: Option<Co2Kind>,
    #[serde(default)]
    pub temperature: TempUnit,
}

/// A month given by number (1–12) or English name/abbreviation ("Mar", "march").
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(untagged)]
pub enum MonthRef {
    Number(i64),
    Name(String),
}

/// `[seasons]`: absent or empty means the twelve calendar months; otherwise each key names a
/// season and lists its months, e.g. `wet = [11, 12, 1, 2, 3, 4]`. Every month must belong to
/// exactly one season. Seasons keep the order in which they are written.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(transparent)]
pub struct SeasonsSpec(pub BTreeMap<String, Vec<MonthRef>>);

/// How the present disequilibrium between sea and air is carried into the future.
#[derive(Clone, Copy, Debug, Default, Deserialize, Serialize, PartialEq, Eq)]
#[serde(rename_all = "lowercase")]
pub enum Disequilibrium {
    /// pCO2_sea(y) = pCO2_air(y) × pCO2_sea / pCO2_air at sampling (default).
    #[default]
    Ratio,
    /// pCO2_sea(y) = pCO2_air(y) + (pCO2_sea − pCO2_air at sampling).
    Additive,
    /// The reef's TA/DIC offsets from its offshore source water are held while the source
    /// water follows the atmosphere (needs `[source_water]`).
    #[serde(rename = "source offsets")]
    SourceOffsets,
}

/// A pathway of the user's own: atmospheric CO2 (ppm) at given years, interpolated linearly.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct UserPathway {
    pub name: String,
    /// `[year, ppm]` pairs in increasing year order.
    pub points: Vec<[f64; 2]>,
}

/// The site's own sea-surface warming for one pathway (e.g. from a regional projection):
/// the change of the 2081–2100 mean relative to 1995–2014, °C, with its source.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct SstChange {
    pub pathway: String,
    pub change_c: f64,
    pub source: String,
}

/// `[projection]`, kept as written: the outlook stage checks the names, years and sizes
/// (`outlook::site_specs`); the site knows no pathway names.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ProjectionSpec {
    /// Pathway names (built-in or of `user_pathways`); `None` means the outlook's default.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pathways: Option<Vec<String>>,
    #[serde(default)]
    pub user_pathways: Vec<UserPathway>,
    /// Years to project; empty means the outlook's default years.
    #[serde(default)]
    pub horizon_years: Vec<i32>,
    #[serde(default)]
    pub disequilibrium: Disequilibrium,
    /// Add each pathway's warming to the record temperatures.
    #[serde(default = "default_true")]
    pub warming: bool,
    /// Monte Carlo ensemble members per pathway, year and season.
    #[serde(default = "default_members")]
    pub members: usize,
    /// Seed of the Monte Carlo generator (same seed, same inputs: same numbers).
    #[serde(default = "default_seed")]
    pub seed: u64,
    /// The site's own warming per pathway, replacing the global default for that pathway.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub sst_change: Vec<SstChange>,
}

fn default_true() -> bool {
    true
}
/// Default ensemble size (common practice: enough members for stable 5–95 % quantiles).
pub const DEFAULT_MEMBERS: usize = 1000;
fn default_members() -> usize {
    DEFAULT_MEMBERS
}
/// Default Monte Carlo seed.
pub const DEFAULT_SEED: u64 = 20_240_601;
fn default_seed() -> u64 {
    DEFAULT_SEED
}

impl Default for ProjectionSpec {
    fn default() -> Self {
        ProjectionSpec {
            pathways: None,
            user_pathways: Vec::new(),
            horizon_years: Vec::new(),
            disequilibrium: Disequilibrium::default(),
            warming: true,
            members: DEFAULT_MEMBERS,
            seed: DEFAULT_SEED,
            sst_change: Vec::new(),
        }
    }
}

/// `[calcification]`: which calcification–saturation relationships to show, by id (the ids
/// are defined by the outlook stage). Empty means the outlook's default selection.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct CalcificationSpec {
    #[serde(default)]
    pub relationships: Vec<String>,
    /// `[calcification.measured_nec]`: the site's own measured net ecosystem calcification,
    /// kept as written (the outlook checks unit, method and ranges).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub measured_nec: Option<MeasuredNecSpec>,
}

/// `[calcification.measured_nec]`: a net ecosystem calcification measured at the site, to
/// which the field NEC relationships are anchored.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct MeasuredNecSpec {
    /// The measured NEC (negative for net dissolution), in `unit`.
    pub value: f64,
    /// "mmol m-2 d-1" or "kg m-2 yr-1" (of CaCO3).
    pub unit: String,
    /// "alkalinity anomaly" or "census".
    pub method: String,
    /// The study or survey it comes from.
    pub source: String,
    /// Omega_ar at which it was measured; without it, the site's present-day baseline.
    #[serde(default)]
    pub omega_ar: Option<f64>,
}

/// `[uncertainty]`: standard uncertainties of the measurements.
///
/// Defaults: TA and DIC ±2 µmol/kg, the values Orr et al. (2018, Mar. Chem. 207:84) used for
/// CRM-referenced measurements; pH ±0.01 (spectrophotometric accuracy, from memory); pCO2
/// ±0.5 % (≈2 µatm at 400 µatm, from memory). See the fact sheet §2c.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct UncertaintySpec {
    #[serde(default = "default_u_ta")]
    pub ta_umol_kg: f64,
    #[serde(default = "default_u_dic")]
    pub dic_umol_kg: f64,
    #[serde(default = "default_u_ph")]
    pub ph: f64,
    #[serde(default = "default_u_pco2")]
    pub pco2_pct: f64,
}
fn default_u_ta() -> f64 {
    2.0
}
fn default_u_dic() -> f64 {
    2.0
}
fn default_u_ph() -> f64 {
    0.01
}
fn default_u_pco2() -> f64 {
    0.5
}
impl Default for UncertaintySpec {
    fn default() -> Self {
        UncertaintySpec {
            ta_umol_kg: default_u_ta(),
            dic_umol_kg: default_u_dic(),
            ph: default_u_ph(),
            pco2_pct: default_u_pco2(),
        }
    }
}

/// `[thresholds]`: lower bounds of the Omega_ar classes. Defaults are the classes of
/// Guinotte, Buddemeier & Kleypas (2003, Coral Reefs 22:551): > 4.0 optimal, 3.5–4.0 adequate,
/// 3.0–3.5 marginal, < 3.0 extremely marginal (from memory, medium confidence; fact sheet §4).
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ThresholdsSpec {
    #[serde(default = "default_optimal")]
    pub omega_ar_optimal_min: f64,
    #[serde(default = "default_adequate")]
    pub omega_ar_adequate_min: f64,
    #[serde(default = "default_marginal")]
    pub omega_ar_marginal_min: f64,
}
fn default_optimal() -> f64 {
    4.0
}
fn default_adequate() -> f64 {
    3.5
}
fn default_marginal() -> f64 {
    3.0
}
impl Default for ThresholdsSpec {
    fn default() -> Self {
        ThresholdsSpec {
            omega_ar_optimal_min: default_optimal(),
            omega_ar_adequate_min: default_adequate(),
            omega_ar_marginal_min: default_marginal(),
        }
    }
}

/// `[chemistry]`: the method set, by the names the chemistry module accepts.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ChemistrySpec {
    /// Carbonic acid dissociation constants K1, K2 (citation id, e.g. `lueker2000`).
    #[serde(default = "default_carbonic_acid")]
    pub carbonic_acid: String,
    /// Total boron to salinity ratio (citation id, e.g. `lee2010`).
    #[serde(default = "default_total_boron")]
    pub total_boron: String,
    /// Hydrogen fluoride dissociation constant KF (citation id, e.g. `pf87`).
    #[serde(default = "default_hydrogen_fluoride")]
    pub hydrogen_fluoride: String,
    /// Former names of the three keys (`k1k2`, `boron`, `kf`): accepted by the parser only so
    /// that validation can say the new name at the old key's place.
    #[serde(default, skip_serializing)]
    pub k1k2: Option<serde::de::IgnoredAny>,
    #[serde(default, skip_serializing)]
    pub boron: Option<serde::de::IgnoredAny>,
    #[serde(default, skip_serializing)]
    pub kf: Option<serde::de::IgnoredAny>,
}
fn default_carbonic_acid() -> String {
    MethodKind::CarbonicAcid.default_id().to_string()
}
fn default_total_boron() -> String {
    MethodKind::TotalBoron.default_id().to_string()
}
fn default_hydrogen_fluoride() -> String {
    MethodKind::HydrogenFluoride.default_id().to_string()
}
impl Default for ChemistrySpec {
    fn default() -> Self {
        ChemistrySpec {
            carbonic_acid: default_carbonic_acid(),
            total_boron: default_total_boron(),
            hydrogen_fluoride: default_hydrogen_fluoride(),
            k1k2: None,
            boron: None,
            kf: None,
        }
    }
}

/// `[[scenario]]`: a local change in alkalinity and/or DIC applied in projections.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct LocalScenario {
    pub name: String,
    #[serde(default)]
    pub ta_offset_umol_kg: f64,
    #[serde(default)]
    pub dic_offset_umol_kg: f64,
    /// Season names the offsets apply to; absent means all seasons.
    #[serde(default)]
    pub seasons: Option<Vec<String>>,
}

/// `[report]`: report metadata.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ReportSpec {
    #[serde(default)]
    pub title: Option<String>,
    #[serde(default)]
    pub prepared_for: Option<String>,
    #[serde(default)]
    pub prepared_by: Option<String>,
    /// Report date as "YYYY-MM-DD"; when absent the report takes it from the inputs.
    #[serde(default)]
    pub date: Option<String>,
    /// A notice printed with the site in the report, e.g. that the data are a demo or
    /// provisional.
    #[serde(default)]
    pub notice: Option<String>,
}

/// A season after validation: its name and months (1–12).
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Season {
    pub name: String,
    pub months: Vec<u32>,
}

/// Month names, for calendar-month seasons and for parsing month names.
pub const MONTH_NAMES: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

/// The twelve calendar-month seasons.
pub fn calendar_seasons() -> Vec<Season> {
    MONTH_NAMES
        .iter()
        .zip(1u32..)
        .map(|(n, m)| Season {
            name: n.to_string(),
            months: vec![m],
        })
        .collect()
}

/// Parses a month name or abbreviation (English, any case, at least 3 letters).
pub fn month_from_name(s: &str) -> Option<u32> {
    const FULL: [&str; 12] = [
        "january",
        "february",
        "march",
        "april",
        "may",
        "june",
        "july",
        "august",
        "september",
        "october",
        "november",
        "december",
    ];
    let l = s.trim().to_ascii_lowercase();
    if l.len() < 3 {
        return None;
    }
    FULL.iter()
        .position(|f| f.starts_with(&l))
        .and_then(|i| u32::try_from(i + 1).ok())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn month_names_parse() {
        assert_eq!(month_from_name("Mar"), Some(3));
        assert_eq!(month_from_name("september"), Some(9));
        assert_eq!(month_from_name("Ju"), None);
        assert_eq!(month_from_name("Jux"), None);
    }

    #[test]
    fn default_calcification_names_its_source() {
        let (v, src) = BaselineInputs::default().net_calcification();
        assert_eq!(v, 1.5);
        assert!(src.contains("Andersson, Bates & Mackenzie (2007)"));
    }
}
