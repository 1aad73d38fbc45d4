//! The outlook's typed result.
//!
//! Quantiles are indexed by pathway ([`PathwayId`]), scenario ([`ScenarioId`]), group
//! ([`GroupId`]: a season or the all-records aggregate), [`Quantity`] and year; crossings,
//! probabilities and notes are typed values too. The CSV and JSON writers
//! ([`super::output`]) and the report model are views of this result: they look values up by
//! these keys and word or format them where they are shown.

use serde::Serialize;

use super::calcification::Relationship;
use super::thresholds::HabitatClasses;

/// A calcification relationship, by its id (e.g. "chan2013").
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct RelationshipId(pub &'static str);

impl RelationshipId {
    /// The id as written in site files and output names.
    pub fn as_str(self) -> &'static str {
        self.0
    }
}

impl Relationship {
    /// The typed id of this relationship.
    pub fn rel_id(&self) -> RelationshipId {
        RelationshipId(self.id)
    }
}

/// A projected quantity.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Quantity {
    /// Aragonite saturation state.
    OmegaAr,
    /// Calcite saturation state.
    OmegaCa,
    /// pH on the total scale.
    PhT,
    /// Seawater pCO2, µatm.
    Pco2,
    /// DIC, µmol/kg.
    Dic,
    /// TA, µmol/kg.
    Ta,
    /// Carbonate ion, µmol/kg.
    Co3,
    /// Temperature, °C.
    TempC,
    /// Change of Omega_ar from the member's own present-day state (paired).
    OmegaArChange,
    /// Change of pH_T from the member's own present-day state (paired).
    PhTChange,
    /// Relative change of calcification against the member's own present-day state (paired),
    /// percent.
    CalcChangePct(RelationshipId),
    /// Net calcification: the site's measured rate times the relative factor, kg CaCO3 m⁻²
    /// yr⁻¹ (only when the site gives a measured rate).
    NetCalc(RelationshipId),
    /// Reef-community net ecosystem calcification from a field relationship
    /// ([`super::nec`]), mmol CaCO3 m⁻² d⁻¹ (negative: net dissolution).
    Nec(RelationshipId),
    /// Change of NEC from the member's own present-day state (paired), mmol CaCO3 m⁻² d⁻¹.
    NecChange(RelationshipId),
}

impl Quantity {
    /// The carbonate-state quantities, in output order.
    pub const STATE: [Quantity; 8] = [
        Quantity::OmegaAr,
        Quantity::OmegaCa,
        Quantity::PhT,
        Quantity::Pco2,
        Quantity::Dic,
        Quantity::Ta,
        Quantity::Co3,
        Quantity::TempC,
    ];

    /// The paired changes of the carbonate state, in output order.
    pub const PAIRED_CHANGES: [Quantity; 2] = [Quantity::OmegaArChange, Quantity::PhTChange];

    /// The quantities of one relationship, in output order.
    pub fn of_relationship(id: RelationshipId) -> [Quantity; 2] {
        [Quantity::CalcChangePct(id), Quantity::NetCalc(id)]
    }

    /// Every quantity of a run with these relationships, in output order (net calcification
    /// only `with_site_rate`; NEC for the field relationships `nec` that give a value).
    pub fn all(
        relationships: &[Relationship],
        with_site_rate: bool,
        nec: &[RelationshipId],
    ) -> Vec<Quantity> {
        let mut q = Quantity::STATE.to_vec();
        q.extend(Quantity::PAIRED_CHANGES);
        for r in relationships {
            q.push(Quantity::CalcChangePct(r.rel_id()));
            if with_site_rate {
                q.push(Quantity::NetCalc(r.rel_id()));
            }
        }
        for id in nec {
            q.push(Quantity::Nec(*id));
            q.push(Quantity::NecChange(*id));
        }
        q
    }

    /// The relationship a calcification quantity belongs to.
    pub fn relationship(self) -> Option<RelationshipId> {
        match self {
            Quantity::CalcChangePct(id) | Quantity::NetCalc(id) => Some(id),
            _ => None,
        }
    }
}

/// A pathway of the run (position in [`Outlook::pathways`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct PathwayId(pub usize);

/// The base case or one local scenario (position in [`Outlook::scenarios`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ScenarioId {
    /// No local scenario.
    Base,
    /// A local scenario.
    Local(usize),
}

/// A group of records: one season (by its index in the site's season list) or all records.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum GroupId {
    /// One season.
    Season(usize),
    /// All records of the site.
    Aggregate,
}

