//! The seeded Monte Carlo ensemble and the assembly of the outlook.
//!
//! Each member of a season (or of the all-records aggregate) draws, from its own random
//! stream:
//! 1. a record of that season, uniformly with replacement (a bootstrap over records: the
//!    record-to-record variability within the season);
//! 2. shifts of pK0, pK1, pK2, pKB, pKW, pK*sp(aragonite), pK*sp(calcite) and a factor on
//!    total boron, normal with the standard uncertainties of Orr et al. (2018), Mar. Chem.
//!    207:84–107 (`chem::ORR2018`);
//! 3. errors of the record's two measured parameters, normal with the site's standard
//!    uncertainties; the record is then re-solved at its sampling conditions with the member's
//!    constants, giving the member's TA and seawater pCO2 at sampling. (So a record measured
//!    as TA + DIC keeps its measured DIC at the sampling year under every draw of the
//!    constants, while one measured as TA + pCO2 keeps its pCO2.)
//!
//! The member keeps these draws for every pathway, scenario and horizon year. The stream of
//! a member is derived from (seed, season, member) only, never from thread scheduling, so the
//! results do not depend on the number of threads; and because the pathway and scenario are
//! not part of the key, members are paired across pathways and scenarios (common random
//! numbers): differences between pathways or scenarios are not blurred by sampling noise.
//!
//! Work is split into one task per (pathway, season); rayon runs the tasks in parallel and
//! collects them in order.

use std::collections::BTreeSet;

use rayon::prelude::*;

use crate::chem::{self, CarbonateState, Constants, Input, ORR2018, Perturbation};

use super::projection::shifted;

use super::output::{
    CrossingKind, CrossingRow, GroupInfo, Outlook, PathwayInfo, ProbabilityRow, QuantileRow,
    ScenarioInfo, SettingsInfo,
};
use super::projection::{RecordAnchor, YearConditions, solve_projected};
use super::rng::Xoshiro256;
use super::scenario::Offsets;
use super::thresholds::{first_year_at_or_below, first_year_below, fraction_below};
use super::{OutlookError, ProjectionSettings, QUANTILE_LEVELS, SiteInput};

/// Largest ensemble accepted (memory grows linearly with it).
pub const MAX_MEMBERS: usize = 100_000;

/// Default Monte Carlo seed.
pub const DEFAULT_SEED: u64 = 20_240_601;

/// Label of the all-records aggregate.
pub const AGGREGATE_LABEL: &str = "annual";

/// Label of the synthetic crossing group built from the lowest season quantile each year.
pub const WORST_SEASON_LABEL: &str = "worst season";

/// Label of the base case (no local scenario).
pub const BASE_SCENARIO: &str = "none";

/// Stream key of the aggregate group (season streams use the season index).
const AGGREGATE_KEY: u64 = u64::MAX;

/// Standard uncertainties of the site's measurements, by kind of measurement.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MeasurementUncertainty {
    /// TA, µmol/kg. Default 2 (the value Orr et al. 2018 used for CRM-referenced TA).
    pub ta_umol_kg: f64,
    /// DIC, µmol/kg. Default 2 (as TA).
    pub dic_umol_kg: f64,
    /// pH (total scale). Default 0.01 (spectrophotometric accuracy; from memory, fact sheet
    /// §2c).
    pub ph: f64,
    /// Seawater pCO2 or fCO2, percent of the value. Default 0.5 % (about 2 µatm at 400 µatm;
    /// from memory, fact sheet §2c).
    pub pco2_pct: f64,
}

impl Default for MeasurementUncertainty {
    fn default() -> Self {
        MeasurementUncertainty {
            ta_umol_kg: 2.0,
            dic_umol_kg: 2.0,
            ph: 0.01,
            pco2_pct: 0.5,
        }
    }
}

impl MeasurementUncertainty {
    /// Standard uncertainty of one measured value in its own unit (carbonate ion, rarely
    /// measured, takes 2 % of the value).
    pub fn sd_of(&self, input: &Input) -> f64 {
        match *input {
            Input::Ta(_) => self.ta_umol_kg,
            Input::Dic(_) => self.dic_umol_kg,
            Input::PhT(_) => self.ph,
            Input::Pco2(v) | Input::Fco2(v) => v.abs() * self.pco2_pct / 100.0,
            Input::Co3(v) => v.abs() * 0.02,
        }
    }

    fn validate(&self) -> Result<(), OutlookError> {
        for (what, v, hi) in [
            ("TA uncertainty (umol/kg)", self.ta_umol_kg, 100.0),
            ("DIC uncertainty (umol/kg)", self.dic_umol_kg, 100.0),
            ("pH uncertainty", self.ph, 0.5),
            ("pCO2 uncertainty (%)", self.pco2_pct, 50.0),
        ] {
            if !v.is_finite() || !(0.0..=hi).contains(&v) {
                return Err(input_err(format!("{what} {v} is outside 0-{hi}")));
            }
        }
        Ok(())
    }
}

/// Ensemble settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EnsembleSettings {
    /// Members per pathway and season; 0 turns the ensemble off (each record once, central
    /// constants, no measurement errors; quantiles are then across records).
    pub members: usize,
    /// Seed of every stream.
    pub seed: u64,
    /// Draw the constants' uncertainties (Orr et al. 2018).
    pub constants: bool,
    /// Measurement standard uncertainties (set to zero to leave them out).
    pub measurement: MeasurementUncertainty,
    /// Worker threads (`None`: rayon's default pool).
    pub threads: Option<usize>,
}

impl Default for EnsembleSettings {
    fn default() -> Self {
        EnsembleSettings {
            members: 1000,
            seed: DEFAULT_SEED,
            constants: true,
            measurement: MeasurementUncertainty::default(),
            threads: None,
        }
    }
}

/// Receives progress of a run (member-years solved). Implementations must be cheap and
/// thread-safe; the default methods do nothing.
pub trait Progress: Sync {
    /// Called once with the total number of member-years.
    fn start(&self, _total: u64) {}
    /// Called as members finish.
    fn advance(&self, _n: u64) {}
}

/// A [`Progress`] that ignores everything.
pub struct NoProgress;

impl Progress for NoProgress {}

/// Quantile of sorted finite values by linear interpolation between order statistics
/// (Hyndman & Fan 1996 type 7, the default of R and NumPy). `p` in [0, 1]; NaN for an empty
/// slice.
pub fn quantile_sorted(sorted: &[f64], p: f64) -> f64 {
    let n = sorted.len();
    if n == 0 {
        return f64::NAN;
    }
    let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(n - 1);
    let (a, b) = match (sorted.get(lo), sorted.get(hi)) {
        (Some(a), Some(b)) => (*a, *b),
        _ => return f64::NAN,
    };
    a + (h - lo as f64) * (b - a)
}

/// The five reported quantiles of the finite values in `values` (reordered in place), equal
/// to [`quantile_sorted`] on the sorted values. Uses repeated selection instead of a full
/// sort: levels are taken from the highest down, each selection working only on the part
/// left of the previous one, so the cost is a few passes over the data.
pub fn five_quantiles(values: &mut Vec<f64>) -> [f64; 5] {
    values.retain(|v| v.is_finite());
    let n = values.len();
    let mut out = [f64::NAN; 5];
    if n == 0 {
        return out;
    }
    // Invariant: every value in values[..end] is <= every value in values[end..].
    let mut end = n;
    for (slot, level) in out.iter_mut().zip(QUANTILE_LEVELS).rev() {
        let h = (n - 1) as f64 * f64::from(level) / 100.0;
        let lo = (h.floor() as usize).min(n - 1);
        if lo < end {
            if let Some(part) = values.get_mut(..end) {
                part.select_nth_unstable_by(lo, f64::total_cmp);
            }
            end = lo;
        }
        let a = values.get(lo).copied().unwrap_or(f64::NAN);
        let frac = h - lo as f64;
        *slot = if frac > 0.0 {
            // The next order statistic is the smallest value right of `lo`.
            let b = values
                .get(lo + 1..)
                .unwrap_or(&[])
                .iter()
                .copied()
                .fold(f64::INFINITY, f64::min);
            if b.is_finite() { a + frac * (b - a) } else { a }
        } else {
            a
        };
    }
    out
}

