//! Everything a run needs before the first member is solved: the groups (seasons and the
//! aggregate) with their baselines, the base case and local scenarios, the pathway values and
//! record anchors, and the notes found on the way.

use std::collections::BTreeSet;

use rayon::prelude::*;

use super::super::projection::{RecordAnchor, SamplingConstants};
use super::super::result::{GroupId, Note, RelationshipId};
use super::super::scenario::Offsets;
use super::super::{OutlookError, ProjectionSettings, SiteInput};
use super::central::{OMEGA_AR, TEMP, Values, present_values};
use super::settings::{input_err, validate};
use super::units::Units;
use super::{AGGREGATE_LABEL, BASE_SCENARIO};

/// Stream key of the aggregate group (season streams use the season index).
const AGGREGATE_KEY: u64 = u64::MAX;

/// A season (or the aggregate) with its records and baseline.
#[derive(Clone, Debug)]
pub(super) struct Group {
    pub id: GroupId,
    pub label: String,
    /// Random-stream key.
    pub key: u64,
    /// Indices into `site.records`.
    pub records: Vec<usize>,
    /// Time-weighted mean Omega_ar of the records at sampling (central constants).
    pub omega_b: f64,
    /// Mean temperature of the records, °C.
    pub temp_b: f64,
    pub sample_year_max: i32,
    /// The group's station-days.
    pub units: Units,
    /// Weight of each record (by position in `records`) in the time-weighted mean.
    pub weights: Vec<f64>,
    /// The record (index into `site.records`) whose present Omega_ar lies nearest the
    /// group's mean: the member's uncertainties of constants, measurements and warming are
    /// propagated through it.
    pub representative: usize,
}

impl Group {
    pub fn aggregate(&self) -> bool {
        self.id == GroupId::Aggregate
    }
}

/// A variant of the run: the base case or one local scenario.
#[derive(Clone, Debug)]
pub(super) struct Variant {
    pub name: String,
    /// Offsets per season index (empty: none).
    pub offsets: Vec<Offsets>,
    pub start_year: Option<i32>,
}

impl Variant {
    pub fn offsets_for(&self, season: usize, year: i32) -> Option<&Offsets> {
        if self.start_year.is_some_and(|s| year < s) {
            return None;
        }
        self.offsets.get(season).filter(|o| !o.is_zero())
    }
}

/// Validated inputs shared by every task.
pub(super) struct Prepared<'a> {
    pub site: &'a SiteInput,
    pub s: &'a ProjectionSettings,
    pub groups: Vec<Group>,
    /// The base case first, then the local scenarios.
    pub variants: Vec<Variant>,
    /// anchors[pathway][record]
    pub anchors: Vec<Vec<RecordAnchor>>,
    /// xco2[pathway][year]
    pub xco2: Vec<Vec<f64>>,
    pub notes: Vec<Note>,
    /// The years computed: every horizon year and every fifth year between the sampling and
    /// the last horizon; annual values between them are interpolated linearly.
    pub knots: Vec<i32>,
    /// Position in `knots` of each horizon year.
    pub horizon_knot: Vec<usize>,
    /// Each record's values at sampling (central constants).
    pub present: Vec<Values>,
    /// Field NEC relationships that give a value at this site, with the Omega_ar at which
    /// their NEC is zero (`None`: no zero within reach).
    pub nec: Vec<(RelationshipId, Option<f64>)>,
}

impl<'a> Prepared<'a> {
    pub fn new(
        site: &'a SiteInput,
        s: &'a ProjectionSettings,
    ) -> Result<Prepared<'a>, OutlookError> {
        validate(site, s)?;
        let variants = variants(site, s)?;
        // Pathway values at every horizon year and anchors at every sampling year.
        let mut anchors = Vec::with_capacity(s.pathways.len());
        // The source water's sampling constants are the same under every pathway.
        let sampling: Vec<Option<SamplingConstants>> = site
            .records
            .par_iter()
            .map(|r| SamplingConstants::of(r, &site.methods))
            .collect();
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
                    .par_iter()
                    .zip(&sampling)
                    .map(|(r, k)| RecordAnchor::with_constants(r, &p.pathway, &site.observed, k))
                    .collect::<Vec<_>>()
                    // The first record's error in file order, whatever the thread timing.
                    .into_iter()
                    .collect::<Result<Vec<_>, _>>()?,
            );
        }
        let present = present_values(site, anchors.first().map_or(&[][..], Vec::as_slice), s.mode)?;
        let mut notes = Vec::new();
        let groups = groups(site, &present, &mut notes);
        let last_sample = site
            .records
            .iter()
            .map(|r| r.sample_year)
            .max()
            .unwrap_or(0);
        let knots = knot_years(&s.years, last_sample);
        let horizon_knot = s
            .years
            .iter()
            .map(|y| knots.iter().position(|k| k == y).unwrap_or(0))
            .collect();
        notes.extend(relationship_notes(s, &groups));
        let nec = nec_available(s, &groups, &mut notes);
        notes.extend(range_survey(site, s));
        Ok(Prepared {
            site,
            s,
            groups,
            variants,
            anchors,
            xco2,
            notes,
            knots,
            horizon_knot,
            present,
            nec,
        })
    }
}

