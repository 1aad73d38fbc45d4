//! Each reef record matched to its offshore source water (the offset rule of
//! [`super::source_water`]) and the check of the offsets against their plausible range.
//!
//! Rule: the source rows of the record's season in the record's local clock hour when the
//! source has readings in that hour; else all source rows of the season (the season mean);
//! else, for a season the source never sampled, all source rows. Means are taken of TA,
//! DIC, temperature, salinity, pressure and nutrients (TA and DIC mix conservatively; the
//! source's pCO2 is solved from the mean TA and DIC at the mean conditions). Without
//! source-water rows, the offshore TA and DIC of `[source_water]` serve, at the stated
//! temperature and salinity or else at the record's own.

use std::collections::{BTreeMap, BTreeSet};

use chrono::{Datelike, Timelike};

use crate::chem::{self, Constants, Input, MethodSet};
use crate::diag::{Diagnostic, Diagnostics};
use crate::site::{LoadedSite, Sample, schema};

use super::source_water::{
    Follows, MAX_DIC_OFFSET_UMOL_KG, MAX_TA_OFFSET_UMOL_KG, MatchRule, SourceWater,
};

/// Running sums of the source rows of one cell.
#[derive(Clone, Copy, Debug, Default)]
struct Acc {
    n: usize,
    ta: f64,
    dic: f64,
    temp: f64,
    sal: f64,
    pres: f64,
    si: f64,
    po4: f64,
    year: i32,
}

impl Acc {
    fn add(&mut self, smp: &Sample, ta: f64, dic: f64) {
        self.n += 1;
        self.ta += ta;
        self.dic += dic;
        self.temp += smp.temp_c;
        self.sal += smp.salinity;
        self.pres += smp.pressure_dbar;
        self.si += smp.silicate;
        self.po4 += smp.phosphate;
        self.year = self.year.max(smp.time.year());
    }

    fn water(&self, rule: MatchRule, follows: Follows, methods: &MethodSet) -> Option<SourceWater> {
        let n = self.n as f64;
        if self.n == 0 {
            return None;
        }
        let mut sw = SourceWater {
            rule,
            follows,
            sample_year: self.year,
            temp_c: self.temp / n,
            salinity: self.sal / n,
            pressure_dbar: self.pres / n,
            silicate: self.si / n,
            phosphate: self.po4 / n,
            ta: self.ta / n,
            dic: self.dic / n,
            pco2: f64::NAN,
            rows: self.n,
        };
        let k = Constants::new(&sw.conditions_at(sw.temp_c), methods);
        sw.pco2 = chem::solve_pair(Input::Ta(sw.ta), Input::Dic(sw.dic), &k)
            .ok()?
            .pco2;
        Some(sw)
    }
}

/// The site's source water, ready to match records.
pub struct SourceTable {
    /// (season, local hour) → source water; hour `None` is the season mean.
    cells: BTreeMap<(usize, Option<u32>), SourceWater>,
    all: Option<SourceWater>,
    /// The offshore TA/DIC of the site file (used when there are no source rows).
    stated: Option<schema::SourceWaterSpec>,
    follows: Follows,
    methods: MethodSet,
}

