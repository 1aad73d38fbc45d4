//! Solving the members: one task per (pathway, group), each member under every horizon year
//! and variant, summarised into quantiles and threshold shares per year.

use rayon::prelude::*;

use crate::chem::{CarbonateState, Constants};

use super::super::calcification::Relationship;
use super::super::projection::{YearConditions, solve_projected};
use super::super::result::{QuantilePoint, Quantiles, Quantity};
use super::super::thresholds::fraction_below;
use super::super::{OutlookError, ProjectionSettings, SiteInput};
use super::assemble::assemble;
use super::draws::{MemberDraw, draw, member_start};
use super::prepare::{Group, Prepared};
use super::quantiles::five_quantiles;
use super::settings::{Progress, input_err};

/// A member's own present-day state: its record with its draws (measurement errors and
/// constants) at the sampling conditions, projected to the sampling year. Changes are taken
/// against it, so they are paired member by member.
#[derive(Clone, Copy, Debug)]
pub(super) struct Present {
    pub omega_ar: f64,
    pub ph_t: f64,
    pub temp_c: f64,
}

/// What a member gives in one year: its solved state and temperature, and its present-day
/// state (`None` when that could not be solved).
#[derive(Clone, Copy, Debug)]
struct Sample {
    state: CarbonateState,
    temp_c: f64,
    present: Option<Present>,
}

impl Sample {
    /// The value of a carbonate-state quantity (NaN for a calcification quantity).
    fn state_value(&self, q: Quantity) -> f64 {
        let st = &self.state;
        match q {
            Quantity::OmegaAr => st.omega_ar,
            Quantity::OmegaCa => st.omega_ca,
            Quantity::PhT => st.ph_t,
            Quantity::Pco2 => st.pco2,
            Quantity::Dic => st.dic,
            Quantity::Ta => st.ta,
            Quantity::Co3 => st.co3,
            Quantity::TempC => self.temp_c,
            Quantity::OmegaArChange => self.present.map_or(f64::NAN, |p| st.omega_ar - p.omega_ar),
            Quantity::PhTChange => self.present.map_or(f64::NAN, |p| st.ph_t - p.ph_t),
            Quantity::CalcChangePct(_) | Quantity::NetCalc(_) => f64::NAN,
        }
    }
}

/// Percent of members below one habitat threshold, per horizon year.
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
    /// Per habitat threshold, high to low.
    pub below: Vec<ThresholdShare>,
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

/// Central constants of a group's records, computed once per task.
struct Precomputed {
    /// `[local record][year]` flattened.
    years: Vec<YearConditions>,
    /// `[local record]`: constants at the sampling conditions.
    at_sampling: Vec<Constants>,
}

impl Prepared<'_> {
    /// Solves one member under pathway `p` for every horizon year and variant, calling
    /// `sink(year index, variant index, result, temperature, present-day state)`. `cached`
    /// holds the central year conditions of the member's record (one per year) and its
    /// constants at sampling when precomputed.
    fn eval_member(
        &self,
        p: usize,
        draw: &MemberDraw,
        cached: Option<(&[YearConditions], &Constants)>,
        sink: &mut dyn FnMut(usize, usize, Result<CarbonateState, String>, f64, Option<Present>),
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
        let start = member_start(&s.ensemble, &site.methods, rec, draw, cached.map(|c| c.1));
        let (ta, pco2_rec) = match start {
            Ok(v) => v,
            Err(msg) => {
                for yi in 0..s.years.len() {
                    for vi in 0..self.variants.len() {
                        sink(yi, vi, Err(msg.clone()), f64::NAN, None);
                    }
                }
                return;
            }
        };
        let present = self.present(rec, anchor, draw, ta, pco2_rec, cached.map(|c| c.1));
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
                                sink(yi, vi, Err(e.to_string()), f64::NAN, present);
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
                sink(yi, vi, res, yc.temp_c, present);
            }
        }
    }

    /// The member's present-day state: its TA and seawater pCO2 at sampling projected to the
    /// sampling year (the same arithmetic as any horizon year) and solved with its constants
    /// at the sampling conditions (`k_sample`: central constants there, computed when `None`).
    fn present(
        &self,
        rec: &super::super::ProjectionRecord,
        anchor: &super::super::projection::RecordAnchor,
        draw: &MemberDraw,
        ta: f64,
        pco2_rec: f64,
        k_sample: Option<&Constants>,
    ) -> Option<Present> {
        let k = super::draws::member_constants(
            k_sample,
            rec,
            &self.site.methods,
            draw.perturbation.as_ref(),
        );
        let pco2_sea = anchor.project_pco2(pco2_rec, anchor.pco2_air_sample, self.s.mode);
        let st = solve_projected(ta, pco2_sea, None, &k).ok()?;
        Some(Present {
            omega_ar: st.omega_ar,
            ph_t: st.ph_t,
            temp_c: rec.temp_c,
        })
    }

    /// Central year conditions of every record of `g` under pathway `p`, and the records'
    /// central constants at sampling; `None` when the group has more records than members
    /// (computing per member is then cheaper).
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