/// Shifts of the constants for eight standard normal deviates, in the order pK0, pK1, pK2,
/// pKB, pKW, pK*sp(aragonite), pK*sp(calcite), total boron; scaled by the standard
/// uncertainties of Orr et al. (2018), Mar. Chem. 207:84–107 (`chem::ORR2018`).
pub fn constants_perturbation(z: [f64; 8]) -> Perturbation {
    let u = ORR2018;
    Perturbation {
        pk0: u.pk0 * z[0],
        pk1: u.pk1 * z[1],
        pk2: u.pk2 * z[2],
        pkb: u.pkb * z[3],
        pkw: u.pkw * z[4],
        pksp_ar: u.pksp_ar * z[5],
        pksp_ca: u.pksp_ca * z[6],
        // ORR2018.boron_factor is a fractional standard uncertainty; keep the factor positive
        // (a 25-sigma draw would be needed to reach the floor).
        boron_factor: (1.0 + u.boron_factor * z[7]).max(0.5),
    }
}

/// Base quantities: (name with unit, decimals).
const BASE_QUANTITIES: [(&str, usize); 8] = [
    ("omega_ar", 4),
    ("omega_ca", 4),
    ("ph_t", 4),
    ("pco2_uatm", 2),
    ("dic_umol_kg", 2),
    ("ta_umol_kg", 2),
    ("co3_umol_kg", 2),
    ("temp_c", 3),
];
const Q_OMEGA_AR: usize = 0;

/// A season (or the aggregate) with its records and baseline.
#[derive(Clone, Debug)]
struct Group {
    label: String,
    key: u64,
    aggregate: bool,
    records: Vec<usize>,
    omega_b: f64,
    temp_b: f64,
    sample_year_max: i32,
}

/// One member's draws.
#[derive(Clone, Copy, Debug)]
struct MemberDraw {
    /// Index into `site.records`.
    record: usize,
    /// Index into the group's record list.
    local: usize,
    perturbation: Option<Perturbation>,
    /// Standard normal deviates of the errors of the record's two measured parameters.
    z_a: f64,
    z_b: f64,
}

/// A variant of the run: the base case or one local scenario.
#[derive(Clone, Debug)]
struct Variant {
    name: String,
    /// Offsets per season index (empty: none).
    offsets: Vec<Offsets>,
    start_year: Option<i32>,
}

impl Variant {
    fn offsets_for(&self, season: usize, year: i32) -> Option<&Offsets> {
        if self.start_year.is_some_and(|s| year < s) {
            return None;
        }
        self.offsets.get(season).filter(|o| !o.is_zero())
    }
}

/// Validated inputs shared by every task.
struct Prepared<'a> {
    site: &'a SiteInput,
    s: &'a ProjectionSettings,
    groups: Vec<Group>,
    variants: Vec<Variant>,
    /// anchors[pathway][record]
    anchors: Vec<Vec<RecordAnchor>>,
    /// xco2[pathway][year]
    xco2: Vec<Vec<f64>>,
    notes: Vec<String>,
}

fn input_err(m: impl Into<String>) -> OutlookError {
    OutlookError::Input(m.into())
}

