//! The typed [`Outlook`] from the tasks' summaries.

use super::super::result::{
    BelowProbability, Criterion, Crossing, CrossingGroup, CrossingYears, GroupInfo, Note, Outlook,
    PathwayId, PathwayInfo, QuantileSeries, Quantiles, Quantity, ScenarioId, ScenarioInfo,
    SettingsInfo,
};
use super::super::thresholds::first_year_below;
use super::AGGREGATE_LABEL;
use super::prepare::Prepared;
use super::run::{TaskOut, VariantSummary};

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

pub(super) fn assemble(prep: &Prepared<'_>, outs: &[TaskOut]) -> Outlook {
    let s = prep.s;
    let sums = Summaries {
        outs,
        n_groups: prep.groups.len(),
    };
    let mut series = Vec::new();
    let mut probabilities = Vec::new();
    let mut crossings = Vec::new();
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
            crossings.extend(crossings_of(prep, p, vi, &per_group));
        }
    }
    let mut notes = prep.notes.clone();
    let failures: usize = outs.iter().map(|o| o.failures).sum();
    if failures > 0 {
        notes.push(Note::UnsolvedMembers {
            member_years: failures,
            first: outs
                .iter()
                .find_map(|o| o.first_failure.clone())
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
        ),
        series,
        crossings,
        probabilities,
        classes: s.classes.clone(),
        relationships: s.calcification.relationships.clone(),
        site_rate: s.calcification.site_rate.clone(),
        notes,
        heat: None,
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

/// A quantity's quantile level over the horizon years (NaN where missing).
fn level_series(
    vs: Option<&VariantSummary>,
    q: Quantity,
    pick: fn(&Quantiles) -> f64,
    ny: usize,
) -> Vec<f64> {
    match vs.and_then(|v| v.series_of(q)) {
        Some(points) => points.iter().map(|pt| pick(&pt.q)).collect(),
        None => vec![f64::NAN; ny],
    }
}

fn p05(q: &Quantiles) -> f64 {
    q.p05
}
fn p50(q: &Quantiles) -> f64 {
    q.p50
}
fn p95(q: &Quantiles) -> f64 {
    q.p95
}

/// The three crossing levels: 5 %, median, 95 %.
const CROSSING_LEVELS: [fn(&Quantiles) -> f64; 3] = [p05, p50, p95];

/// Crossing rows of Omega_ar below each habitat threshold per group, then for the worst season (lowest season quantile each year).
fn crossings_of(
    prep: &Prepared<'_>,
    p: usize,
    vi: usize,
    per_group: &[Option<&VariantSummary>],
) -> Vec<Crossing> {
    let s = prep.s;
    let ny = s.years.len();
    let seasons: Vec<Option<&VariantSummary>> = prep
        .groups
        .iter()
        .zip(per_group)
        .filter(|(g, _)| !g.aggregate())
        .map(|(_, vs)| *vs)
        .collect();
    // (group, baseline Omega_ar, series of a quantity at a level)
    type Levels<'b> = Box<dyn Fn(Quantity, fn(&Quantiles) -> f64) -> Vec<f64> + 'b>;
    let mut labels: Vec<(CrossingGroup, f64, Levels<'_>)> = Vec::new();
    for (g, vs) in prep.groups.iter().zip(per_group) {
        let vs = *vs;
        labels.push((
            CrossingGroup::Group(g.id),
            g.omega_b,
            Box::new(move |q, pick| level_series(vs, q, pick, ny)),
        ));
    }
    let season_groups: Vec<_> = prep.groups.iter().filter(|g| !g.aggregate()).collect();
    if season_groups.len() >= 2 {
        let omega_b = season_groups
            .iter()
            .map(|g| g.omega_b)
            .fold(f64::INFINITY, |acc, x| if x < acc { x } else { acc });
        let seasons = seasons.clone();
        labels.push((
            CrossingGroup::WorstSeason,
            omega_b,
            Box::new(move |q, pick| {
                let per: Vec<Vec<f64>> = seasons
                    .iter()
                    .map(|vs| level_series(*vs, q, pick, ny))
                    .collect();
                (0..ny)
                    .map(|yi| {
                        per.iter()
                            .filter_map(|v| v.get(yi).copied())
                            .filter(|x| x.is_finite())
                            .fold(f64::NAN, f64::min)
                    })
                    .collect()
            }),
        ));
    }
    let mut out = Vec::new();
    for (group, omega_b, get) in &labels {
        let first = |q: Quantity, find: &dyn Fn(&[f64]) -> Option<i32>| {
            let [p05, p50, p95] = CROSSING_LEVELS.map(|pick| find(&get(q, pick)));
            CrossingYears { p05, p50, p95 }
        };
        for (class, t) in s.classes.thresholds() {
            out.push(Crossing {
                pathway: PathwayId(p),
                scenario: scenario_id(vi),
                group: *group,
                first_year: first(Quantity::OmegaAr, &|v| first_year_below(&s.years, v, t)),
                criterion: Criterion::OmegaArBelow {
                    class,
                    threshold_omega_ar: t,
                },
                met_at_baseline: *omega_b < t,
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
