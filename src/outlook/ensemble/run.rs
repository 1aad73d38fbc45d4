//! Solving the members: one task per (pathway, group). A member is one plausible value of
//! the group's time-weighted mean state in every computed year: the bootstrap re-weighting of
//! the group's station-days (each record projected on its own, [`super::central`]) plus the
//! member's draws of the constants, of the measurement errors of the mean and of the warming,
//! propagated through the group's representative record.

use rayon::prelude::*;

use crate::chem::{Constants, Perturbation};

use super::super::projection::{Start, YearConditions, project_state, solve_projected};
use super::super::result::{QuantilePoint, Quantiles, Quantity, RuleComparison};
use super::super::rng::Xoshiro256;
use super::super::warming::warming_factor;
use super::super::{OutlookError, ProjectionSettings, SiteInput};
use super::assemble::assemble;
use super::central::{Central, NQ, OMEGA_AR, TEMP, Values, project_all, values_of};
use super::draws::{MemberDraw, constants_perturbation, member_source_start, member_start};
use super::means::{StationDays, weighted_mean};
use super::prepare::{Group, Prepared};
use super::quantiles::five_quantiles;
use super::settings::{Progress, input_err};

/// Stream key of the draws a member shares across groups (constants and warming).
const SHARED_KEY: u64 = u64::MAX - 1;

/// Percent below one habitat threshold, per horizon year.
#[derive(Clone, Debug)]
pub(super) struct ThresholdShare {
    pub class: String,
    pub threshold: f64,
    pub pct_below: Vec<f64>,
}

/// Summary of one variant of one (pathway, group) task.
pub(super) struct VariantSummary {
    /// One series per quantity, in output order.
    pub series: Vec<(Quantity, Vec<QuantilePoint>)>,
    /// Uncertainty: percent of members whose mean lies below each threshold, high to low.
    pub below: Vec<ThresholdShare>,
    /// Variability: time-weighted percent of records below each threshold, high to low.
    pub time_below: Vec<ThresholdShare>,
    /// Each member's mean Omega_ar at sampling.
    pub omega_present: Vec<f64>,
    /// Each member's mean Omega_ar at the computed years, `[member * knots + k]`.
    pub omega_knots: Vec<f64>,
}

impl VariantSummary {
    /// The series of one quantity.
    pub fn series_of(&self, q: Quantity) -> Option<&[QuantilePoint]> {
        self.series
            .iter()
            .find(|(x, _)| *x == q)
            .map(|(_, p)| p.as_slice())
    }
}

pub(super) struct TaskOut {
    /// Per variant (base case first).
    pub variants: Vec<VariantSummary>,
    pub failures: usize,
    pub first_failure: Option<String>,
}

/// The draws of member `m` that every group shares: constants and the warming factor.
struct Shared {
    perturbation: Option<Perturbation>,
    warming: f64,
}

fn shared_draw(prep: &Prepared<'_>, m: usize) -> Shared {
    let e = &prep.s.ensemble;
    if e.members == 0 {
        return Shared {
            perturbation: None,
            warming: 1.0,
        };
    }
    let mut rng = Xoshiro256::for_stream(&[e.seed, SHARED_KEY, m as u64]);
    let z: [f64; 8] = std::array::from_fn(|_| rng.normal());
    Shared {
        perturbation: e.constants.then(|| constants_perturbation(z)),
        warming: if prep.s.warming {
            warming_factor(m, e.members)
        } else {
            1.0
        },
    }
}

/// The group's tables for one pathway: station-day means of the central projections and
/// the representative record's central state and temperature sensitivity.
struct GroupTables {
    /// `[variant]`: station-day values at every computed year.
    unit_at: Vec<StationDays>,
    /// `[unit]`
    unit_present: Vec<Values>,
    /// Representative record: central conditions per knot (`None`: not solvable).
    rep_cond: Vec<Option<YearConditions>>,
    /// `[variant][k]`: its central values and their change per °C of warming.
    rep_central: Vec<Vec<Values>>,
    rep_per_degree: Vec<Vec<Values>>,
    /// Its central warming per knot, °C.
    rep_warming: Vec<f64>,
    rep_k_sample: Constants,
    /// Central constants of its source water at sampling (`None`: no source water).
    rep_k_source: Option<Constants>,
}