impl<'a> Prepared<'a> {
    fn new(site: &'a SiteInput, s: &'a ProjectionSettings) -> Result<Prepared<'a>, OutlookError> {
        let mut notes = Vec::new();
        // Seasons and records.
        if site.seasons.is_empty() {
            return Err(input_err("the site defines no seasons"));
        }
        for (i, a) in site.seasons.iter().enumerate() {
            if a.trim().is_empty() {
                return Err(input_err(format!("season {} has an empty name", i + 1)));
            }
            if site.seasons.iter().skip(i + 1).any(|b| b == a) {
                return Err(input_err(format!("season \"{a}\" is listed twice")));
            }
        }
        if site.records.is_empty() {
            return Err(input_err("no usable records to project"));
        }
        for r in &site.records {
            r.validate()?;
            if r.season >= site.seasons.len() {
                return Err(input_err(format!(
                    "{}: season index {} but the site has {} seasons",
                    r.label,
                    r.season,
                    site.seasons.len()
                )));
            }
        }
        // Horizon.
        if s.years.is_empty() {
            return Err(input_err(
                "no horizon years (the records may already be at or after the last horizon year)",
            ));
        }
        for w in s.years.windows(2) {
            if w[1] <= w[0] {
                return Err(input_err(format!(
                    "horizon years must increase: {} follows {}",
                    w[1], w[0]
                )));
            }
        }
        // Pathways.
        if s.pathways.is_empty() {
            return Err(input_err("no CO2 pathway selected"));
        }
        for (i, p) in s.pathways.iter().enumerate() {
            if s.pathways
                .iter()
                .skip(i + 1)
                .any(|q| q.pathway.name == p.pathway.name)
            {
                return Err(input_err(format!(
                    "pathway \"{}\" is listed twice",
                    p.pathway.name
                )));
            }
            let d = p.warming.delta_c;
            if !d.is_finite() || !(-5.0..=10.0).contains(&d) {
                return Err(input_err(format!(
                    "pathway \"{}\": warming {d} degC at 2090 is outside -5 to 10 degC",
                    p.pathway.name
                )));
            }
        }
        // Ensemble.
        let e = &s.ensemble;
        if e.members > MAX_MEMBERS {
            return Err(input_err(format!(
                "{} ensemble members requested; the limit is {MAX_MEMBERS}",
                e.members
            )));
        }
        if e.threads == Some(0) {
            return Err(input_err("threads must be at least 1"));
        }
        e.measurement.validate()?;
        let rate = s.calcification.baseline_rate_kg_m2_yr;
        if !rate.is_finite() || rate <= 0.0 {
            return Err(input_err(format!(
                "calcification baseline rate {rate} kg CaCO3 m-2 yr-1 must be positive"
            )));
        }
        // Scenarios.
        let mut variants = vec![Variant {
            name: BASE_SCENARIO.to_string(),
            offsets: Vec::new(),
            start_year: None,
        }];
        for sc in &s.scenarios {
            let name = sc.name.trim();
            if name.is_empty() {
                return Err(input_err("a local scenario needs a name"));
            }
            if name.eq_ignore_ascii_case(BASE_SCENARIO) || variants.iter().any(|v| v.name == name) {
                return Err(input_err(format!(
                    "local scenario name \"{name}\" is reserved or used twice"
                )));
            }
            let offsets = sc
                .resolve(&site.seasons)
                .map_err(|e| input_err(e.to_string()))?;
            variants.push(Variant {
                name: name.to_string(),
                offsets,
                start_year: sc.start_year,
            });
        }
        // Pathway values at every horizon year and anchors at every sampling year.
        let mut anchors = Vec::with_capacity(s.pathways.len());
        let mut xco2 = Vec::with_capacity(s.pathways.len());
        for p in &s.pathways {
            let xs = s
                .years
                .iter()
                .map(|&y| p.pathway.xco2_ppm(&site.observed, y))
                .collect::<Result<Vec<f64>, _>>()?;
            xco2.push(xs);
            anchors.push(
                site.records
                    .iter()
                    .map(|r| RecordAnchor::new(r, &p.pathway, &site.observed))
                    .collect::<Result<Vec<_>, _>>()?,
            );
        }
        // Groups and baselines.
        let baseline = site
            .records
            .iter()
            .map(|r| {
                let cond = r.conditions_at(r.temp_c);
                let k = Constants::new(&cond, &site.methods);
                chem::solve_pair(Input::Ta(r.ta), Input::Pco2(r.pco2), &k)
                    .map(|st| st.omega_ar)
                    .map_err(|e| {
                        input_err(format!(
                            "{}: the record's state at sampling cannot be solved from TA {} \
                             umol/kg and pCO2 {} uatm: {e}",
                            r.label, r.ta, r.pco2
                        ))
                    })
            })
            .collect::<Result<Vec<f64>, _>>()?;
        let make_group = |label: String, key: u64, aggregate: bool, records: Vec<usize>| {
            let n = records.len() as f64;
            let omega_b = records.iter().filter_map(|&i| baseline.get(i)).sum::<f64>() / n;
            let temp_b = records
                .iter()
                .filter_map(|&i| site.records.get(i))
                .map(|r| r.temp_c)
                .sum::<f64>()
                / n;
            let sample_year_max = records
                .iter()
                .filter_map(|&i| site.records.get(i))
                .map(|r| r.sample_year)
                .max()
                .unwrap_or(0);
            Group {
                label,
                key,
                aggregate,
                records,
                omega_b,
                temp_b,
                sample_year_max,
            }
        };
        let mut groups = Vec::new();
        for (si, label) in site.seasons.iter().enumerate() {
            let recs: Vec<usize> = site
                .records
                .iter()
                .enumerate()
                .filter(|(_, r)| r.season == si)
                .map(|(i, _)| i)
                .collect();
            if recs.is_empty() {
                notes.push(format!(
                    "season \"{label}\" has no usable records; not projected"
                ));
                continue;
            }
            groups.push(make_group(label.clone(), si as u64, false, recs));
        }
        let agg_label = if site.seasons.iter().any(|s| s == AGGREGATE_LABEL) {
            "all records".to_string()
        } else {
            AGGREGATE_LABEL.to_string()
        };
        groups.push(make_group(
            agg_label,
            AGGREGATE_KEY,
            true,
            (0..site.records.len()).collect(),
        ));
        for rel in &s.calcification.relationships {
            for g in &groups {
                if rel
                    .relative(g.omega_b, g.temp_b, g.omega_b, g.temp_b)
                    .is_none()
                {
                    notes.push(format!(
                        "calcification relationship {} cannot be scaled for \"{}\": baseline \
                         Omega_ar {:.3} gives no positive rate",
                        rel.id, g.label, g.omega_b
                    ));
                }
                if !rel.in_range(g.omega_b, g.temp_b) {
                    notes.push(format!(
                        "calcification relationship {}: the baseline of \"{}\" (Omega_ar {:.3}, \
                         {:.2} degC) lies outside its fitted range (extrapolation)",
                        rel.id, g.label, g.omega_b, g.temp_b
                    ));
                }
            }
        }
        notes.extend(range_survey(site, s));
        Ok(Prepared {
            site,
            s,
            groups,
            variants,
            anchors,
            xco2,
            notes,
        })
    }

    fn n_members(&self, g: &Group) -> usize {
        if self.s.ensemble.members == 0 {
            g.records.len()
        } else {
            self.s.ensemble.members
        }
    }

    /// The draws of member `m` of group `g`.
    fn draw(&self, g: &Group, m: usize) -> MemberDraw {
        let e = &self.s.ensemble;
        if e.members == 0 {
            return MemberDraw {
                record: g.records.get(m).copied().unwrap_or(0),
                local: m,
                perturbation: None,
                z_a: 0.0,
                z_b: 0.0,
            };
        }
        let mut rng = Xoshiro256::for_stream(&[e.seed, g.key, m as u64]);
        let local = rng.below(g.records.len());
        let record = g.records.get(local).copied().unwrap_or(0);
        // All normals are always drawn, in a fixed order, so that switching one component off
        // does not shift the others.
        let z: [f64; 10] = std::array::from_fn(|_| rng.normal());
        let perturbation = e
            .constants
            .then(|| constants_perturbation([z[0], z[1], z[2], z[3], z[4], z[5], z[6], z[7]]));
        MemberDraw {
            record,
            local,
            perturbation,
            z_a: z[8],
            z_b: z[9],
        }
    }

    /// The member's TA and seawater pCO2 at sampling: the record's measured pair with the
    /// member's measurement errors, re-solved with the member's constants at the sampling
    /// conditions (`k_sample`: central constants there, computed when `None`).
    fn member_start(
        &self,
        rec: &super::ProjectionRecord,
        draw: &MemberDraw,
        k_sample: Option<&Constants>,
    ) -> Result<(f64, f64), String> {
        let e = &self.s.ensemble;
        if e.members == 0 {
            return Ok((rec.ta, rec.pco2));
        }
        let u = &e.measurement;
        let (a, b) = match &rec.measured {
            Some(m) => (
                shifted(m.a, m.sd_a.unwrap_or_else(|| u.sd_of(&m.a)) * draw.z_a),
                shifted(m.b, m.sd_b.unwrap_or_else(|| u.sd_of(&m.b)) * draw.z_b),
            ),
            None => (
                Input::Ta(rec.ta + u.ta_umol_kg * draw.z_a),
                Input::Pco2(rec.pco2 + u.sd_of(&Input::Pco2(rec.pco2)) * draw.z_b),
            ),
        };
        match (a, b) {
            (Input::Ta(ta), Input::Pco2(p)) | (Input::Pco2(p), Input::Ta(ta)) => Ok((ta, p)),
            _ => {
                let fresh;
                let k0 = match k_sample {
                    Some(k) => k,
                    None => {
                        fresh = Constants::new(&rec.conditions_at(rec.temp_c), &self.site.methods);
                        &fresh
                    }
                };
                let perturbed;
                let k = match &draw.perturbation {
                    Some(pt) => {
                        perturbed = k0.perturbed(pt);
                        &perturbed
                    }
                    None => k0,
                };
                chem::solve_pair(a, b, k)
                    .map(|st| (st.ta, st.pco2))
                    .map_err(|e| format!("re-solving the record with this member's draws: {e}"))
            }
        }
    }

    /// Solves one member under pathway `p` for every horizon year and variant, calling
    /// `sink(year index, variant index, result, temperature)`. `cached` holds the central
    /// year conditions of the member's record (one per year) and its constants at sampling
    /// when precomputed.
    fn eval_member(
        &self,
        p: usize,
        draw: &MemberDraw,
        cached: Option<(&[YearConditions], &Constants)>,
        sink: &mut dyn FnMut(usize, usize, Result<CarbonateState, String>, f64),
    ) {
        let site = self.site;
        let s = self.s;
        let Some(rec) = site.records.get(draw.record) else {
            return;
        };
        let Some(spec) = s.pathways.get(p) else {
            return;
        };
        let Some(anchor) = self.anchors.get(p).and_then(|a| a.get(draw.record)) else {
            return;
        };
        let (ta, pco2_rec) = match self.member_start(rec, draw, cached.map(|c| c.1)) {
            Ok(v) => v,
            Err(msg) => {
                for yi in 0..s.years.len() {
                    for vi in 0..self.variants.len() {
                        sink(yi, vi, Err(msg.clone()), f64::NAN);
                    }
                }
                return;
            }
        };
        let cached = cached.map(|c| c.0);
        let warming = s.warming.then_some(&spec.warming);
        for (yi, &year) in s.years.iter().enumerate() {
            let fresh;
            let yc: &YearConditions = match cached.and_then(|c| c.get(yi)) {
                Some(c) => c,
                None => {
                    match YearConditions::new(
                        rec,
                        &spec.pathway,
                        &site.observed,
                        warming,
                        &site.methods,
                        year,
                    ) {
                        Ok(c) => {
                            fresh = c;
                            &fresh
                        }
                        Err(e) => {
                            for vi in 0..self.variants.len() {
                                sink(yi, vi, Err(e.to_string()), f64::NAN);
                            }
                            continue;
                        }
                    }
                }
            };
            let perturbed;
            let k: &Constants = match &draw.perturbation {
                Some(pt) => {
                    perturbed = yc.constants.perturbed(pt);
                    &perturbed
                }
                None => &yc.constants,
            };
            let pco2_sea = anchor.project_pco2(pco2_rec, yc.pco2_air, s.mode);
            for (vi, v) in self.variants.iter().enumerate() {
                let res = solve_projected(ta, pco2_sea, v.offsets_for(rec.season, year), k);
                sink(yi, vi, res, yc.temp_c);
            }
        }
    }

    /// Central year conditions of every record of `g` under pathway `p`, `[local][year]`
    /// flattened, and the records' central constants at sampling; `None` when the group has
    /// more records than members (computing per member is then cheaper).
    fn precompute(&self, p: usize, g: &Group) -> Option<Precomputed> {
        if g.records.len() > self.n_members(g) {
            return None;
        }
        let spec = self.s.pathways.get(p)?;
        let warming = self.s.warming.then_some(&spec.warming);
        let mut out = Vec::with_capacity(g.records.len() * self.s.years.len());
        let mut at_sampling = Vec::with_capacity(g.records.len());
        for &ri in &g.records {
            let rec = self.site.records.get(ri)?;
            at_sampling.push(Constants::new(
                &rec.conditions_at(rec.temp_c),
                &self.site.methods,
            ));
            for &year in &self.s.years {
                let c = YearConditions::new(
                    rec,
                    &spec.pathway,
                    &self.site.observed,
                    warming,
                    &self.site.methods,
                    year,
                )
                .ok()?;
                out.push(c);
            }
        }
        Some(Precomputed {
            years: out,
            at_sampling,
        })
    }
}