/// The 5, 25, 50, 75 and 95 % quantiles (NaN when nothing could be solved).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Quantiles {
    pub p05: f64,
    pub p25: f64,
    pub p50: f64,
    pub p75: f64,
    pub p95: f64,
}

impl Quantiles {
    /// From the five levels of [`super::QUANTILE_LEVELS`], in order.
    pub fn from_levels([p05, p25, p50, p75, p95]: [f64; 5]) -> Quantiles {
        Quantiles {
            p05,
            p25,
            p50,
            p75,
            p95,
        }
    }

    /// The five levels in the order of [`super::QUANTILE_LEVELS`].
    pub fn levels(&self) -> [f64; 5] {
        [self.p05, self.p25, self.p50, self.p75, self.p95]
    }
}

/// One year of a quantile series.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct QuantilePoint {
    pub year: i32,
    pub q: Quantiles,
    /// Ensemble members that were solved (ensemble off: records).
    pub members: usize,
    /// Calcification quantities: percent of members outside the relationship's fitted
    /// Omega_ar/temperature range (extrapolation), else `None`.
    pub outside_fit_pct: Option<f64>,
}

/// The quantiles of one quantity over the horizon years.
#[derive(Clone, Debug, PartialEq)]
pub struct QuantileSeries {
    pub pathway: PathwayId,
    pub scenario: ScenarioId,
    pub group: GroupId,
    pub quantity: Quantity,
    /// One point per horizon year, ascending.
    pub points: Vec<QuantilePoint>,
}

impl QuantileSeries {
    /// The point of an exact year.
    pub fn at(&self, year: i32) -> Option<&QuantilePoint> {
        self.points.iter().find(|p| p.year == year)
    }

    /// One quantile level over the years.
    pub fn level(&self, pick: fn(&Quantiles) -> f64) -> Vec<f64> {
        self.points.iter().map(|p| pick(&p.q)).collect()
    }
}

/// The records a crossing refers to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CrossingGroup {
    /// A season or the aggregate.
    Group(GroupId),
    /// The lowest season quantile each year (only with two or more seasons).
    WorstSeason,
}

/// What a crossing measures.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CrossingKind {
    /// Omega_ar falls strictly below a habitat threshold.
    OmegaArBelow,
    /// Reef-community NEC falls to zero or below (net dissolution).
    NetDissolution,
}

/// The criterion of a crossing.
#[derive(Clone, Debug, PartialEq)]
pub enum Criterion {
    /// Omega_ar strictly below the lower bound of a habitat class.
    OmegaArBelow {
        /// The class whose lower bound this is.
        class: String,
        threshold_omega_ar: f64,
    },
    /// NEC of a field relationship at or below zero, i.e. Omega_ar below the level at which
    /// that relationship's NEC is zero at this site.
    NetDissolution {
        relationship: RelationshipId,
        omega_zero: f64,
    },
}

impl Criterion {
    /// The kind of criterion.
    pub fn kind(&self) -> CrossingKind {
        match self {
            Criterion::OmegaArBelow { .. } => CrossingKind::OmegaArBelow,
            Criterion::NetDissolution { .. } => CrossingKind::NetDissolution,
        }
    }

    /// The Omega_ar level the criterion is about.
    pub fn omega_level(&self) -> f64 {
        match self {
            Criterion::OmegaArBelow {
                threshold_omega_ar, ..
            } => *threshold_omega_ar,
            Criterion::NetDissolution { omega_zero, .. } => *omega_zero,
        }
    }
}

/// The year in which the criterion is first met, as quantiles over the members (`None`: not
/// by the last horizon year). Each member's year comes from its annual trajectory (computed
/// every fifth year and at each horizon year, linear in between); the quantile is the
/// earliest year by which that share of the members has met it (nearest rank): `p05` is an
/// early warning (5 % of members), `p50` the median, `p95` the year by which 95 % have.
/// A member already meeting the criterion as sampled counts with the sampling year.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CrossingYears {
    pub p05: Option<i32>,
    pub p50: Option<i32>,
    pub p95: Option<i32>,
}

/// When one criterion is first met under one pathway and scenario.
#[derive(Clone, Debug, PartialEq)]
pub struct Crossing {
    pub pathway: PathwayId,
    pub scenario: ScenarioId,
    pub group: CrossingGroup,
    pub criterion: Criterion,
    pub first_year: CrossingYears,
    /// True when the criterion is already met by the median at the site's baseline
    /// (sampling conditions).
    pub met_at_baseline: bool,
}