impl Prepared<'_> {
    fn tables(&self, p: usize, g: &Group, central: &Central) -> Option<GroupTables> {
        let (site, s) = (self.site, self.s);
        let nk = self.knots.len();
        let unit_mean = |unit: &[usize], f: &dyn Fn(usize) -> Option<Values>| {
            let vals: Vec<Values> = unit
                .iter()
                .filter_map(|&l| g.records.get(l).and_then(|&r| f(r)))
                .collect();
            let counts = vec![1u32; vals.len()];
            weighted_mean(&counts, |i| vals.get(i))
        };
        let unit_at = (0..self.variants.len())
            .map(|v| {
                let mut out = Vec::with_capacity(g.units.len() * nk);
                for unit in &g.units.records {
                    for k in 0..nk {
                        out.push(unit_mean(unit, &|r| central.get(v, r, k).copied()));
                    }
                }
                StationDays::new(out, nk)
            })
            .collect();
        let unit_present = g
            .units
            .records
            .iter()
            .map(|unit| unit_mean(unit, &|r| self.present.get(r).copied()))
            .collect();
        let spec = s.pathways.get(p)?;
        let rep = site.records.get(g.representative)?;
        let anchor = self.anchors.get(p)?.get(g.representative)?;
        let change = |year: i32| {
            if s.warming {
                spec.warming.change_between(rep.sample_year, year)
            } else {
                0.0
            }
        };
        let cond = |year: i32, dt: f64| {
            YearConditions::with_change(
                rep,
                &spec.pathway,
                &site.observed,
                change(year) + dt,
                &site.methods,
                year,
                s.mode,
            )
            .ok()
        };
        let solve_at = |yc: &YearConditions, v: usize, year: i32| {
            let off = self.variants.get(v)?.offsets_for(rep.season, year);
            project_state(rep, anchor, &Start::central(rep), yc, None, s.mode, off)
                .ok()
                .map(|st| values_of(&st, yc.temp_c))
        };
        let rep_cond: Vec<Option<YearConditions>> =
            self.knots.iter().map(|&y| cond(y, 0.0)).collect();
        let mut rep_central = Vec::with_capacity(self.variants.len());
        let mut rep_per_degree = Vec::with_capacity(self.variants.len());
        for v in 0..self.variants.len() {
            let mut c = Vec::with_capacity(nk);
            let mut d = Vec::with_capacity(nk);
            for (&year, yc) in self.knots.iter().zip(&rep_cond) {
                let nan = [f64::NAN; NQ];
                c.push(
                    yc.as_ref()
                        .and_then(|yc| solve_at(yc, v, year))
                        .unwrap_or(nan),
                );
                // Central difference over ±0.5 °C.
                let hi = cond(year, 0.5).and_then(|yc| solve_at(&yc, v, year));
                let lo = cond(year, -0.5).and_then(|yc| solve_at(&yc, v, year));
                d.push(match (hi, lo) {
                    (Some(h), Some(l)) => std::array::from_fn(|i| h[i] - l[i]),
                    _ => [0.0; NQ],
                });
            }
            rep_central.push(c);
            rep_per_degree.push(d);
        }
        Some(GroupTables {
            unit_at,
            unit_present,
            rep_cond,
            rep_central,
            rep_per_degree,
            rep_warming: self.knots.iter().map(|&y| change(y)).collect(),
            rep_k_sample: Constants::new(&rep.conditions_at(rep.temp_c), &site.methods),
            // Worked out once per record already, with its anchor.
            rep_k_source: anchor.source.as_ref().map(|a| a.k_sample),
        })
    }

    /// The member's corrections through the representative record: its values with the
    /// member's constants, measurement errors of the mean (each error divided by √units) and
    /// warming, minus its central values; `[variant][k]` and at sampling. `None` when the
    /// record cannot be re-solved with the member's draws.
    fn corrections(
        &self,
        p: usize,
        g: &Group,
        t: &GroupTables,
        shared: &Shared,
        z: &MeasurementZ,
    ) -> Result<(Vec<Vec<Values>>, Values), String> {
        let (site, s) = (self.site, self.s);
        let nv = self.variants.len();
        let nk = self.knots.len();
        let zero = [0.0; NQ];
        let no_draws = shared.perturbation.is_none() && z.is_zero();
        if s.ensemble.members == 0 || (no_draws && shared.warming == 1.0) {
            return Ok((vec![vec![zero; nk]; nv], zero));
        }
        let (Some(rep), Some(anchor)) = (
            site.records.get(g.representative),
            self.anchors.get(p).and_then(|a| a.get(g.representative)),
        ) else {
            return Err("no representative record".to_string());
        };
        let scale = 1.0 / (g.units.len().max(1) as f64).sqrt();
        let draw = MemberDraw {
            perturbation: shared.perturbation,
            z_a: z.reef.0 * scale,
            z_b: z.reef.1 * scale,
        };
        let (ta, pco2) = member_start(
            &s.ensemble,
            &site.methods,
            rep,
            &draw,
            Some(&t.rep_k_sample),
        )?;
        let source = match (&rep.source, &t.rep_k_source) {
            (Some(sw), Some(k)) => Some(member_source_start(
                &s.ensemble,
                sw,
                z.source,
                k,
                shared.perturbation.as_ref(),
            )?),
            _ => None,
        };
        let start = Start {
            ta,
            pco2,
            source,
            held: None,
        }
        .holding_offsets(rep, anchor, s.mode, shared.perturbation.as_ref());
        let k_sample = match &shared.perturbation {
            Some(pt) => t.rep_k_sample.perturbed(pt),
            None => t.rep_k_sample,
        };
        let pco2_now = anchor.project_pco2(pco2, anchor.pco2_air_sample, s.mode);
        let now = solve_projected(ta, pco2_now, None, &k_sample)
            .map(|st| values_of(&st, rep.temp_c))
            .map_err(|e| format!("present state with this member's draws: {e}"))?;
        let rep_now = self
            .present
            .get(g.representative)
            .copied()
            .unwrap_or([f64::NAN; NQ]);
        let present: Values = std::array::from_fn(|i| now[i] - rep_now[i]);
        let mut out = vec![Vec::with_capacity(nk); nv];
        for (k, (&year, yc)) in self.knots.iter().zip(&t.rep_cond).enumerate() {
            let Some(yc) = yc else {
                return Err(format!("conditions in {year}"));
            };
            let dt = (shared.warming - 1.0) * t.rep_warming.get(k).copied().unwrap_or(0.0);
            for (v, row) in out.iter_mut().enumerate() {
                let off = self
                    .variants
                    .get(v)
                    .and_then(|x| x.offsets_for(rep.season, year));
                let pt = shared.perturbation.as_ref();
                let st = project_state(rep, anchor, &start, yc, pt, s.mode, off)
                    .map_err(|e| format!("{year} with this member's draws: {e}"))?;
                let vals = values_of(&st, yc.temp_c);
                let c = t.rep_central.get(v).and_then(|c| c.get(k)).unwrap_or(&zero);
                let d = t
                    .rep_per_degree
                    .get(v)
                    .and_then(|c| c.get(k))
                    .unwrap_or(&zero);
                row.push(std::array::from_fn(|i| vals[i] - c[i] + dt * d[i]));
            }
        }
        Ok((out, present))
    }
}