/// Notes on the record-year conditions (record temperature plus any warming) that lie
/// outside a constant set's fitted range: they are solved anyway and flagged here, with a
/// count and up to three examples.
fn range_survey(site: &SiteInput, s: &ProjectionSettings) -> Vec<String> {
    let mut total = 0usize;
    let mut outside = 0usize;
    let mut examples: BTreeSet<String> = BTreeSet::new();
    let specs: Vec<_> = if s.warming {
        s.pathways.iter().collect()
    } else {
        s.pathways.iter().take(1).collect()
    };
    for spec in specs {
        for rec in &site.records {
            let years = std::iter::once(None).chain(s.years.iter().map(|&y| Some(y)));
            for year in years {
                let temp = match year {
                    Some(y) if s.warming => {
                        rec.temp_c + spec.warming.change_between(rec.sample_year, y)
                    }
                    Some(_) => continue,
                    None => rec.temp_c,
                };
                total += 1;
                let w = site.methods.range_warnings(&rec.conditions_at(temp));
                if let Some(first) = w.first() {
                    outside += 1;
                    examples.insert(format!("{}: {first}", rec.label));
                    if examples.len() > 3 {
                        examples.pop_last();
                    }
                }
            }
        }
    }
    if outside == 0 {
        return Vec::new();
    }
    vec![format!(
        "constants range: {outside} of {total} record conditions (record temperature{}) lie \
         outside a constant set's fitted range; they were solved anyway. Examples: {}",
        if s.warming {
            " and warmed temperatures"
        } else {
            ""
        },
        examples.into_iter().collect::<Vec<_>>().join("; ")
    )]
}

/// Central constants of a group's records, computed once per task.
struct Precomputed {
    /// `[local record][year]` flattened.
    years: Vec<YearConditions>,
    /// `[local record]`: constants at the sampling conditions.
    at_sampling: Vec<Constants>,
}

/// Summary of one variant of one (pathway, group) task.
struct VariantSummary {
    /// [quantity][year] quantiles and counts.
    q: Vec<Vec<([f64; 5], usize)>>,
    /// [relationship][year] percent of members outside the fitted range.
    outside: Vec<Vec<f64>>,
    /// [threshold][year] percent of members below.
    below: Vec<Vec<f64>>,
}

struct TaskOut {
    variants: Vec<VariantSummary>,
    failures: usize,
    first_failure: Option<String>,
}

fn run_task(prep: &Prepared<'_>, p: usize, g: &Group, progress: &dyn Progress) -> TaskOut {
    let s = prep.s;
    let ny = s.years.len();
    let nv = prep.variants.len();
    let rels = &s.calcification.relationships;
    let nq = BASE_QUANTITIES.len() + 2 * rels.len();
    let members = prep.n_members(g);
    let thresholds = s.classes.thresholds();
    let rate = s.calcification.baseline_rate_kg_m2_yr;

    let cache = prep.precompute(p, g);
    // buf[variant][(q * ny + year) * members + m]
    let mut buf = vec![vec![f64::NAN; nq * ny * members]; nv];
    let mut outside_count = vec![vec![0usize; rels.len() * ny]; nv];
    let mut failures = 0usize;
    let mut first_failure: Option<String> = None;

    for m in 0..members {
        let draw = prep.draw(g, m);
        let l = draw.local;
        let cached = cache
            .as_ref()
            .and_then(|c| Some((c.years.get(l * ny..(l + 1) * ny)?, c.at_sampling.get(l)?)));
        let label = prep
            .site
            .records
            .get(draw.record)
            .map(|r| r.label.as_str())
            .unwrap_or("");
        prep.eval_member(p, &draw, cached, &mut |yi, vi, res, temp| {
            let Some(vbuf) = buf.get_mut(vi) else { return };
            let mut put = |q: usize, v: f64| {
                if let Some(slot) = vbuf.get_mut((q * ny + yi) * members + m) {
                    *slot = v;
                }
            };
            match res {
                Ok(st) => {
                    let vals = [
                        st.omega_ar,
                        st.omega_ca,
                        st.ph_t,
                        st.pco2,
                        st.dic,
                        st.ta,
                        st.co3,
                        temp,
                    ];
                    for (q, v) in vals.into_iter().enumerate() {
                        put(q, v);
                    }
                    for (ri, rel) in rels.iter().enumerate() {
                        if let Some(f) = rel.relative(st.omega_ar, temp, g.omega_b, g.temp_b) {
                            put(BASE_QUANTITIES.len() + 2 * ri, (f - 1.0) * 100.0);
                            put(BASE_QUANTITIES.len() + 2 * ri + 1, rate * f);
                        }
                        if !rel.in_range(st.omega_ar, temp)
                            && let Some(c) = outside_count
                                .get_mut(vi)
                                .and_then(|o| o.get_mut(ri * ny + yi))
                        {
                            *c += 1;
                        }
                    }
                }
                Err(msg) => {
                    failures += 1;
                    if first_failure.is_none() {
                        first_failure = Some(format!(
                            "{label}: {} {}: {msg}",
                            s.pathways
                                .get(p)
                                .map(|x| x.pathway.name.as_str())
                                .unwrap_or(""),
                            s.years.get(yi).copied().unwrap_or(0)
                        ));
                    }
                }
            }
        });
        progress.advance(ny as u64);
    }

    let mut scratch = Vec::with_capacity(members);
    let variants = buf
        .iter()
        .zip(&outside_count)
        .map(|(vbuf, outc)| {
            let slice = |q: usize, yi: usize| {
                let start = (q * ny + yi) * members;
                vbuf.get(start..start + members).unwrap_or(&[])
            };
            let q = (0..nq)
                .map(|qi| {
                    (0..ny)
                        .map(|yi| {
                            scratch.clear();
                            scratch.extend_from_slice(slice(qi, yi));
                            let qs = five_quantiles(&mut scratch);
                            (qs, scratch.len())
                        })
                        .collect()
                })
                .collect();
            let solved = |yi: usize| {
                slice(Q_OMEGA_AR, yi)
                    .iter()
                    .filter(|v| v.is_finite())
                    .count()
            };
            let outside = (0..rels.len())
                .map(|ri| {
                    (0..ny)
                        .map(|yi| {
                            let n = solved(yi);
                            let c = outc.get(ri * ny + yi).copied().unwrap_or(0);
                            if n == 0 {
                                f64::NAN
                            } else {
                                100.0 * c as f64 / n as f64
                            }
                        })
                        .collect()
                })
                .collect();
            let below = thresholds
                .iter()
                .map(|(_, t)| {
                    (0..ny)
                        .map(|yi| 100.0 * fraction_below(slice(Q_OMEGA_AR, yi), *t))
                        .collect()
                })
                .collect();
            VariantSummary { q, outside, below }
        })
        .collect();
    TaskOut {
        variants,
        failures,
        first_failure,
    }
}

