//! The typed [`Outlook`] from the tasks' summaries.

use super::super::result::{
    BelowProbability, Criterion, Crossing, CrossingGroup, CrossingYears, GroupInfo, Note, Outlook,
    PathwayId, PathwayInfo, QuantileSeries, Quantity, ScenarioId, ScenarioInfo, SettingsInfo,
    TimeBelow,
};
use super::AGGREGATE_LABEL;
use super::central::{Central, OMEGA_AR};
use super::prepare::Prepared;
use super::run::{TaskOut, VariantSummary, time_share_below};

/// One task's summary of one variant, found by pathway, group and variant.
struct Summaries<'a> {
    outs: &'a [TaskOut],
    n_groups: usize,
}

impl<'a> Summaries<'a> {
    /// Tasks are pathway-major, then group (see `run`).
    fn get(&self, p: usize, g: usize, variant: usize) -> Option<&'a VariantSummary> {
        self.outs
            .get(p * self.n_groups + g)
            .and_then(|o| o.variants.get(variant))
    }
}

fn scenario_id(variant: usize) -> ScenarioId {
    match variant.checked_sub(1) {
        None => ScenarioId::Base,
        Some(i) => ScenarioId::Local(i),
    }
}

pub(super) fn assemble(prep: &Prepared<'_>, centrals: &[Central], outs: &[TaskOut]) -> Outlook {
    let s = prep.s;
    let sums = Summaries {
        outs,
        n_groups: prep.groups.len(),
    };
    let mut series = Vec::new();
    let mut probabilities = Vec::new();
    let mut crossings = Vec::new();
    let mut time_below = present_time_below(prep);
    for p in 0..s.pathways.len() {
        for vi in 0..prep.variants.len() {
            let per_group: Vec<Option<&VariantSummary>> = (0..prep.groups.len())
                .map(|gi| sums.get(p, gi, vi))
                .collect();
            for (g, vs) in prep.groups.iter().zip(&per_group) {
                let Some(vs) = vs else { continue };
                for (q, points) in &vs.series {
                    series.push(QuantileSeries {
                        pathway: PathwayId(p),
                        scenario: scenario_id(vi),
                        group: g.id,
                        quantity: *q,
                        points: points.clone(),
                    });
                }
            }
            probabilities.extend(below_probabilities(prep, p, vi, &per_group));
            time_below.extend(projected_time_below(prep, p, vi, &per_group));
            crossings.extend(crossings_of(prep, p, vi, &per_group));
        }
    }
    let mut notes = prep.notes.clone();
    let failures: usize = outs.iter().map(|o| o.failures).sum::<usize>()
        + centrals.iter().map(|c| c.failures).sum::<usize>();
    if failures > 0 {
        notes.push(Note::UnsolvedMembers {
            member_years: failures,
            first: centrals
                .iter()
                .find_map(|c| c.first_failure.clone())
                .or_else(|| outs.iter().find_map(|o| o.first_failure.clone()))
                .unwrap_or_default(),
        });
    }
    Outlook {
        site: prep.site.name.clone(),
        settings: settings_info(prep),
        pathways: pathway_infos(prep),
        groups: prep
            .groups
            .iter()
            .map(|g| GroupInfo {
                id: g.id,
                label: g.label.clone(),
                aggregate: g.aggregate(),
                records: g.records.len(),
                baseline_omega_ar: g.omega_b,
                baseline_temp_c: g.temp_b,
                sample_year_max: g.sample_year_max,
            })
            .collect(),
        scenarios: scenario_infos(prep),
        quantities: Quantity::all(
            &s.calcification.relationships,
            s.calcification.site_rate.is_some(),
            &prep.nec.iter().map(|(id, _)| *id).collect::<Vec<_>>(),
        ),
        series,
        crossings,
        probabilities,
        time_below,
        classes: s.classes.clone(),
        relationships: s.calcification.relationships.clone(),
        site_rate: s.calcification.site_rate.clone(),
        nec: s.nec.clone(),
        notes,
        heat: None,
        rule_comparison: Vec::new(),
        exposure: super::exposure::site_exposure(prep, centrals),
    }
}