/// A member's standard normal deviates of measurement errors: the reef record's measured
/// pair and its source water's TA and DIC (zero without source water).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
struct MeasurementZ {
    reef: (f64, f64),
    source: (f64, f64),
}

impl MeasurementZ {
    fn is_zero(&self) -> bool {
        *self == MeasurementZ::default()
    }
}

/// What the members of one variant gave: present and per-knot mean values.
struct MemberValues {
    present: Vec<Values>,
    /// `[member * knots + k]`
    at: Vec<Values>,
}

/// Solves every member of group `g` under pathway `p` and summarises them.
fn run_task(
    prep: &Prepared<'_>,
    p: usize,
    g: &Group,
    central: &Central,
    progress: &dyn Progress,
) -> TaskOut {
    let s = prep.s;
    let nk = prep.knots.len();
    let nv = prep.variants.len();
    let members = s.ensemble.members.max(1);
    let mut vals: Vec<MemberValues> = (0..nv)
        .map(|_| MemberValues {
            present: Vec::with_capacity(members),
            at: Vec::with_capacity(members * nk),
        })
        .collect();
    let mut failures = 0usize;
    let mut first_failure: Option<String> = None;
    let Some(t) = prep.tables(p, g, central) else {
        return TaskOut {
            variants: Vec::new(),
            failures: 1,
            first_failure: Some(format!("{}: the representative record", g.label)),
        };
    };
    let mut counts = Vec::new();
    let (mut sums, mut means) = (Vec::with_capacity(nk), Vec::with_capacity(nk));
    for m in 0..members {
        let mut rng = Xoshiro256::for_stream(&[s.ensemble.seed, g.key, m as u64]);
        if s.ensemble.members == 0 {
            counts.clear();
            counts.resize(g.units.len(), 1);
        } else {
            g.units.draw_counts(&mut rng, &mut counts);
        }
        let z = if s.ensemble.members == 0 {
            MeasurementZ::default()
        } else {
            // The source water's deviates are drawn after the reef's, and only when it has
            // source water, so that a site without one keeps its streams.
            let reef = (rng.normal(), rng.normal());
            let source = if t.rep_k_source.is_some() {
                (rng.normal(), rng.normal())
            } else {
                (0.0, 0.0)
            };
            MeasurementZ { reef, source }
        };
        let shared = shared_draw(prep, m);
        let nan = [f64::NAN; NQ];
        let (corr, corr_now) = match prep.corrections(p, g, &t, &shared, &z) {
            Ok(c) => c,
            Err(msg) => {
                failures += nk;
                if first_failure.is_none() {
                    first_failure = Some(format!("{} member {m}: {msg}", g.label));
                }
                (vec![vec![nan; nk]; nv], nan)
            }
        };
        let now = weighted_mean(&counts, |u| t.unit_present.get(u));
        for (v, out) in vals.iter_mut().enumerate() {
            out.present
                .push(std::array::from_fn(|i| now[i] + corr_now[i]));
            match t.unit_at.get(v) {
                Some(days) => days.means(&counts, &mut sums, &mut means),
                None => means.clear(),
            }
            for k in 0..nk {
                let mean = means.get(k).unwrap_or(&nan);
                let c = corr.get(v).and_then(|c| c.get(k)).unwrap_or(&nan);
                out.at.push(std::array::from_fn(|i| mean[i] + c[i]));
            }
        }
        progress.advance(nk as u64);
    }
    let variants = vals
        .iter()
        .enumerate()
        .map(|(v, mv)| summarise(prep, g, central, v, mv))
        .collect();
    TaskOut {
        variants,
        failures,
        first_failure,
    }
}