/// Runs the projection ensemble and assembles the outlook.
pub fn run(
    site: &SiteInput,
    s: &ProjectionSettings,
    progress: &dyn Progress,
) -> Result<Outlook, OutlookError> {
    let prep = Prepared::new(site, s)?;
    // Task order (pathway-major, then group) is the order of `outs`.
    let tasks: Vec<(usize, &Group)> = (0..s.pathways.len())
        .flat_map(|p| prep.groups.iter().map(move |g| (p, g)))
        .collect();
    let total: u64 = tasks
        .iter()
        .map(|&(_, g)| (prep.n_members(g) * s.years.len()) as u64)
        .sum();
    progress.start(total);
    let work = || -> Vec<TaskOut> {
        tasks
            .par_iter()
            .map(|&(p, g)| run_task(&prep, p, g, progress))
            .collect()
    };
    let outs = match s.ensemble.threads {
        Some(n) => rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build()
            .map_err(|e| input_err(format!("could not start {n} worker threads: {e}")))?
            .install(work),
        None => work(),
    };
    Ok(assemble(&prep, &outs))
}

fn assemble(prep: &Prepared<'_>, outs: &[TaskOut]) -> Outlook {
    let site = prep.site;
    let s = prep.s;
    let ng = prep.groups.len();
    let rels = &s.calcification.relationships;
    let thresholds = s.classes.thresholds();
    let mut quantities: Vec<(String, usize)> = BASE_QUANTITIES
        .iter()
        .map(|(n, d)| (n.to_string(), *d))
        .collect();
    for r in rels {
        quantities.push((format!("calc_change_pct_{}", r.id), 2));
        quantities.push((format!("net_calc_kg_m2_yr_{}", r.id), 4));
    }
    let out_at = |p: usize, g: usize| outs.get(p * ng + g);

    let mut rows = Vec::new();
    let mut probabilities = Vec::new();
    let mut crossings = Vec::new();
    for (p, spec) in s.pathways.iter().enumerate() {
        for (vi, v) in prep.variants.iter().enumerate() {
            for (yi, &year) in s.years.iter().enumerate() {
                for (gi, g) in prep.groups.iter().enumerate() {
                    let Some(vs) = out_at(p, gi).and_then(|o| o.variants.get(vi)) else {
                        continue;
                    };
                    for (qi, (name, dec)) in quantities.iter().enumerate() {
                        let Some(&(q, n)) = vs.q.get(qi).and_then(|x| x.get(yi)) else {
                            continue;
                        };
                        let outside = if qi >= BASE_QUANTITIES.len() {
                            let ri = (qi - BASE_QUANTITIES.len()) / 2;
                            vs.outside.get(ri).and_then(|x| x.get(yi)).copied()
                        } else {
                            None
                        };
                        rows.push(QuantileRow {
                            pathway: spec.pathway.name.clone(),
                            scenario: v.name.clone(),
                            year,
                            season: g.label.clone(),
                            quantity: name.clone(),
                            decimals: *dec,
                            q,
                            members: n,
                            outside_fit_pct: outside,
                        });
                    }
                    let median =
                        vs.q.get(Q_OMEGA_AR)
                            .and_then(|x| x.get(yi))
                            .map_or(f64::NAN, |x| x.0[2]);
                    for (ti, (class, t)) in thresholds.iter().enumerate() {
                        probabilities.push(ProbabilityRow {
                            pathway: spec.pathway.name.clone(),
                            scenario: v.name.clone(),
                            year,
                            season: g.label.clone(),
                            class_left: class.clone(),
                            threshold_omega_ar: *t,
                            prob_below_pct: vs
                                .below
                                .get(ti)
                                .and_then(|x| x.get(yi))
                                .copied()
                                .unwrap_or(f64::NAN),
                            median_class: s.classes.classify(median).to_string(),
                        });
                    }
                }
            }
            // Crossings per group, then the worst season.
            let series = |gi: usize, qi: usize, level: usize| -> Vec<f64> {
                (0..s.years.len())
                    .map(|yi| {
                        out_at(p, gi)
                            .and_then(|o| o.variants.get(vi))
                            .and_then(|vs| vs.q.get(qi))
                            .and_then(|x| x.get(yi))
                            .map_or(f64::NAN, |x| x.0[level])
                    })
                    .collect()
            };
            let season_groups: Vec<usize> = (0..ng)
                .filter(|&gi| prep.groups.get(gi).is_some_and(|g| !g.aggregate))
                .collect();
            let worst = |qi: usize, level: usize| -> Vec<f64> {
                let per: Vec<Vec<f64>> = season_groups
                    .iter()
                    .map(|&gi| series(gi, qi, level))
                    .collect();
                (0..s.years.len())
                    .map(|yi| {
                        per.iter()
                            .filter_map(|v| v.get(yi).copied())
                            .filter(|x| x.is_finite())
                            .fold(f64::NAN, f64::min)
                    })
                    .collect()
            };
            let mut labels: Vec<(String, Option<usize>, f64, f64)> = prep
                .groups
                .iter()
                .enumerate()
                .map(|(gi, g)| (g.label.clone(), Some(gi), g.omega_b, g.temp_b))
                .collect();
            if season_groups.len() >= 2 {
                let (ob, tb) = season_groups
                    .iter()
                    .filter_map(|&gi| prep.groups.get(gi))
                    .map(|g| (g.omega_b, g.temp_b))
                    .fold(
                        (f64::INFINITY, f64::NAN),
                        |acc, x| if x.0 < acc.0 { x } else { acc },
                    );
                labels.push((WORST_SEASON_LABEL.to_string(), None, ob, tb));
            }
            for (label, gi, omega_b, _temp_b) in &labels {
                let get = |qi: usize, level: usize| match gi {
                    Some(gi) => series(*gi, qi, level),
                    None => worst(qi, level),
                };
                for (class, t) in &thresholds {
                    let fy =
                        [0usize, 2, 4].map(|l| first_year_below(&s.years, &get(Q_OMEGA_AR, l), *t));
                    crossings.push(CrossingRow {
                        pathway: spec.pathway.name.clone(),
                        scenario: v.name.clone(),
                        season: label.clone(),
                        kind: CrossingKind::OmegaArBelow,
                        criterion: format!("omega_ar below {class}"),
                        threshold: *t,
                        threshold_unit: "omega_ar",
                        first_year: fy,
                        met_at_baseline: *omega_b < *t,
                    });
                }
                for (ri, rel) in rels.iter().enumerate() {
                    let qi = BASE_QUANTITIES.len() + 2 * ri + 1;
                    let fy =
                        [0usize, 2, 4].map(|l| first_year_at_or_below(&s.years, &get(qi, l), 0.0));
                    crossings.push(CrossingRow {
                        pathway: spec.pathway.name.clone(),
                        scenario: v.name.clone(),
                        season: label.clone(),
                        kind: CrossingKind::NetCalcificationZero,
                        criterion: format!("net calcification <= 0 ({})", rel.id),
                        threshold: 0.0,
                        threshold_unit: "kg_caco3_m2_yr",
                        first_year: fy,
                        met_at_baseline: false,
                    });
                }
            }
        }
    }

    let mut notes = prep.notes.clone();
    let mut failures = 0;
    let mut first_failure = None;
    for o in outs {
        failures += o.failures;
        if first_failure.is_none() {
            first_failure = o.first_failure.clone();
        }
    }
    if failures > 0 {
        notes.push(format!(
            "{failures} member-years could not be solved and were left out of the quantiles; \
             first: {}",
            first_failure.unwrap_or_default()
        ));
    }

    let e = &s.ensemble;
    let settings = SettingsInfo {
        seed: e.seed,
        members: e.members,
        disequilibrium: s.mode.name().to_string(),
        warming: s.warming,
        horizon_years: s.years.clone(),
        constants_uncertainty: if e.members > 0 && e.constants {
            "Orr et al. (2018), Mar. Chem. 207:84-107: pK0 0.002, pK1 0.0075, pK2 0.015, pKB \
             0.01, pKW 0.01, pKsp 0.02 (aragonite, calcite), total boron 2 %"
                .to_string()
        } else {
            "off".to_string()
        },
        measurement_uncertainty: if e.members > 0 {
            format!(
                "standard uncertainties of each record's measured pair: TA {} umol/kg, DIC {} \
                 umol/kg, pH {}, pCO2/fCO2 {} % (unless a record carries its own, e.g. TA \
                 estimated from salinity); the record is re-solved per member",
                e.measurement.ta_umol_kg,
                e.measurement.dic_umol_kg,
                e.measurement.ph,
                e.measurement.pco2_pct
            )
        } else {
            "off".to_string()
        },
        record_variability: if e.members > 0 {
            format!(
                "bootstrap: each member draws one record of its season; \"{AGGREGATE_LABEL}\" \
                 draws from all records"
            )
        } else {
            "ensemble off: quantiles across the records of each season".to_string()
        },
        methods: site.methods.citations(),
        observed_co2_source: site.observed.source().to_string(),
    };
    let pathways = s
        .pathways
        .iter()
        .zip(&prep.xco2)
        .map(|(spec, xs)| PathwayInfo {
            name: spec.pathway.name.clone(),
            source: spec.pathway.source(&site.observed),
            xco2_ppm: xs.clone(),
            warming_2090_c: spec.warming.delta_c,
            warming_source: if s.warming {
                spec.warming.source().to_string()
            } else {
                "warming off".to_string()
            },
        })
        .collect();
    let groups = prep
        .groups
        .iter()
        .map(|g| GroupInfo {
            label: g.label.clone(),
            aggregate: g.aggregate,
            records: g.records.len(),
            baseline_omega_ar: g.omega_b,
            baseline_temp_c: g.temp_b,
            sample_year_max: g.sample_year_max,
        })
        .collect();
    let scenarios = prep
        .variants
        .iter()
        .skip(1)
        .map(|v| ScenarioInfo {
            name: v.name.clone(),
            offsets: site
                .seasons
                .iter()
                .zip(&v.offsets)
                .map(|(sn, o)| (sn.clone(), o.ta_umol_kg, o.dic_umol_kg))
                .collect(),
            start_year: v.start_year,
        })
        .collect();
    Outlook {
        site: site.name.clone(),
        settings,
        pathways,
        groups,
        scenarios,
        rows,
        crossings,
        probabilities,
        classes: s.classes.clone(),
        relationships: rels.clone(),
        calcification_baseline_kg_m2_yr: s.calcification.baseline_rate_kg_m2_yr,
        calcification_baseline_source: s.calcification.baseline_rate_source.clone(),
        notes,
    }
}