/// Chance that the group's time-weighted mean Omega_ar lies below one habitat threshold at
/// one horizon year (uncertainty of the mean, not the share of time below).
#[derive(Clone, Debug, PartialEq)]
pub struct BelowProbability {
    pub pathway: PathwayId,
    pub scenario: ScenarioId,
    pub group: GroupId,
    pub year: i32,
    /// The class whose lower bound this is.
    pub class_left: String,
    pub threshold_omega_ar: f64,
    /// Percent of members below the threshold.
    pub prob_below_pct: f64,
    /// Class of the median Omega_ar.
    pub median_class: String,
}

/// Share of time below one habitat threshold: how much of the time the water is below it
/// (variability between records: hour, tide, day, station), not how well the mean is known.
#[derive(Clone, Debug, PartialEq)]
pub struct TimeBelow {
    /// `None`: the records as sampled (the same under every pathway).
    pub pathway: Option<PathwayId>,
    pub scenario: ScenarioId,
    pub group: GroupId,
    /// `None`: as sampled.
    pub year: Option<i32>,
    /// The class whose lower bound this is.
    pub class_left: String,
    pub threshold_omega_ar: f64,
    /// Time-weighted percent of the records below the threshold (station-days equal, the
    /// records of a station-day equal), each record projected on its own with central values.
    pub pct_time_below: f64,
}

/// A note on the run, with the data to word it (worded where it is shown).
#[derive(Clone, Debug, PartialEq)]
pub enum Note {
    /// A season without usable records (not projected).
    SeasonWithoutRecords { season: String },
    /// A relationship gives no positive rate at a group's baseline, so it cannot be scaled.
    RelationshipNotScalable {
        relationship: RelationshipId,
        group: String,
        baseline_omega_ar: f64,
    },
    /// A group's baseline lies outside a relationship's fitted range.
    BaselineOutsideFit {
        relationship: RelationshipId,
        group: String,
        baseline_omega_ar: f64,
        baseline_temp_c: f64,
    },
    /// Record conditions outside a constant set's fitted range (solved anyway).
    ConstantsRange {
        outside: usize,
        total: usize,
        /// Whether warmed temperatures were surveyed too.
        warming: bool,
        /// Up to three examples, each "record: warning".
        examples: Vec<String>,
    },
    /// A field NEC relationship gives no value at this site (e.g. it needs coral cover or the
    /// site's measured NEC).
    NecUnavailable {
        relationship: RelationshipId,
        reason: String,
    },
    /// Member-years that could not be solved and were left out of the quantiles.
    UnsolvedMembers {
        member_years: usize,
        /// The first failure, "record: pathway year: message".
        first: String,
    },
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
    #[serde(skip)]
    pub id: GroupId,
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
    /// Projected groups: seasons with records in site order, then the aggregate.
    pub groups: Vec<GroupInfo>,
    /// Local scenarios ([`ScenarioId::Local`] indexes this list).
    pub scenarios: Vec<ScenarioInfo>,
    /// Quantity order of the outputs.
    pub quantities: Vec<Quantity>,
    /// Quantile series, ordered by pathway, scenario, group and quantity.
    pub series: Vec<QuantileSeries>,
    pub crossings: Vec<Crossing>,
    /// Uncertainty: chance that a group's mean lies below a threshold; ordered by pathway,
    /// scenario, year, group and threshold.
    pub probabilities: Vec<BelowProbability>,
    /// Variability: share of time below a threshold; as sampled first (by group and
    /// threshold), then by pathway, scenario, year, group and threshold.
    pub time_below: Vec<TimeBelow>,
    pub classes: HabitatClasses,
    pub relationships: Vec<Relationship>,
    /// The site's measured calcification rate, when it gives one.
    pub site_rate: Option<super::calcification::SiteRate>,
    /// The field NEC relationships, the site's cover, measured NEC and habitat choice.
    pub nec: super::nec::NecSettings,
    /// Warnings and notes (range flags, failed members, skipped seasons).
    pub notes: Vec<Note>,
    /// The thermal-stress outlook, when the site has a temperature record
    /// ([`crate::pipeline::project`] fills it in).
    pub heat: Option<super::thermal::site::SiteHeat>,
    /// Structural uncertainty: the three projection rules compared, when the site has
    /// offshore source water (empty otherwise); ordered by pathway, group and year.
    pub rule_comparison: Vec<RuleComparison>,
    /// Variability: the exposure metrics of the site's sensor series, as sampled and with
    /// every reading projected on its own.
    pub exposure: super::exposure::ExposureOutlook,
}