/// Quantiles of every quantity, the shares below each threshold at the horizon years, and
/// the members' Omega_ar trajectories.
fn summarise(
    prep: &Prepared<'_>,
    g: &Group,
    central: &Central,
    v: usize,
    mv: &MemberValues,
) -> VariantSummary {
    let s = prep.s;
    let nk = prep.knots.len();
    let n = mv.present.len();
    let at = |m: usize, k: usize| mv.at.get(m * nk + k);
    let mut scratch = Vec::new();
    let mut point = |year: i32, values: &mut dyn Iterator<Item = f64>, outside: Option<f64>| {
        scratch.clear();
        scratch.extend(values);
        let q = five_quantiles(&mut scratch);
        QuantilePoint {
            year,
            q: Quantiles::from_levels(q),
            members: scratch.len(),
            outside_fit_pct: outside,
        }
    };
    let horizons: Vec<(i32, usize)> = s
        .years
        .iter()
        .copied()
        .zip(prep.horizon_knot.iter().copied())
        .collect();
    let mut series: Vec<(Quantity, Vec<QuantilePoint>)> = Vec::new();
    for (i, q) in Quantity::STATE.into_iter().enumerate() {
        let pts = horizons
            .iter()
            .map(|&(y, k)| {
                point(
                    y,
                    &mut (0..n).map(|m| at(m, k).map_or(f64::NAN, |x| x[i])),
                    None,
                )
            })
            .collect();
        series.push((q, pts));
    }
    for (q, i) in [
        (Quantity::OmegaArChange, OMEGA_AR),
        (Quantity::PhTChange, 2),
    ] {
        let pts = horizons
            .iter()
            .map(|&(y, k)| {
                point(
                    y,
                    &mut (0..n).map(|m| match (at(m, k), mv.present.get(m)) {
                        (Some(x), Some(p)) => x[i] - p[i],
                        _ => f64::NAN,
                    }),
                    None,
                )
            })
            .collect();
        series.push((q, pts));
    }
    let rate = s.calcification.site_rate.as_ref().map(|r| r.kg_m2_yr);
    for rel in &s.calcification.relationships {
        let factor = |m: usize, k: usize| {
            let (x, p) = (at(m, k)?, mv.present.get(m)?);
            rel.relative(x[OMEGA_AR], x[TEMP], p[OMEGA_AR], p[TEMP])
        };
        let mut change = Vec::with_capacity(horizons.len());
        let mut net = Vec::with_capacity(horizons.len());
        for &(y, k) in &horizons {
            let solved = (0..n)
                .filter_map(|m| at(m, k))
                .filter(|x| x[OMEGA_AR].is_finite());
            let (mut all, mut outside) = (0usize, 0usize);
            for x in solved {
                all += 1;
                outside += usize::from(!rel.in_range(x[OMEGA_AR], x[TEMP]));
            }
            let out_pct = if all == 0 {
                f64::NAN
            } else {
                100.0 * outside as f64 / all as f64
            };
            change.push(point(
                y,
                &mut (0..n).map(|m| factor(m, k).map_or(f64::NAN, |f| (f - 1.0) * 100.0)),
                Some(out_pct),
            ));
            if let Some(rate) = rate {
                net.push(point(
                    y,
                    &mut (0..n).map(|m| factor(m, k).map_or(f64::NAN, |f| rate * f)),
                    Some(out_pct),
                ));
            }
        }
        let [qc, qn] = Quantity::of_relationship(rel.rel_id());
        series.push((qc, change));
        if rate.is_some() {
            series.push((qn, net));
        }
    }
    series.extend(nec_series(prep, mv, &horizons));
    let thresholds = s.classes.thresholds();
    let shares = |pct: &dyn Fn(f64, usize) -> f64| -> Vec<ThresholdShare> {
        thresholds
            .iter()
            .map(|(class, t)| ThresholdShare {
                class: class.clone(),
                threshold: *t,
                pct_below: horizons.iter().map(|&(_, k)| pct(*t, k)).collect(),
            })
            .collect()
    };
    let below = shares(&|t, k| {
        let om: Vec<f64> = (0..n)
            .map(|m| at(m, k).map_or(f64::NAN, |x| x[OMEGA_AR]))
            .collect();
        100.0 * super::super::thresholds::fraction_below(&om, t)
    });
    let time_below =
        shares(&|t, k| time_share_below(g, t, |r| central.get(v, r, k).map(|x| x[OMEGA_AR])));
    VariantSummary {
        series,
        below,
        time_below,
        omega_present: mv.present.iter().map(|x| x[OMEGA_AR]).collect(),
        omega_knots: mv.at.iter().map(|x| x[OMEGA_AR]).collect(),
    }
}