/// The solved states of one ensemble member, `[scenario][year]` (scenario 0 is the base
/// case), for checks and figures. `group` is a season label or the aggregate label.
pub fn member_states(
    site: &SiteInput,
    s: &ProjectionSettings,
    pathway: usize,
    group: &str,
    member: usize,
) -> Result<Vec<Vec<Result<CarbonateState, String>>>, OutlookError> {
    let prep = Prepared::new(site, s)?;
    let g = prep
        .groups
        .iter()
        .find(|g| g.label == group)
        .ok_or_else(|| input_err(format!("no season or aggregate named \"{group}\"")))?;
    if pathway >= s.pathways.len() {
        return Err(input_err(format!("pathway index {pathway} out of range")));
    }
    let draw = prep.draw(g, member);
    let ny = s.years.len();
    let mut out: Vec<Vec<Result<CarbonateState, String>>> = prep
        .variants
        .iter()
        .map(|_| (0..ny).map(|_| Err("not solved".to_string())).collect())
        .collect();
    prep.eval_member(pathway, &draw, None, &mut |yi, vi, res, _| {
        if let Some(slot) = out.get_mut(vi).and_then(|v| v.get_mut(yi)) {
            *slot = res;
        }
    });
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{BoronTotal, Conditions, K1K2, KfSource, MethodSet};
    use crate::outlook::{
        Disequilibrium, LocalScenario, Observed, Offsets, OutputFormat, OutputTable, Pathway,
        PathwaySpec, ProjectionRecord, project_record,
    };

    fn rec(season: usize, i: usize, t: f64, ta: f64, pco2: f64) -> ProjectionRecord {
        ProjectionRecord {
            label: format!("records.csv line {}", i + 2),
            season,
            sample_year: 2024,
            temp_c: t,
            salinity: 35.0,
            pressure_dbar: 2.0,
            silicate: 2.0,
            phosphate: 0.2,
            ta,
            pco2,
            measured: None,
        }
    }

    fn site() -> SiteInput {
        let records = vec![
            rec(0, 0, 26.0, 2290.0, 410.0),
            rec(0, 1, 26.5, 2300.0, 420.0),
            rec(0, 2, 27.0, 2310.0, 405.0),
            rec(1, 3, 28.5, 2270.0, 440.0),
            rec(1, 4, 29.0, 2280.0, 450.0),
            rec(1, 5, 29.5, 2275.0, 445.0),
        ];
        SiteInput {
            name: "Invented test reef".into(),
            seasons: vec!["dry".into(), "wet".into()],
            records,
            methods: MethodSet::default(),
            observed: Observed::noaa(),
        }
    }

    fn settings(site: &SiteInput, members: usize) -> ProjectionSettings {
        let mut s = ProjectionSettings::defaults_for(site);
        s.ensemble.members = members;
        s.years = vec![2025, 2030, 2040, 2050, 2060, 2070, 2080, 2090, 2100];
        s
    }

    fn all_bytes(o: &Outlook) -> Vec<u8> {
        let mut v = Vec::new();
        for t in [
            OutputTable::Quantiles,
            OutputTable::Crossings,
            OutputTable::Thresholds,
        ] {
            o.write(&mut v, OutputFormat::Csv, t).unwrap();
        }
        o.write(&mut v, OutputFormat::Json, OutputTable::Quantiles)
            .unwrap();
        v
    }

    /// Outside check: NumPy's documentation example, `np.percentile([[10, 7, 4], [3, 2, 1]], 50)`
    /// is 3.5 (linear interpolation, NumPy's default).
    #[test]
    fn quantile_matches_numpy_documentation_example() {
        let mut v = vec![10.0, 7.0, 4.0, 3.0, 2.0, 1.0];
        v.sort_by(f64::total_cmp);
        assert_eq!(quantile_sorted(&v, 0.5), 3.5);
        assert_eq!(quantile_sorted(&v, 0.0), 1.0);
        assert_eq!(quantile_sorted(&v, 1.0), 10.0);
        assert!(quantile_sorted(&[], 0.5).is_nan());
        assert_eq!(quantile_sorted(&[2.0], 0.95), 2.0);
    }

    /// Outside check: Orr et al. (2018), Mar. Chem. 207:84–107, Table 4 (fact sheet §2b, V):
    /// AT 2300 ± 2, CT 2000 ± 2 µmol/kg, S 35, 18 °C, P 0, PO4 2 ± 0.1, Si 60 ± 4, Lueker
    /// K1/K2, Uppström boron; standard uncertainty with inputs + constants + boron:
    /// u(Omega_ar) = 0.15579, u(pCO2) = 9.7333 µatm. The project's constant draws plus input
    /// draws must give the same standard deviations within Monte Carlo error (±4 % here).
    #[test]
    fn constant_draws_reproduce_orr2018_table4() {
        let m = MethodSet {
            k1k2: K1K2::Lueker2000,
            boron: BoronTotal::Uppstrom1974,
            kf: KfSource::DicksonRiley1979,
        };
        let mut rng = Xoshiro256::seed_from_u64(2018);
        let n = 20_000;
        let (mut om, mut pc) = (Vec::with_capacity(n), Vec::with_capacity(n));
        for _ in 0..n {
            let z: [f64; 8] = std::array::from_fn(|_| rng.normal());
            let cond = Conditions {
                temp_c: 18.0,
                salinity: 35.0,
                pressure_dbar: 0.0,
                silicate: 60.0 + 4.0 * rng.normal(),
                phosphate: 2.0 + 0.1 * rng.normal(),
            };
            let k = Constants::new(&cond, &m).perturbed(&constants_perturbation(z));
            let ta = 2300.0 + 2.0 * rng.normal();
            let dic = 2000.0 + 2.0 * rng.normal();
            let st = chem::solve_pair(Input::Ta(ta), Input::Dic(dic), &k).unwrap();
            om.push(st.omega_ar);
            pc.push(st.pco2);
        }
        let sd = |v: &[f64]| {
            let mean = v.iter().sum::<f64>() / v.len() as f64;
            (v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (v.len() - 1) as f64).sqrt()
        };
        let (s_om, s_pc) = (sd(&om), sd(&pc));
        assert!((s_om / 0.15579 - 1.0).abs() < 0.04, "u(Omega_ar) {s_om}");
        assert!((s_pc / 9.7333 - 1.0).abs() < 0.04, "u(pCO2) {s_pc}");
    }

    mod props {
        use super::super::*;
        use proptest::prelude::*;

        proptest! {
            /// Selection-based quantiles equal those of the fully sorted values.
            #[test]
            fn five_quantiles_equal_sorted_quantiles(
                mut v in proptest::collection::vec(-1e3f64..1e3, 0..300),
                nans in 0usize..3
            ) {
                let mut sorted = v.clone();
                sorted.sort_by(f64::total_cmp);
                v.extend(std::iter::repeat_n(f64::NAN, nans));
                let got = five_quantiles(&mut v);
                for (g, l) in got.iter().zip(QUANTILE_LEVELS) {
                    let e = quantile_sorted(&sorted, f64::from(l) / 100.0);
                    prop_assert!((g.is_nan() && e.is_nan()) || (g - e).abs() <= 1e-9 * (1.0 + e.abs()));
                }
            }
        }
    }

    #[test]
    fn results_do_not_depend_on_thread_count() {
        let site = site();
        let mut s = settings(&site, 150);
        s.ensemble.threads = Some(1);
        let a = run(&site, &s, &NoProgress).unwrap();
        s.ensemble.threads = Some(2);
        let b = run(&site, &s, &NoProgress).unwrap();
        s.ensemble.threads = Some(3);
        let c = run(&site, &s, &NoProgress).unwrap();
        assert_eq!(all_bytes(&a), all_bytes(&b));
        assert_eq!(all_bytes(&a), all_bytes(&c));
    }

    #[test]
    fn seed_reproduces_and_changes_the_ensemble() {
        let site = site();
        let s = settings(&site, 100);
        let a = all_bytes(&run(&site, &s, &NoProgress).unwrap());
        let b = all_bytes(&run(&site, &s, &NoProgress).unwrap());
        assert_eq!(a, b);
        let mut s2 = s.clone();
        s2.ensemble.seed += 1;
        let c = all_bytes(&run(&site, &s2, &NoProgress).unwrap());
        assert_ne!(a, c);
    }

    /// Common practice: the higher pathway is never above the lower one at the same member
    /// (same draws), wherever its atmospheric CO2 is at least as high (warming off).
    #[test]
    fn higher_pathway_never_above_lower_at_same_member() {
        let site = site();
        let mut s = settings(&site, 1000);
        s.pathways.insert(
            0,
            PathwaySpec::with_default_warming(Pathway::builtin("steady").unwrap(), &site.observed),
        );
        let xco2: Vec<Vec<f64>> = s
            .pathways
            .iter()
            .map(|p| {
                s.years
                    .iter()
                    .map(|&y| p.pathway.xco2_ppm(&site.observed, y).unwrap())
                    .collect()
            })
            .collect();
        for group in ["dry", "wet", AGGREGATE_LABEL] {
            for member in (0..1000).step_by(97) {
                let states: Vec<Vec<f64>> = (0..s.pathways.len())
                    .map(|p| {
                        member_states(&site, &s, p, group, member).unwrap()[0]
                            .iter()
                            .map(|r| r.as_ref().unwrap().omega_ar)
                            .collect()
                    })
                    .collect();
                for yi in 0..s.years.len() {
                    for a in 0..s.pathways.len() {
                        for b in 0..s.pathways.len() {
                            if xco2[a][yi] >= xco2[b][yi] {
                                assert!(
                                    states[a][yi] <= states[b][yi] + 1e-12,
                                    "{group} member {member} year {}",
                                    s.years[yi]
                                );
                            }
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn ensemble_off_reproduces_the_deterministic_projection() {
        let mut site = site();
        site.records.truncate(1);
        site.seasons.truncate(1);
        let s = settings(&site, 0);
        let o = run(&site, &s, &NoProgress).unwrap();
        for (p, spec) in s.pathways.iter().enumerate() {
            let series = o.series(&spec.pathway.name, BASE_SCENARIO, "dry", "omega_ar");
            assert_eq!(series.len(), s.years.len());
            for (yi, (year, q)) in series.iter().enumerate() {
                let pt = project_record(
                    &site.records[0],
                    &spec.pathway,
                    &site.observed,
                    None,
                    &site.methods,
                    Disequilibrium::Ratio,
                    None,
                    *year,
                )
                .unwrap();
                assert_eq!(*year, s.years[yi]);
                for v in q {
                    assert!((v - pt.state.omega_ar).abs() < 1e-12, "pathway {p}");
                }
            }
        }
    }

    /// Common practice: the ensemble spread is dominated by the constants' uncertainty
    /// (Orr et al. 2018 find u(Omega_ar) ≈ 0.16 with constants, ≈ 0.03 without); turning the
    /// constants off must narrow the 5–95 % range several-fold for a single record.
    #[test]
    fn constants_dominate_the_spread() {
        let mut site = site();
        site.records.truncate(1);
        site.seasons.truncate(1);
        let mut s = settings(&site, 2000);
        let o = run(&site, &s, &NoProgress).unwrap();
        let w = |o: &Outlook| {
            let q = o.series("SSP2-4.5", BASE_SCENARIO, "dry", "omega_ar")[0].1;
            q[4] - q[0]
        };
        let with = w(&o);
        s.ensemble.constants = false;
        let without = w(&run(&site, &s, &NoProgress).unwrap());
        assert!(
            with > 0.35 && with < 0.7,
            "5-95 % width with constants {with}"
        );
        assert!(without < with / 3.0, "{without} vs {with}");
    }

    #[test]
    fn scenario_offsets_raise_omega_member_by_member() {
        let site = site();
        let mut s = settings(&site, 200);
        s.scenarios.push(LocalScenario {
            name: "alkalinity +30".into(),
            all_seasons: Offsets {
                ta_umol_kg: 30.0,
                dic_umol_kg: 0.0,
            },
            by_season: vec![],
            start_year: Some(2040),
        });
        let o = run(&site, &s, &NoProgress).unwrap();
        for season in ["dry", "wet", AGGREGATE_LABEL] {
            let base = o.series("SSP2-4.5", BASE_SCENARIO, season, "omega_ar");
            let with = o.series("SSP2-4.5", "alkalinity +30", season, "omega_ar");
            for ((y, qb), (_, qs)) in base.iter().zip(&with) {
                if *y < 2040 {
                    assert_eq!(qb, qs);
                } else {
                    assert!(qs[2] > qb[2] + 0.05, "{season} {y}");
                }
            }
        }
        assert_eq!(o.scenarios.len(), 1);
    }

    #[test]
    fn crossing_rows_follow_the_quantile_series() {
        let site = site();
        let s = settings(&site, 300);
        let o = run(&site, &s, &NoProgress).unwrap();
        for row in o
            .crossings
            .iter()
            .filter(|r| r.kind == CrossingKind::OmegaArBelow)
        {
            if row.season == WORST_SEASON_LABEL {
                // The worst season crosses no later than any season.
                for season in ["dry", "wet"] {
                    let other = o
                        .crossings
                        .iter()
                        .find(|r| {
                            r.season == season
                                && r.pathway == row.pathway
                                && r.criterion == row.criterion
                                && r.scenario == row.scenario
                        })
                        .unwrap();
                    if let Some(y) = other.first_year[1] {
                        assert!(row.first_year[1].is_some_and(|w| w <= y));
                    }
                }
                continue;
            }
            let series = o.series(&row.pathway, &row.scenario, &row.season, "omega_ar");
            let expect = series
                .iter()
                .find(|(_, q)| q[2] < row.threshold)
                .map(|(y, _)| *y);
            assert_eq!(row.first_year[1], expect);
            // p05 crosses no later than p50, p50 no later than p95.
            if let (Some(a), Some(b)) = (row.first_year[0], row.first_year[1]) {
                assert!(a <= b);
            }
        }
        // Probabilities are percentages and the class of the median is reported.
        assert!(
            o.probabilities
                .iter()
                .all(|p| (0.0..=100.0).contains(&p.prob_below_pct))
        );
    }

    /// A record measured as TA + DIC keeps its measured DIC at the sampling year under every
    /// draw of the constants (the pair is re-solved per member); one measured as TA + pCO2
    /// keeps its pCO2 instead, and its DIC varies with the constants.
    #[test]
    fn members_respect_the_measured_pair() {
        use crate::outlook::projection::Measurement;
        let mut site = site();
        site.records.truncate(1);
        site.seasons.truncate(1);
        let k = Constants::new(&site.records[0].conditions_at(26.0), &site.methods);
        let st = chem::solve_pair(Input::Ta(2290.0), Input::Pco2(410.0), &k).unwrap();
        let mut s = settings(&site, 50);
        s.years = vec![2024, 2050];
        s.ensemble.measurement = MeasurementUncertainty {
            ta_umol_kg: 0.0,
            dic_umol_kg: 0.0,
            ph: 0.0,
            pco2_pct: 0.0,
        };
        let dic_spread = |site: &SiteInput| {
            let dics: Vec<f64> = (0..50)
                .map(|m| {
                    member_states(site, &s, 2, "dry", m).unwrap()[0][0]
                        .as_ref()
                        .unwrap()
                        .dic
                })
                .collect();
            let pco2: Vec<f64> = (0..50)
                .map(|m| {
                    member_states(site, &s, 2, "dry", m).unwrap()[0][0]
                        .as_ref()
                        .unwrap()
                        .pco2
                })
                .collect();
            let span = |v: &[f64]| {
                v.iter().cloned().fold(f64::MIN, f64::max)
                    - v.iter().cloned().fold(f64::MAX, f64::min)
            };
            (span(&dics), span(&pco2))
        };
        let (d, p) = dic_spread(&site);
        assert!(
            d > 1.0 && p < 1e-9,
            "TA+pCO2 record: DIC span {d}, pCO2 span {p}"
        );
        site.records[0].measured = Some(Measurement {
            a: Input::Ta(2290.0),
            b: Input::Dic(st.dic),
            sd_a: None,
            sd_b: None,
        });
        let (d, p) = dic_spread(&site);
        assert!(
            d < 1e-6 && p > 1.0,
            "TA+DIC record: DIC span {d}, pCO2 span {p}"
        );
    }

    #[test]
    fn calcification_zero_year_under_extreme_pathway() {
        let mut site = site();
        site.records.truncate(1);
        site.seasons.truncate(1);
        let mut s = settings(&site, 0);
        s.pathways = vec![PathwaySpec::with_default_warming(
            Pathway::user("extreme", &[(2030, 600.0), (2100, 3000.0)]).unwrap(),
            &site.observed,
        )];
        let o = run(&site, &s, &NoProgress).unwrap();
        let omega = o.series("extreme", BASE_SCENARIO, "dry", "omega_ar");
        let first_unsat = omega.iter().find(|(_, q)| q[2] <= 1.0).map(|(y, _)| *y);
        assert!(first_unsat.is_some(), "{omega:?}");
        for id in ["silverman2009", "langdon2005"] {
            let row = o
                .crossings
                .iter()
                .find(|r| r.season == "dry" && r.criterion.contains(id))
                .unwrap();
            assert_eq!(row.first_year[1], first_unsat, "{id}");
        }
        let cc = o
            .crossings
            .iter()
            .find(|r| r.season == "dry" && r.criterion.contains("chan2013"))
            .unwrap();
        assert_eq!(
            cc.first_year[1], None,
            "a -15 %/unit line cannot reach -100 % here"
        );
        // Rows below Omega_ar 1 are flagged as extrapolation.
        let flagged = o
            .rows
            .iter()
            .filter(|r| {
                r.quantity == "net_calc_kg_m2_yr_silverman2009" && Some(r.year) >= first_unsat
            })
            .all(|r| r.outside_fit_pct == Some(100.0));
        assert!(flagged);
    }

    #[test]
    fn bad_settings_give_clear_errors() {
        let site = site();
        let mut s = settings(&site, 10);
        s.ensemble.members = MAX_MEMBERS + 1;
        assert!(
            run(&site, &s, &NoProgress)
                .unwrap_err()
                .to_string()
                .contains("limit")
        );
        let mut s = settings(&site, 10);
        s.ensemble.threads = Some(0);
        assert!(run(&site, &s, &NoProgress).is_err());
        let mut s = settings(&site, 10);
        s.years = vec![2050, 2040];
        assert!(
            run(&site, &s, &NoProgress)
                .unwrap_err()
                .to_string()
                .contains("increase")
        );
        let mut s = settings(&site, 10);
        s.pathways.push(s.pathways[0].clone());
        assert!(
            run(&site, &s, &NoProgress)
                .unwrap_err()
                .to_string()
                .contains("twice")
        );
        let mut s = settings(&site, 10);
        s.years = vec![2120];
        let e = run(&site, &s, &NoProgress).unwrap_err().to_string();
        assert!(e.contains("2120") && e.contains("SSP1-1.9"), "{e}");
        let mut bad = site.clone();
        bad.records[2].pco2 = -5.0;
        let e = run(&bad, &settings(&bad, 10), &NoProgress)
            .unwrap_err()
            .to_string();
        assert!(e.contains("line 4") && e.contains("pco2"), "{e}");
        let mut s = settings(&site, 10);
        s.scenarios.push(LocalScenario {
            name: "none".into(),
            ..Default::default()
        });
        assert!(run(&site, &s, &NoProgress).is_err());
    }

    #[test]
    fn outputs_carry_units_and_fixed_decimals() {
        let site = site();
        let s = settings(&site, 50);
        let o = run(&site, &s, &NoProgress).unwrap();
        let mut csv = Vec::new();
        o.write_quantiles_csv(&mut csv).unwrap();
        let text = String::from_utf8(csv).unwrap();
        let mut lines = text.lines();
        assert_eq!(
            lines.next().unwrap(),
            "pathway,scenario,year,season,quantity,p05,p25,p50,p75,p95,members,outside_fit_pct"
        );
        let omega = lines.find(|l| l.contains(",omega_ar,")).unwrap();
        let p50 = omega.split(',').nth(7).unwrap();
        assert_eq!(p50.split('.').nth(1).unwrap().len(), 4, "{omega}");
        for q in [
            "pco2_uatm",
            "dic_umol_kg",
            "net_calc_kg_m2_yr_chan2013",
            "calc_change_pct_silverman2009",
        ] {
            assert!(text.contains(&format!(",{q},")), "{q}");
        }
        let mut json = Vec::new();
        o.write_json(&mut json).unwrap();
        let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
        assert!(!v["thresholds"]["crossings"].as_array().unwrap().is_empty());
        assert!(
            !v["calcification"]["zero_years"]
                .as_array()
                .unwrap()
                .is_empty()
        );
        assert_eq!(
            v["calcification"]["relationships"]
                .as_array()
                .unwrap()
                .len(),
            3
        );
        assert_eq!(v["quantiles"].as_array().unwrap().len(), o.rows.len());
    }
}