/// Chance below each threshold, ordered by year, group and threshold.
fn below_probabilities(
    prep: &Prepared<'_>,
    p: usize,
    vi: usize,
    per_group: &[Option<&VariantSummary>],
) -> Vec<BelowProbability> {
    let s = prep.s;
    let mut out = Vec::new();
    for (yi, &year) in s.years.iter().enumerate() {
        for (g, vs) in prep.groups.iter().zip(per_group) {
            let Some(vs) = vs else { continue };
            let median = vs
                .series_of(Quantity::OmegaAr)
                .and_then(|pts| pts.get(yi))
                .map_or(f64::NAN, |pt| pt.q.p50);
            for share in &vs.below {
                out.push(BelowProbability {
                    pathway: PathwayId(p),
                    scenario: scenario_id(vi),
                    group: g.id,
                    year,
                    class_left: share.class.clone(),
                    threshold_omega_ar: share.threshold,
                    prob_below_pct: share.pct_below.get(yi).copied().unwrap_or(f64::NAN),
                    median_class: s.classes.classify(median).to_string(),
                });
            }
        }
    }
    out
}

/// Share of time below each threshold as sampled, per group.
fn present_time_below(prep: &Prepared<'_>) -> Vec<TimeBelow> {
    let mut out = Vec::new();
    for g in &prep.groups {
        for (class, t) in prep.s.classes.thresholds() {
            out.push(TimeBelow {
                pathway: None,
                scenario: ScenarioId::Base,
                group: g.id,
                year: None,
                threshold_omega_ar: t,
                pct_time_below: time_share_below(g, t, |r| {
                    prep.present.get(r).map(|x| x[OMEGA_AR])
                }),
                class_left: class,
            });
        }
    }
    out
}

/// Share of time below each threshold at the horizon years, ordered by year, group and
/// threshold.
fn projected_time_below(
    prep: &Prepared<'_>,
    p: usize,
    vi: usize,
    per_group: &[Option<&VariantSummary>],
) -> Vec<TimeBelow> {
    let mut out = Vec::new();
    for (yi, &year) in prep.s.years.iter().enumerate() {
        for (g, vs) in prep.groups.iter().zip(per_group) {
            let Some(vs) = vs else { continue };
            for share in &vs.time_below {
                out.push(TimeBelow {
                    pathway: Some(PathwayId(p)),
                    scenario: scenario_id(vi),
                    group: g.id,
                    year: Some(year),
                    class_left: share.class.clone(),
                    threshold_omega_ar: share.threshold,
                    pct_time_below: share.pct_below.get(yi).copied().unwrap_or(f64::NAN),
                });
            }
        }
    }
    out
}

/// One member's Omega_ar: as sampled (in `start`, the latest sampling year) and at the
/// computed years.
struct Trajectory<'a> {
    start: i32,
    present: f64,
    knots: &'a [i32],
    values: Vec<f64>,
}

impl Trajectory<'_> {
    /// The first whole year after `start` whose value (linear between computed years) is
    /// below `t`; `start` itself when already below as sampled; `None` if never by the last
    /// computed year.
    fn first_below(&self, t: f64) -> Option<i32> {
        if self.present < t {
            return Some(self.start);
        }
        let (mut y0, mut v0) = (self.start, self.present);
        for (&y1, &v1) in self.knots.iter().zip(&self.values) {
            if !v1.is_finite() || y1 <= y0 {
                continue;
            }
            if v1 < t {
                // v0 >= t > v1: the crossing lies in (y0, y1]; first whole year below.
                let span = f64::from(y1 - y0);
                for y in (y0 + 1)..=y1 {
                    let v = v0 + (v1 - v0) * f64::from(y - y0) / span;
                    if v < t {
                        return Some(y);
                    }
                }
                return Some(y1);
            }
            (y0, v0) = (y1, v1);
        }
        None
    }
}

/// Nearest-rank quantiles (5 %, 50 %, 95 %) of crossing years, "never" counting as later
/// than every year.
fn crossing_quantiles(mut years: Vec<Option<i32>>) -> CrossingYears {
    years.sort_by_key(|y| y.unwrap_or(i32::MAX));
    let n = years.len();
    let at = |p: f64| {
        if n == 0 {
            return None;
        }
        let rank = ((p * n as f64).ceil() as usize).clamp(1, n);
        years.get(rank - 1).copied().flatten()
    };
    CrossingYears {
        p05: at(0.05),
        p50: at(0.50),
        p95: at(0.95),
    }
}