/// NEC and its paired change per available field relationship, at the horizon years: each
/// member's mean Omega_ar in the year against its own present-day mean (the relationship
/// anchored, when the site gives a measured NEC, at that member's present state unless the
/// site states the Omega_ar of its measurement).
fn nec_series(
    prep: &Prepared<'_>,
    mv: &MemberValues,
    horizons: &[(i32, usize)],
) -> Vec<(Quantity, Vec<QuantilePoint>)> {
    let nk = prep.knots.len();
    let mut out = Vec::new();
    for &(id, _) in &prep.nec {
        let Some(rel) = prep
            .s
            .nec
            .relationships
            .iter()
            .find(|r| r.id == id.as_str())
        else {
            continue;
        };
        // (nec, change, outside span) per member, per horizon.
        let mut per_h: Vec<Vec<(f64, f64, bool)>> =
            vec![Vec::with_capacity(mv.present.len()); horizons.len()];
        for (m, p) in mv.present.iter().enumerate() {
            let models = prep.s.nec.models(p[OMEGA_AR]);
            let model = models
                .iter()
                .find(|(x, _)| *x == id.as_str())
                .and_then(|(_, r)| r.as_ref().ok());
            for (h, &(_, k)) in horizons.iter().enumerate() {
                let v = match (model, mv.at.get(m * nk + k)) {
                    (Some(model), Some(x))
                        if x[OMEGA_AR].is_finite() && p[OMEGA_AR].is_finite() =>
                    {
                        let now = model.nec(x[OMEGA_AR], x[TEMP]);
                        let outside = rel.extrapolation(x[OMEGA_AR], x[TEMP])
                            != super::super::nec::Extrapolation::Inside;
                        (now, now - model.nec(p[OMEGA_AR], p[TEMP]), outside)
                    }
                    _ => (f64::NAN, f64::NAN, false),
                };
                if let Some(slot) = per_h.get_mut(h) {
                    slot.push(v);
                }
            }
        }
        let checked = !matches!(rel.omega_span, super::super::nec::OmegaSpan::NotVerified);
        let mut nec_pts = Vec::with_capacity(horizons.len());
        let mut change_pts = Vec::with_capacity(horizons.len());
        for (&(year, _), vals) in horizons.iter().zip(&per_h) {
            let solved = vals.iter().filter(|v| v.0.is_finite()).count();
            let outside = vals.iter().filter(|v| v.0.is_finite() && v.2).count();
            let pct = (checked && solved > 0).then(|| 100.0 * outside as f64 / solved as f64);
            let point = |f: fn(&(f64, f64, bool)) -> f64| {
                let mut xs: Vec<f64> = vals.iter().map(f).collect();
                let q = five_quantiles(&mut xs);
                QuantilePoint {
                    year,
                    q: Quantiles::from_levels(q),
                    members: xs.len(),
                    outside_fit_pct: pct,
                }
            };
            nec_pts.push(point(|v| v.0));
            change_pts.push(point(|v| v.1));
        }
        out.push((Quantity::Nec(id), nec_pts));
        out.push((Quantity::NecChange(id), change_pts));
    }
    out
}