/// One group's time-weighted mean Omega_ar in one horizon year under the ratio, additive and
/// source-offsets rules ([`super::Disequilibrium::ALL`] order), each record projected on its
/// own with central values (no ensemble).
#[derive(Clone, Debug, PartialEq)]
pub struct RuleComparison {
    pub pathway: PathwayId,
    pub group: GroupId,
    pub year: i32,
    pub omega_ar: [f64; 3],
}

impl RuleComparison {
    /// Largest minus smallest of the three (NaN when any is missing).
    pub fn spread(&self) -> f64 {
        if self.omega_ar.iter().any(|x| !x.is_finite()) {
            return f64::NAN;
        }
        let hi = self.omega_ar.iter().copied().fold(f64::MIN, f64::max);
        let lo = self.omega_ar.iter().copied().fold(f64::MAX, f64::min);
        hi - lo
    }
}

impl Outlook {
    /// The pathway ids with their information, in output order.
    pub fn pathway_ids(&self) -> impl Iterator<Item = (PathwayId, &PathwayInfo)> {
        self.pathways
            .iter()
            .enumerate()
            .map(|(i, p)| (PathwayId(i), p))
    }

    /// The base case, then every local scenario, with its name.
    pub fn scenario_ids(&self) -> impl Iterator<Item = (ScenarioId, &str)> {
        std::iter::once((ScenarioId::Base, super::ensemble::BASE_SCENARIO)).chain(
            self.scenarios
                .iter()
                .enumerate()
                .map(|(i, s)| (ScenarioId::Local(i), s.name.as_str())),
        )
    }

    /// A pathway by name.
    pub fn pathway_id(&self, name: &str) -> Option<PathwayId> {
        self.pathway_ids()
            .find(|(_, p)| p.name == name)
            .map(|(id, _)| id)
    }

    /// The pathway's information.
    pub fn pathway(&self, id: PathwayId) -> Option<&PathwayInfo> {
        self.pathways.get(id.0)
    }

    /// The scenario's name ("none" for the base case).
    pub fn scenario_name(&self, id: ScenarioId) -> &str {
        match id {
            ScenarioId::Base => super::ensemble::BASE_SCENARIO,
            ScenarioId::Local(i) => self.scenarios.get(i).map_or("", |s| s.name.as_str()),
        }
    }

    /// A group's information.
    pub fn group(&self, id: GroupId) -> Option<&GroupInfo> {
        self.groups.iter().find(|g| g.id == id)
    }

    /// A group by its label (a season name or the aggregate's label).
    pub fn group_id(&self, label: &str) -> Option<GroupId> {
        self.groups.iter().find(|g| g.label == label).map(|g| g.id)
    }

    /// The label of a group ("" when the group was not projected).
    pub fn group_label(&self, id: GroupId) -> &str {
        self.group(id).map_or("", |g| g.label.as_str())
    }

    /// The label of a crossing's group.
    pub fn crossing_group_label(&self, g: CrossingGroup) -> &str {
        match g {
            CrossingGroup::Group(id) => self.group_label(id),
            CrossingGroup::WorstSeason => super::ensemble::WORST_SEASON_LABEL,
        }
    }

    /// One quantile series.
    pub fn series(
        &self,
        pathway: PathwayId,
        scenario: ScenarioId,
        group: GroupId,
        quantity: Quantity,
    ) -> Option<&QuantileSeries> {
        self.series.iter().find(|s| {
            s.pathway == pathway
                && s.scenario == scenario
                && s.group == group
                && s.quantity == quantity
        })
    }

    /// The relationship of an id.
    pub fn relationship(&self, id: RelationshipId) -> Option<&Relationship> {
        self.relationships.iter().find(|r| r.id == id.0)
    }

    /// Member-years that could not be solved (0 when every member was solved).
    /// Share of time below `threshold` in `group` (`pathway`/`year` `None`: as sampled).
    pub fn time_below_at(
        &self,
        pathway: Option<PathwayId>,
        scenario: ScenarioId,
        group: GroupId,
        year: Option<i32>,
        threshold: f64,
    ) -> Option<f64> {
        self.time_below
            .iter()
            .find(|t| {
                t.pathway == pathway
                    && (pathway.is_none() || t.scenario == scenario)
                    && t.group == group
                    && t.year == year
                    && t.threshold_omega_ar == threshold
            })
            .map(|t| t.pct_time_below)
    }

    pub fn unsolved_member_years(&self) -> usize {
        self.notes
            .iter()
            .map(|n| match n {
                Note::UnsolvedMembers { member_years, .. } => *member_years,
                _ => 0,
            })
            .sum()
    }
}