/// The site's source water, `None` when it has none, or why it cannot be used (file, line,
/// field).
pub fn source_table(loaded: &LoadedSite) -> Result<Option<SourceTable>, Diagnostics> {
    let spec = loaded.site.source_water.clone();
    let marked = loaded.site.records.iter().any(|r| r.source_water);
    let by_station = spec.as_ref().is_some_and(|s| s.station.is_some());
    let follows = match spec.as_ref().map(|s| s.follows_atmosphere) {
        Some(schema::SourceFollows::Additive) => Follows::Additive,
        _ => Follows::Ratio,
    };
    let stated = spec.filter(|s| s.has_stated_values());
    if !marked && !by_station {
        return Ok(stated.map(|s| SourceTable {
            cells: BTreeMap::new(),
            all: None,
            stated: Some(s),
            follows,
            methods: loaded.methods,
        }));
    }
    let rows: Vec<(&Sample, f64, f64)> = loaded
        .source_samples
        .iter()
        .filter(|s| s.is_used())
        .filter_map(|s| s.state.map(|st| (s, st.ta, st.dic)))
        .collect();
    let Some(&(first, _, _)) = rows.first() else {
        return Err(Diagnostics::from(
            Diagnostic::error("no source-water row has a solved carbonate state")
                .with_file(&loaded.path)
                .with_field(if by_station { "source_water.station" } else { "records" })
                .with_help("the source-water rows need two carbonate quantities each (run `calcisite check` for the rows)"),
        ));
    };
    let reef_seasons: BTreeSet<usize> = loaded
        .samples
        .iter()
        .filter(|s| s.is_used())
        .map(|s| s.season)
        .collect();
    let source_seasons: BTreeSet<usize> = rows.iter().map(|(s, _, _)| s.season).collect();
    if reef_seasons.is_disjoint(&source_seasons) {
        let names = |set: &BTreeSet<usize>| {
            set.iter()
                .filter_map(|&i| loaded.seasons.get(i).map(|s| s.name.clone()))
                .collect::<Vec<_>>()
                .join(", ")
        };
        return Err(Diagnostics::from(
            Diagnostic::error(format!(
                "the source-water record covers none of the reef's seasons: its rows fall in {}, the reef records in {}",
                names(&source_seasons),
                names(&reef_seasons)
            ))
            .with_file(&*first.source_file)
            .with_line(first.line)
            .with_field("date")
            .with_help("give source-water rows from the seasons the reef was sampled in, or an offshore ta_umol_kg and dic_umol_kg in [source_water]"),
        ));
    }
    let mut acc: BTreeMap<(usize, Option<u32>), Acc> = BTreeMap::new();
    let mut all = Acc::default();
    for &(s, ta, dic) in &rows {
        all.add(s, ta, dic);
        acc.entry((s.season, None)).or_default().add(s, ta, dic);
        if s.has_time {
            acc.entry((s.season, Some(s.time.hour())))
                .or_default()
                .add(s, ta, dic);
        }
    }
    let m = loaded.methods;
    let cells = acc
        .into_iter()
        .filter_map(|(key, a)| {
            let rule = match key.1 {
                Some(_) => MatchRule::SameHour,
                None => MatchRule::SeasonMean,
            };
            Some((key, a.water(rule, follows, &m)?))
        })
        .collect();
    Ok(Some(SourceTable {
        cells,
        all: all.water(MatchRule::AllRows, follows, &m),
        stated: None,
        follows,
        methods: m,
    }))
}

impl SourceTable {
    /// The source water of a reef sample by the offset rule.
    pub fn match_sample(&self, smp: &Sample) -> Option<SourceWater> {
        if let Some(s) = &self.stated {
            let mut sw = SourceWater {
                rule: MatchRule::SiteFile,
                follows: self.follows,
                sample_year: smp.time.year(),
                temp_c: s.temp_c.unwrap_or(smp.temp_c),
                salinity: s.salinity.unwrap_or(smp.salinity),
                pressure_dbar: smp.pressure_dbar,
                silicate: smp.silicate,
                phosphate: smp.phosphate,
                ta: s.ta_umol_kg?,
                dic: s.dic_umol_kg?,
                pco2: f64::NAN,
                rows: 1,
            };
            let k = Constants::new(&sw.conditions_at(sw.temp_c), &self.methods);
            sw.pco2 = chem::solve_pair(Input::Ta(sw.ta), Input::Dic(sw.dic), &k)
                .ok()?
                .pco2;
            return Some(sw);
        }
        let hour = smp.has_time.then(|| smp.time.hour());
        hour.and_then(|h| self.cells.get(&(smp.season, Some(h))))
            .or_else(|| self.cells.get(&(smp.season, None)))
            .or(self.all.as_ref())
            .cloned()
    }

    /// Reef rows whose offsets from their source water lie outside the plausible range, as
    /// errors naming file, line and field (at most `limit`, then a count).
    pub fn check_offsets(&self, samples: &[Sample], limit: usize) -> Diagnostics {
        let mut out = Diagnostics::new();
        let mut more = 0usize;
        for smp in samples.iter().filter(|s| s.is_used()) {
            let (Some(st), Some(sw)) = (smp.state, self.match_sample(smp)) else {
                continue;
            };
            for (field, d, max) in [
                ("ta", st.ta - sw.ta, MAX_TA_OFFSET_UMOL_KG),
                ("dic", st.dic - sw.dic, MAX_DIC_OFFSET_UMOL_KG),
            ] {
                if d.is_finite() && d.abs() <= max {
                    continue;
                }
                if out.len() >= limit {
                    more += 1;
                    continue;
                }
                out.push(
                    Diagnostic::error(format!(
                        "this reef row's {} offset from its source water is {d:+.1} umol/kg, outside the plausible ±{max} umol/kg (source: {})",
                        field.to_uppercase(),
                        sw.rule.describe()
                    ))
                    .with_file(&*smp.source_file)
                    .with_line(smp.line)
                    .with_field(field)
                    .with_help("check that the source-water file is offshore water of this reef, in the same units; reef-flat offsets beyond this are not expected"),
                );
            }
        }
        if more > 0 {
            out.push(Diagnostic::error(format!(
                "{more} more reef rows have offsets from their source water outside the plausible range"
            )));
        }
        out
    }
}