/// Time-weighted percent of the group's records with Omega_ar below `t` (records without a
/// value left out and the weights renormalised).
pub(super) fn time_share_below(g: &Group, t: f64, omega: impl Fn(usize) -> Option<f64>) -> f64 {
    let (mut below, mut all) = (0.0, 0.0);
    for (&r, &w) in g.records.iter().zip(&g.weights) {
        if let Some(x) = omega(r).filter(|x| x.is_finite()) {
            all += w;
            if x < t {
                below += w;
            }
        }
    }
    if all > 0.0 {
        100.0 * below / all
    } else {
        f64::NAN
    }
}

/// Runs the projection ensemble and assembles the outlook.
pub fn run(
    site: &SiteInput,
    s: &ProjectionSettings,
    progress: &dyn Progress,
) -> Result<super::super::Outlook, OutlookError> {
    let prep = Prepared::new(site, s)?;
    let nk = prep.knots.len() as u64;
    let total: u64 =
        (s.pathways.len() * prep.groups.len()) as u64 * s.ensemble.members.max(1) as u64 * nk;
    progress.start(total);
    let has_source = site.records.iter().any(|r| r.source.is_some());
    // At a site with source water the other rules are projected beside the run's own.
    let compared = if has_source {
        super::rules::other_rules(s.mode)
    } else {
        Vec::new()
    };
    let work = || -> (Vec<Central>, Vec<TaskOut>, Vec<RuleComparison>) {
        let centrals: Vec<Central> = (0..s.pathways.len())
            .map(|p| project_all(&prep, p, s.mode, &compared))
            .collect();
        // Task order (pathway-major, then group) is the order of `outs`.
        let tasks: Vec<(usize, &Group)> = (0..s.pathways.len())
            .flat_map(|p| prep.groups.iter().map(move |g| (p, g)))
            .collect();
        let outs = tasks
            .par_iter()
            .map(|&(p, g)| match centrals.get(p) {
                Some(c) => run_task(&prep, p, g, c, progress),
                None => TaskOut {
                    variants: Vec::new(),
                    failures: 0,
                    first_failure: None,
                },
            })
            .collect();
        let rules = if has_source {
            super::rules::compare_rules(&prep, &centrals)
        } else {
            Vec::new()
        };
        (centrals, outs, rules)
    };
    let (centrals, outs, rules) = match s.ensemble.threads {
        Some(n) => rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build()
            .map_err(|e| input_err(format!("could not start {n} worker threads: {e}")))?
            .install(work),
        None => work(),
    };
    let mut outlook = assemble(&prep, &centrals, &outs);
    outlook.rule_comparison = rules;
    Ok(outlook)
}