/// The base case and the local scenarios, checked.
fn variants(site: &SiteInput, s: &ProjectionSettings) -> Result<Vec<Variant>, OutlookError> {
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
    Ok(variants)
}

/// The seasons with records (in site order), then the all-records aggregate.
fn groups(site: &SiteInput, present: &[Values], notes: &mut Vec<Note>) -> Vec<Group> {
    let make_group = |id: GroupId, label: String, key: u64, records: Vec<usize>| {
        let units = Units::of(&site.records, &records);
        let weights = units.record_weights(records.len());
        let mean_of = |i: usize| {
            records
                .iter()
                .zip(&weights)
                .map(|(&r, w)| w * present.get(r).map_or(f64::NAN, |v| v[i]))
                .sum::<f64>()
        };
        let (omega_b, temp_b) = (mean_of(OMEGA_AR), mean_of(TEMP));
        let representative = records
            .iter()
            .copied()
            .min_by(|&a, &b| {
                let d = |r: usize| {
                    present
                        .get(r)
                        .map_or(f64::INFINITY, |v| (v[OMEGA_AR] - omega_b).abs())
                };
                d(a).total_cmp(&d(b))
            })
            .unwrap_or(0);
        let sample_year_max = records
            .iter()
            .filter_map(|&i| site.records.get(i))
            .map(|r| r.sample_year)
            .max()
            .unwrap_or(0);
        Group {
            id,
            label,
            key,
            records,
            omega_b,
            temp_b,
            sample_year_max,
            units,
            weights,
            representative,
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
            notes.push(Note::SeasonWithoutRecords {
                season: label.clone(),
            });
            continue;
        }
        groups.push(make_group(
            GroupId::Season(si),
            label.clone(),
            si as u64,
            recs,
        ));
    }
    let agg_label = if site.seasons.iter().any(|s| s == AGGREGATE_LABEL) {
        "all records".to_string()
    } else {
        AGGREGATE_LABEL.to_string()
    };
    groups.push(make_group(
        GroupId::Aggregate,
        agg_label,
        AGGREGATE_KEY,
        (0..site.records.len()).collect(),
    ));
    groups
}

/// The years to compute: every horizon year, and every fifth year after `last_sample` up to
/// the last horizon year (so that annual values between them, for crossing years, are
/// interpolated over at most five years).
pub(super) fn knot_years(years: &[i32], last_sample: i32) -> Vec<i32> {
    let Some(&end) = years.last() else {
        return Vec::new();
    };
    let mut k: Vec<i32> = years.to_vec();
    let mut y = (last_sample.div_euclid(5) + 1) * 5;
    while y < end {
        k.push(y);
        y += 5;
    }
    k.sort_unstable();
    k.dedup();
    k
}

/// The field NEC relationships that give a value at the site (judged at the aggregate's
/// baseline; a relationship anchored at a stated Omega_ar does not depend on it), and notes
/// on the others.
fn nec_available(
    s: &ProjectionSettings,
    groups: &[Group],
    notes: &mut Vec<Note>,
) -> Vec<(RelationshipId, Option<f64>)> {
    let omega = groups
        .iter()
        .find(|g| g.aggregate())
        .map_or(f64::NAN, |g| g.omega_b);
    let zeros = s.nec.zero_omegas();
    let mut out = Vec::new();
    for (id, model) in s.nec.models(omega) {
        match model {
            Ok(_) => out.push((
                RelationshipId(id),
                zeros.iter().find(|(z, _)| *z == id).and_then(|(_, v)| *v),
            )),
            Err(e) => notes.push(Note::NecUnavailable {
                relationship: RelationshipId(id),
                reason: e.to_string(),
            }),
        }
    }
    out
}

/// Relationships that cannot be scaled at a group's baseline, or whose fitted range the
/// baseline leaves.
fn relationship_notes(s: &ProjectionSettings, groups: &[Group]) -> Vec<Note> {
    let mut notes = Vec::new();
    for rel in &s.calcification.relationships {
        for g in groups {
            if rel
                .relative(g.omega_b, g.temp_b, g.omega_b, g.temp_b)
                .is_none()
            {
                notes.push(Note::RelationshipNotScalable {
                    relationship: rel.rel_id(),
                    group: g.label.clone(),
                    baseline_omega_ar: g.omega_b,
                });
            }
            if !rel.in_range(g.omega_b, g.temp_b) {
                notes.push(Note::BaselineOutsideFit {
                    relationship: rel.rel_id(),
                    group: g.label.clone(),
                    baseline_omega_ar: g.omega_b,
                    baseline_temp_c: g.temp_b,
                });
            }
        }
    }
    notes
}

/// Notes on the record-year conditions (record temperature plus any warming) that lie
/// outside a constant set's fitted range: they are solved anyway and flagged here, with a
/// count and up to three examples.
fn range_survey(site: &SiteInput, s: &ProjectionSettings) -> Option<Note> {
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
                let cond = rec.conditions_at(temp);
                if site.methods.in_fitted_ranges(&cond) {
                    continue;
                }
                let w = site.methods.range_warnings(&cond);
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
    (outside > 0).then(|| Note::ConstantsRange {
        outside,
        total,
        warming: s.warming,
        examples: examples.into_iter().collect(),
    })
}