/// Crossing rows of each group's mean Omega_ar below each habitat threshold, then of the
/// limiting season (each member's lowest season mean in each year).
fn crossings_of(
    prep: &Prepared<'_>,
    p: usize,
    vi: usize,
    per_group: &[Option<&VariantSummary>],
) -> Vec<Crossing> {
    let s = prep.s;
    let nk = prep.knots.len();
    let members = s.ensemble.members.max(1);
    let member_of = |g: &super::prepare::Group, vs: &VariantSummary, m: usize| Trajectory {
        start: g.sample_year_max,
        present: vs.omega_present.get(m).copied().unwrap_or(f64::NAN),
        knots: &prep.knots,
        values: vs
            .omega_knots
            .get(m * nk..(m + 1) * nk)
            .map(<[f64]>::to_vec)
            .unwrap_or_default(),
    };
    // (group, trajectories, median present)
    let mut sets: Vec<(CrossingGroup, Vec<Trajectory<'_>>)> = Vec::new();
    for (g, vs) in prep.groups.iter().zip(per_group) {
        let Some(vs) = vs else { continue };
        sets.push((
            CrossingGroup::Group(g.id),
            (0..members).map(|m| member_of(g, vs, m)).collect(),
        ));
    }
    let seasons: Vec<(&super::prepare::Group, &VariantSummary)> = prep
        .groups
        .iter()
        .zip(per_group)
        .filter(|(g, _)| !g.aggregate())
        .filter_map(|(g, vs)| Some((g, (*vs)?)))
        .collect();
    if seasons.len() >= 2 {
        let worst = (0..members)
            .map(|m| {
                let each: Vec<Trajectory<'_>> =
                    seasons.iter().map(|(g, vs)| member_of(g, vs, m)).collect();
                let min = |f: &dyn Fn(&Trajectory<'_>) -> f64| {
                    each.iter()
                        .map(f)
                        .filter(|x| x.is_finite())
                        .fold(f64::NAN, f64::min)
                };
                Trajectory {
                    start: each.iter().map(|t| t.start).max().unwrap_or(0),
                    present: min(&|t| t.present),
                    knots: &prep.knots,
                    values: (0..nk)
                        .map(|k| min(&|t| t.values.get(k).copied().unwrap_or(f64::NAN)))
                        .collect(),
                }
            })
            .collect();
        sets.push((CrossingGroup::WorstSeason, worst));
    }
    let mut out = Vec::new();
    for (group, members) in &sets {
        let mut present: Vec<f64> = members
            .iter()
            .map(|t| t.present)
            .filter(|x| x.is_finite())
            .collect();
        present.sort_by(f64::total_cmp);
        let median_present = super::quantiles::quantile_sorted(&present, 0.5);
        let criteria = s
            .classes
            .thresholds()
            .into_iter()
            .map(|(class, t)| Criterion::OmegaArBelow {
                class,
                threshold_omega_ar: t,
            })
            .chain(prep.nec.iter().filter_map(|&(relationship, zero)| {
                Some(Criterion::NetDissolution {
                    relationship,
                    omega_zero: zero?,
                })
            }));
        for criterion in criteria {
            let t = criterion.omega_level();
            out.push(Crossing {
                pathway: PathwayId(p),
                scenario: scenario_id(vi),
                group: *group,
                first_year: crossing_quantiles(members.iter().map(|m| m.first_below(t)).collect()),
                criterion,
                met_at_baseline: median_present < t,
            });
        }
    }
    out
}

fn settings_info(prep: &Prepared<'_>) -> SettingsInfo {
    let s = prep.s;
    let e = &s.ensemble;
    SettingsInfo {
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
                 estimated from salinity), divided by the square root of the station-days for \
                 the mean and propagated through the season's representative record",
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
                "bootstrap of the time-weighted seasonal mean: each member resamples the \
                 season's station-days with replacement (consecutive days of sensor series in \
                 blocks of round(n^(1/3)) days); \"{AGGREGATE_LABEL}\" resamples all station-days"
            )
        } else {
            "ensemble off: the time-weighted mean of each season with central values".to_string()
        },
        methods: prep.site.methods.citations(),
        observed_co2_source: prep.site.observed.source().to_string(),
    }
}

fn pathway_infos(prep: &Prepared<'_>) -> Vec<PathwayInfo> {
    let s = prep.s;
    s.pathways
        .iter()
        .zip(&prep.xco2)
        .map(|(spec, xs)| PathwayInfo {
            name: spec.pathway.name.clone(),
            source: spec.pathway.source(&prep.site.observed),
            xco2_ppm: xs.clone(),
            warming_2090_c: spec.warming.delta_c,
            warming_source: if s.warming {
                spec.warming.source().to_string()
            } else {
                "warming off".to_string()
            },
        })
        .collect()
}

fn scenario_infos(prep: &Prepared<'_>) -> Vec<ScenarioInfo> {
    prep.variants
        .iter()
        .skip(1)
        .map(|v| ScenarioInfo {
            name: v.name.clone(),
            offsets: prep
                .site
                .seasons
                .iter()
                .zip(&v.offsets)
                .map(|(sn, o)| (sn.clone(), o.ta_umol_kg, o.dic_umol_kg))
                .collect(),
            start_year: v.start_year,
        })
        .collect()
}