/// Solves every member of group `g` under pathway `p` and summarises them.
fn run_task(prep: &Prepared<'_>, p: usize, g: &Group, progress: &dyn Progress) -> TaskOut {
    let s = prep.s;
    let ny = s.years.len();
    let members = prep.n_members(g);
    let cache = prep.precompute(p, g);
    // samples[variant][year][member]
    let mut samples: Vec<Vec<Vec<Option<Sample>>>> =
        vec![vec![vec![None; members]; ny]; prep.variants.len()];
    let mut failures = 0usize;
    let mut first_failure: Option<String> = None;

    for m in 0..members {
        let d = draw(&s.ensemble, &g.records, g.key, m);
        let l = d.local;
        let cached = cache
            .as_ref()
            .and_then(|c| Some((c.years.get(l * ny..(l + 1) * ny)?, c.at_sampling.get(l)?)));
        let label = prep
            .site
            .records
            .get(d.record)
            .map(|r| r.label.as_str())
            .unwrap_or("");
        prep.eval_member(
            p,
            &d,
            cached,
            &mut |yi, vi, res, temp_c, present| match res {
                Ok(state) => {
                    if let Some(slot) = samples
                        .get_mut(vi)
                        .and_then(|v| v.get_mut(yi))
                        .and_then(|y| y.get_mut(m))
                    {
                        *slot = Some(Sample {
                            state,
                            temp_c,
                            present,
                        });
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
            },
        );
        progress.advance(ny as u64);
    }

    let variants = samples
        .iter()
        .map(|per_year| summarise(prep, per_year))
        .collect();
    TaskOut {
        variants,
        failures,
        first_failure,
    }
}

/// Quantiles of every quantity and the share below each threshold, per year, from the
/// members' samples `per_year[year][member]`.
fn summarise(prep: &Prepared<'_>, per_year: &[Vec<Option<Sample>>]) -> VariantSummary {
    let s = prep.s;
    let rels = &s.calcification.relationships;
    let rate = s.calcification.site_rate.as_ref().map(|r| r.kg_m2_yr);
    let mut scratch = Vec::new();
    let mut quantiles_of = |values: &mut dyn Iterator<Item = f64>| {
        scratch.clear();
        scratch.extend(values);
        let q = five_quantiles(&mut scratch);
        (Quantiles::from_levels(q), scratch.len())
    };
    let mut series: Vec<(Quantity, Vec<QuantilePoint>)> = Vec::new();
    for q in Quantity::STATE.into_iter().chain(Quantity::PAIRED_CHANGES) {
        let points = per_year
            .iter()
            .zip(&s.years)
            .map(|(ms, &year)| {
                let (qs, n) = quantiles_of(
                    &mut ms
                        .iter()
                        .map(|x| x.as_ref().map_or(f64::NAN, |x| x.state_value(q))),
                );
                QuantilePoint {
                    year,
                    q: qs,
                    members: n,
                    outside_fit_pct: None,
                }
            })
            .collect();
        series.push((q, points));
    }
    for rel in rels {
        // Paired: the member's state in the year against its own present-day state.
        let factor = |x: &Option<Sample>| {
            let x = x.as_ref()?;
            let p = x.present?;
            rel.relative(x.state.omega_ar, x.temp_c, p.omega_ar, p.temp_c)
        };
        let mut change = Vec::with_capacity(per_year.len());
        let mut net = Vec::with_capacity(per_year.len());
        for (ms, &year) in per_year.iter().zip(&s.years) {
            let outside = outside_fit_pct(rel, ms);
            let (qc, nc) = quantiles_of(
                &mut ms
                    .iter()
                    .map(|x| factor(x).map_or(f64::NAN, |f| (f - 1.0) * 100.0)),
            );
            change.push(QuantilePoint {
                year,
                q: qc,
                members: nc,
                outside_fit_pct: Some(outside),
            });
            if let Some(rate) = rate {
                let (qn, nn) =
                    quantiles_of(&mut ms.iter().map(|x| factor(x).map_or(f64::NAN, |f| rate * f)));
                net.push(QuantilePoint {
                    year,
                    q: qn,
                    members: nn,
                    outside_fit_pct: Some(outside),
                });
            }
        }
        let [qc, qn] = Quantity::of_relationship(rel.rel_id());
        series.push((qc, change));
        if rate.is_some() {
            series.push((qn, net));
        }
    }
    let below = s
        .classes
        .thresholds()
        .into_iter()
        .map(|(class, t)| ThresholdShare {
            class,
            threshold: t,
            pct_below: per_year
                .iter()
                .map(|ms| {
                    let omega: Vec<f64> = ms
                        .iter()
                        .map(|x| x.as_ref().map_or(f64::NAN, |x| x.state.omega_ar))
                        .collect();
                    100.0 * fraction_below(&omega, t)
                })
                .collect(),
        })
        .collect();
    VariantSummary { series, below }
}

/// Percent of the solved members (finite Omega_ar) outside the relationship's fitted range
/// (NaN when none was solved).
fn outside_fit_pct(rel: &Relationship, ms: &[Option<Sample>]) -> f64 {
    let solved = ms
        .iter()
        .flatten()
        .filter(|x| x.state.omega_ar.is_finite())
        .count();
    let outside = ms
        .iter()
        .flatten()
        .filter(|x| !rel.in_range(x.state.omega_ar, x.temp_c))
        .count();
    if solved == 0 {
        f64::NAN
    } else {
        100.0 * outside as f64 / solved as f64
    }
}

/// Runs the projection ensemble and assembles the outlook.
pub fn run(
    site: &SiteInput,
    s: &ProjectionSettings,
    progress: &dyn Progress,
) -> Result<super::super::Outlook, OutlookError> {
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
    let d = draw(&s.ensemble, &g.records, g.key, member);
    let ny = s.years.len();
    let mut out: Vec<Vec<Result<CarbonateState, String>>> = prep
        .variants
        .iter()
        .map(|_| (0..ny).map(|_| Err("not solved".to_string())).collect())
        .collect();
    prep.eval_member(pathway, &d, None, &mut |yi, vi, res, _, _| {
        if let Some(slot) = out.get_mut(vi).and_then(|v| v.get_mut(yi)) {
            *slot = res;
        }
    });
    Ok(out)
}
