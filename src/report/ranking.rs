//! Ranking the sites of a comparison: which pathway ranks them, each site's ranking key and the
//! order. This is analysis on the report model (numbers in, an order out); the view and the
//! figures only show the order it gives.
//!
//! The rule, stated in the report. Each site is evaluated at its project's end year (the plan's
//! `project_end_year`; the first table horizon when the site file gives none) under the ranking
//! pathway. Its *first limit* is the earlier of two years: the year the median Ω_ar of its
//! limiting season falls below [`KEY_OMEGA_LEVEL`] and the year DHW ≥ 8 °C-weeks becomes most
//! years (median onset).
//! 1. A site missing either year (no temperature record, or no crossing of that level) ranks
//!    after the sites that have both: missing information never lifts a site.
//! 2. A site whose first limit comes within its project (by the end year) ranks after the sites
//!    whose first limit comes later.
//! 3. Then the median Ω_ar of the limiting season at the end year, higher first. Two sites
//!    whose end-year medians differ by less than their uncertainty supports share a rank
//!    ([`tied`]); sites sharing a rank are listed by the later first limit, then the later
//!    second year, then the last-horizon median, then the present-day seasonal minimum.

use super::model::{CrossingYear, PathwayInfo, Quantiles, ReportModel, SiteReport};

/// The Ω_ar level the first page and the ranking set beside heat stress: 3.0, the lower edge
/// of the marginal class of Guinotte, Buddemeier & Kleypas (2003), the default classes.
pub const KEY_OMEGA_LEVEL: f64 = 3.0;

/// Ω_ar quantiles of a site's limiting season under a pathway in a year; `None` when the year is
/// not projected or its median is not finite.
pub fn limiting_omega(site: &SiteReport, pathway: &str, year: i32) -> Option<Quantiles> {
    let season = site.limiting_season()?;
    let q = site.series(pathway, season)?.at(year)?.omega_ar;
    q.p50.is_finite().then_some(q)
}

/// The year the median Ω_ar of the site's limiting season first falls below
/// [`KEY_OMEGA_LEVEL`] under a pathway (the typed crossing); `None` when that level was not
/// evaluated.
pub fn chemistry_year(site: &SiteReport, pathway: &str) -> Option<CrossingYear> {
    let season = site.limiting_season()?;
    site.crossing(pathway, season, KEY_OMEGA_LEVEL)
        .map(|c| c.median)
}

/// The median year from which DHW ≥ 8 °C-weeks is reached in most years under a pathway
/// (`NotBy` the last year searched when not within it); `None` without a thermal outlook.
pub fn heat_year(site: &SiteReport, pathway: &str) -> Option<CrossingYear> {
    let s = site.thermal.as_ref()?.series(pathway)?;
    Some(match s.severe_most_years[1] {
        Some(y) => CrossingYear::Year(y),
        None => CrossingYear::NotBy(s.searched_to),
    })
}

/// A crossing year as an orderable key (see [`when`]).
type When = (u8, i32);

/// Orders crossing years from the earliest: already below, then by year, then "not by" (all
/// alike: beyond the projected years).
fn when(c: CrossingYear) -> When {
    match c {
        CrossingYear::AlreadyBelow => (0, 0),
        CrossingYear::Year(y) => (1, y),
        CrossingYear::NotBy(_) => (2, 0),
    }
}

/// The pathway used to rank sites: the model's choice, else the middle pathway.
pub fn ranking_pathway(model: &ReportModel) -> Option<&PathwayInfo> {
    if let Some(id) = &model.ranking_pathway
        && let Some(p) = model.pathways.iter().find(|p| &p.id == id)
    {
        return Some(p);
    }
    model
        .pathways
        .get(model.pathways.len().saturating_sub(1) / 2)
}

/// The one-sided 95 % point of the standard normal distribution: a 5–95 % range spans
/// 2 × 1.645 standard deviations of a normal distribution, and the 90 % range of a difference
/// excludes zero when the difference exceeds 1.645 of its standard deviations.
pub const Z_95: f64 = 1.645;

/// Whether two end-year estimates are too close to tell apart: their medians differ by less
/// than [`Z_95`] × √(s₁² + s₂²), each s the site's 5–95 % range divided by 2 × [`Z_95`] (the
/// standard uncertainty of its seasonal mean, taken as normal). The two sites' uncertainties
/// are taken as independent, which errs towards a tie (the constants' uncertainties they
/// share would cancel in the difference). Non-finite ranges never tie.
pub fn tied(a: &Quantiles, b: &Quantiles) -> bool {
    let s = |q: &Quantiles| (q.p95 - q.p05) / (2.0 * Z_95);
    let allowed = Z_95 * (s(a).powi(2) + s(b).powi(2)).sqrt();
    let diff = (a.p50 - b.p50).abs();
    allowed.is_finite() && diff.is_finite() && diff < allowed
}

/// The year a site is evaluated in: its plan's end year when the projection has it, else the
/// first table horizon.
pub fn evaluation_year(site: &SiteReport, horizons: &[i32]) -> Option<i32> {
    site.plan
        .end_year
        .filter(|&y| {
            site.projection
                .iter()
                .flat_map(|p| &p.seasons)
                .any(|s| s.at(y).is_some())
        })
        .or_else(|| horizons.first().copied())
}

/// The chance (%) that the mean Ω_ar of the site's limiting season lies below
/// [`KEY_OMEGA_LEVEL`] in a year under a pathway (share of ensemble members).
pub fn chance_below(site: &SiteReport, pathway: &str, year: i32) -> Option<f64> {
    let season = site.limiting_season()?;
    site.probabilities
        .iter()
        .find(|p| {
            p.pathway == pathway
                && p.season == season
                && p.year == year
                && p.threshold == KEY_OMEGA_LEVEL
        })
        .map(|p| p.percent)
}

/// One site's ranking key, in display order.
#[derive(Debug, Clone)]
pub struct RankEntry {
    /// Index into `model.sites`.
    pub site: usize,
    /// The shared rank (1 = best); equal for sites that tie.
    pub rank: usize,
    /// Whether another site shares this rank.
    pub tied: bool,
    /// [`chemistry_year`] under the ranking pathway.
    pub chemistry: Option<CrossingYear>,
    /// [`heat_year`] under the ranking pathway.
    pub heat: Option<CrossingYear>,
    /// The year the site is evaluated in ([`evaluation_year`]).
    pub end_year: Option<i32>,
    /// Ω_ar quantiles of the limiting season in `end_year` under the ranking pathway.
    pub end: Option<Quantiles>,
    /// Whether the first limit comes by `end_year`.
    pub limited_in_project: bool,
    /// Median Ω_ar of the limiting season at the last horizon under the ranking pathway.
    pub last_median: Option<f64>,
    /// Lowest seasonal baseline mean Ω_ar.
    pub now_min: Option<f64>,
}

impl RankEntry {
    /// Both years known.
    fn complete(&self) -> bool {
        self.chemistry.is_some() && self.heat.is_some()
    }

    /// The earlier and the later of the known years (`None` when neither is known).
    fn first_and_second(&self) -> (Option<When>, Option<When>) {
        let mut known: Vec<When> = [self.chemistry, self.heat]
            .into_iter()
            .flatten()
            .map(when)
            .collect();
        known.sort_unstable();
        (known.first().copied(), known.last().copied())
    }

    /// The part of the key that decides groups before the end-year median (rules 1 and 2).
    fn group(&self) -> (bool, bool) {
        (!self.complete(), self.limited_in_project)
    }

    /// The order within a tie: later first limit, later second year, last-horizon median,
    /// present-day minimum (all higher first), then the order given.
    fn within_tie(&self, other: &Self) -> std::cmp::Ordering {
        let key = |v: Option<f64>| v.unwrap_or(f64::NEG_INFINITY);
        let (a1, a2) = self.first_and_second();
        let (b1, b2) = other.first_and_second();
        b1.cmp(&a1)
            .then(b2.cmp(&a2))
            .then(key(other.last_median).total_cmp(&key(self.last_median)))
            .then(key(other.now_min).total_cmp(&key(self.now_min)))
            .then(self.site.cmp(&other.site))
    }
}

/// Whether a first limit comes by the end year.
fn within(first: Option<When>, end_year: Option<i32>) -> bool {
    match (first, end_year) {
        (Some((0, _)), _) => true,
        (Some((1, y)), Some(end)) => y <= end,
        _ => false,
    }
}

/// Ranks the sites by the rule in the module documentation.
pub fn rank_sites(model: &ReportModel) -> Vec<RankEntry> {
    let pathway = ranking_pathway(model)
        .map(|p| p.id.as_str())
        .unwrap_or_default();
    let last = model.horizons.last().copied();
    let mut entries: Vec<RankEntry> = model
        .sites
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let end_year = evaluation_year(s, &model.horizons);
            let mut e = RankEntry {
                site: i,
                rank: 0,
                tied: false,
                chemistry: chemistry_year(s, pathway),
                heat: heat_year(s, pathway),
                end_year,
                end: end_year.and_then(|y| limiting_omega(s, pathway, y)),
                limited_in_project: false,
                last_median: last
                    .and_then(|y| limiting_omega(s, pathway, y))
                    .map(|q| q.p50),
                now_min: s
                    .baseline
                    .iter()
                    .map(|b| b.omega_ar.mean)
                    .filter(|v| v.is_finite())
                    .min_by(f64::total_cmp),
            };
            e.limited_in_project = within(e.first_and_second().0, end_year);
            e
        })
        .collect();
    let end_key = |e: &RankEntry| e.end.map_or(f64::NEG_INFINITY, |q| q.p50);
    entries.sort_by(|a, b| {
        a.group()
            .cmp(&b.group())
            .then(end_key(b).total_cmp(&end_key(a)))
            .then(a.within_tie(b))
    });
    // Tie groups: consecutive sites of one group whose end-year estimates tie with the
    // group's first site; each group is then listed by the tie order.
    let mut start = 0;
    while start < entries.len() {
        let mut stop = start + 1;
        while let (Some(head), Some(next)) = (entries.get(start), entries.get(stop)) {
            let same = head.group() == next.group()
                && matches!((&head.end, &next.end), (Some(a), Some(b)) if tied(a, b));
            if !same {
                break;
            }
            stop += 1;
        }
        if let Some(group) = entries.get_mut(start..stop) {
            group.sort_by(RankEntry::within_tie);
            let n = group.len();
            for e in group {
                e.rank = start + 1;
                e.tied = n > 1;
            }
        }
        start = stop;
    }
    entries
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    /// The plan's end year of the example sites (a projected year of theirs).
    const END: i32 = 2035;

    /// Ω_ar quantiles with median `m` and a 5–95 % range of ± `half`.
    fn q(m: f64, half: f64) -> Quantiles {
        Quantiles {
            p05: m - half,
            p25: m - half / 2.0,
            p50: m,
            p75: m + half / 2.0,
            p95: m + half,
        }
    }

    /// Sets the limiting season's Ω_ar of a site in the plan's end year under every pathway.
    fn set_end(site: &mut SiteReport, value: Quantiles) {
        let season = site.limiting_season().unwrap().to_string();
        for p in &mut site.projection {
            for s in p.seasons.iter_mut().filter(|s| s.season == season) {
                let pt = s.points.iter_mut().find(|pt| pt.year == END).unwrap();
                pt.omega_ar = value;
            }
        }
    }

    /// A model of `ends.len()` sites whose limiting season has the given median Ω_ar in the
    /// last horizon year under every pathway (`None`: that year is missing from the series) and
    /// the given lowest seasonal baseline mean; no site has a crossing or a heat year, and every
    /// site has the same Ω_ar in the plan's end year, so all tie on the first keys.
    fn model_with(ends: &[Option<f64>], now_mins: &[f64]) -> ReportModel {
        let mut model = example_model(ends.len());
        let last = *model.horizons.last().unwrap();
        for ((site, end), now) in model.sites.iter_mut().zip(ends).zip(now_mins) {
            assert_eq!(site.plan.end_year, Some(END));
            site.crossings.clear();
            site.thermal = None;
            // Every season's baseline mean at or above `now`, the first season exactly at it,
            // so that the first season is the limiting one.
            for (k, b) in site.baseline.iter_mut().enumerate() {
                b.omega_ar.mean = now + k as f64 * 0.1;
            }
            let season = site.baseline[0].season.clone();
            assert_eq!(site.limiting_season(), Some(season.as_str()));
            for p in &mut site.projection {
                for s in p.seasons.iter_mut().filter(|s| s.season == season) {
                    match end {
                        Some(v) => {
                            let pt = s.points.iter_mut().find(|pt| pt.year == last).unwrap();
                            pt.omega_ar.p50 = *v;
                        }
                        None => s.points.retain(|pt| pt.year != last),
                    }
                }
            }
            set_end(site, q(3.3, 0.3));
        }
        model
    }

    fn order(model: &ReportModel) -> Vec<usize> {
        rank_sites(model).iter().map(|e| e.site).collect()
    }

    #[test]
    fn within_a_tie_the_higher_last_median_comes_first() {
        // End medians 3.1, 3.6, 2.8, 3.3: descending gives sites 1 (3.6), 3 (3.3), 0 (3.1),
        // 2 (2.8).
        let m = model_with(
            &[Some(3.1), Some(3.6), Some(2.8), Some(3.3)],
            &[3.0, 3.0, 3.0, 3.0],
        );
        assert_eq!(order(&m), vec![1, 3, 0, 2]);
        let ranked = rank_sites(&m);
        assert_eq!(ranked[0].last_median, Some(3.6));
        assert!(ranked.iter().all(|e| e.rank == 1 && e.tied));
        assert_eq!(ranked[0].now_min, Some(3.0));
    }

    #[test]
    fn ties_go_to_the_higher_present_day_minimum_then_to_the_order_given() {
        // All end medians 3.2. Present-day minima 3.4, 3.9, 3.4: site 1 (3.9) first; sites 0
        // and 2 tie on both keys, so they keep the order given (0 before 2).
        let m = model_with(&[Some(3.2), Some(3.2), Some(3.2)], &[3.4, 3.9, 3.4]);
        assert_eq!(order(&m), vec![1, 0, 2]);
    }

    #[test]
    fn a_site_without_an_end_value_ranks_after_those_with_one() {
        // Site 0 has no value in the last horizon year: it goes last even though its
        // present-day minimum (4.2) is the highest; sites 1 (2.9) and 2 (3.0) by end median.
        let m = model_with(&[None, Some(2.9), Some(3.0)], &[4.2, 3.0, 3.0]);
        assert_eq!(order(&m), vec![2, 1, 0]);
        assert_eq!(rank_sites(&m)[2].last_median, None);
    }

    #[test]
    fn ranking_pathway_is_the_chosen_one_else_the_middle_one() {
        let mut m = example_model(2);
        // Five pathways: index (5 − 1) / 2 = 2, the third.
        assert_eq!(ranking_pathway(&m).unwrap().id, m.pathways[2].id);
        m.pathways.truncate(4);
        // Four pathways: index (4 − 1) / 2 = 1, the lower of the two middle ones.
        assert_eq!(ranking_pathway(&m).unwrap().id, m.pathways[1].id);
        m.ranking_pathway = Some(m.pathways[3].id.clone());
        assert_eq!(ranking_pathway(&m).unwrap().id, m.pathways[3].id);
        // An unknown id falls back to the middle pathway.
        m.ranking_pathway = Some("no-such-pathway".into());
        assert_eq!(ranking_pathway(&m).unwrap().id, m.pathways[1].id);
    }

    #[test]
    fn the_ranking_pathway_decides_the_order() {
        // Site 0 ends higher than site 1 under the middle pathway only; under another chosen
        // pathway site 1 ends higher: 3.5 > 3.0 under "middle", 2.5 < 2.7 under the other.
        let mut m = model_with(&[Some(3.0), Some(3.0)], &[3.0, 3.0]);
        let middle = ranking_pathway(&m).unwrap().id.clone();
        let other = m.pathways[0].id.clone();
        let last = *m.horizons.last().unwrap();
        let set = |m: &mut ReportModel, site: usize, pathway: &str, v: f64| {
            let season = m.sites[site].limiting_season().unwrap().to_string();
            let p = m.sites[site]
                .projection
                .iter_mut()
                .find(|p| p.pathway == pathway)
                .unwrap();
            let s = p.seasons.iter_mut().find(|s| s.season == season).unwrap();
            s.points
                .iter_mut()
                .find(|pt| pt.year == last)
                .unwrap()
                .omega_ar
                .p50 = v;
        };
        set(&mut m, 0, &middle, 3.5);
        set(&mut m, 0, &other, 2.5);
        set(&mut m, 1, &other, 2.7);
        assert_eq!(order(&m), vec![0, 1]);
        m.ranking_pathway = Some(other);
        assert_eq!(order(&m), vec![1, 0]);
    }

    /// Sets, under every pathway, the year the limiting season falls below 3.0 and the median
    /// heat onset of each site (`None`: not computed for that site).
    fn with_years(model: &mut ReportModel, years: &[(Option<CrossingYear>, Option<Option<i32>>)]) {
        for (site, (chem, heat)) in model.sites.iter_mut().zip(years) {
            let season = site.limiting_season().unwrap().to_string();
            site.crossings.retain(|c| c.threshold != KEY_OMEGA_LEVEL);
            if let Some(c) = chem {
                for p in &site.projection {
                    site.crossings.push(crate::report::model::Crossing {
                        pathway: p.pathway.clone(),
                        season: season.clone(),
                        threshold: KEY_OMEGA_LEVEL,
                        median: *c,
                        early: *c,
                        late: *c,
                    });
                }
            }
            match heat {
                Some(onset) => {
                    let t = site
                        .thermal
                        .insert(example_model(1).sites[0].thermal.clone().expect("heat"));
                    for s in &mut t.pathways {
                        s.severe_most_years = [*onset, *onset, *onset];
                        s.searched_to = 2100;
                    }
                }
                None => site.thermal = None,
            }
        }
    }

    #[test]
    fn the_earlier_limit_decides_and_a_later_first_limit_ranks_higher() {
        use CrossingYear::{AlreadyBelow, NotBy, Year};
        // First limits (earlier of chemistry and heat): site 0 min(2070, 2045) = 2045;
        // site 1 min(not by 2100, 2060) = 2060; site 2 min(2050, not by) = 2050; site 3
        // already below → earliest. Later first: 1 (2060), 2 (2050), 0 (2045), 3.
        let mut m = model_with(&[Some(3.0); 4], &[3.0; 4]);
        with_years(
            &mut m,
            &[
                (Some(Year(2070)), Some(Some(2045))),
                (Some(NotBy(2100)), Some(Some(2060))),
                (Some(Year(2050)), Some(None)),
                (Some(AlreadyBelow), Some(Some(2090))),
            ],
        );
        assert_eq!(order(&m), vec![1, 2, 0, 3]);
        assert_eq!(rank_sites(&m)[1].heat, Some(NotBy(2100)));
    }

    #[test]
    fn equal_first_limits_go_to_the_later_second_then_to_the_last_median() {
        use CrossingYear::Year;
        // All first limits 2050 (heat). Second limits: 2080, 2090, 2080 → site 1 first; sites 0
        // and 2 tie on both years and go by end median (3.1 < 3.4): 2 before 0.
        let mut m = model_with(&[Some(3.1), Some(3.0), Some(3.4)], &[3.0; 3]);
        with_years(
            &mut m,
            &[
                (Some(Year(2080)), Some(Some(2050))),
                (Some(Year(2090)), Some(Some(2050))),
                (Some(Year(2080)), Some(Some(2050))),
            ],
        );
        assert_eq!(order(&m), vec![1, 2, 0]);
    }

    #[test]
    fn a_site_missing_a_year_ranks_after_the_sites_with_both() {
        use CrossingYear::{NotBy, Year};
        // Site 0 has no temperature record: its chemistry year alone (not by 2100) would put
        // it first, but missing information must not lift it; site 1 (first limit 2040) and
        // site 2 (2055) have both years: 2, 1, 0.
        let mut m = model_with(&[Some(3.0); 3], &[3.0; 3]);
        with_years(
            &mut m,
            &[
                (Some(NotBy(2100)), None),
                (Some(Year(2070)), Some(Some(2040))),
                (Some(Year(2055)), Some(Some(2060))),
            ],
        );
        assert_eq!(order(&m), vec![2, 1, 0]);
    }

    #[test]
    fn the_tie_rule_is_the_90_percent_range_of_the_difference() {
        // Both 5–95 % ranges ± 0.30: s = 0.60 / 3.29 each, so the difference may reach
        // 1.645 × √2 × 0.60 / 3.29 = 0.30 × √2 = 0.424 before the sites are told apart.
        let a = q(3.50, 0.30);
        assert!(tied(&a, &q(3.10, 0.30)), "0.40 < 0.424");
        assert!(!tied(&a, &q(3.05, 0.30)), "0.45 > 0.424");
        // Narrower ranges (± 0.10: limit 0.10 × √2 = 0.141) tell 0.20 apart.
        assert!(!tied(&q(3.50, 0.10), &q(3.30, 0.10)));
        assert!(!tied(&a, &q(f64::NAN, 0.30)));
    }

    #[test]
    fn end_year_medians_order_the_sites_and_close_ones_share_a_rank() {
        // End-year medians 3.6, 3.5 and 3.0 (each ± 0.3, limit 0.424): sites 0 and 1 differ by
        // 0.1 and share rank 1; site 2 is 0.6 below site 0 and ranks 3. Within the tie site 1
        // comes first: its last-horizon median (3.2) is higher than site 0's (3.0).
        let mut m = model_with(&[Some(3.0), Some(3.2), Some(2.5)], &[3.4; 3]);
        for (site, end) in m.sites.iter_mut().zip([3.6, 3.5, 3.0]) {
            set_end(site, q(end, 0.3));
        }
        let ranked = rank_sites(&m);
        assert_eq!(order(&m), vec![1, 0, 2]);
        let ranks: Vec<(usize, bool)> = ranked.iter().map(|e| (e.rank, e.tied)).collect();
        assert_eq!(ranks, vec![(1, true), (1, true), (3, false)]);
        assert_eq!(ranked[0].end_year, Some(END));
    }

    #[test]
    fn a_first_limit_within_the_project_ranks_after_those_beyond_it() {
        use CrossingYear::{NotBy, Year};
        // Site 0 has the higher end-year median (3.8 against 3.2, not a tie) but reaches DHW ≥ 8
        // in most years in 2033, within its project (end 2035): it ranks after site 1, whose
        // first limit (2060) comes after its project.
        let mut m = model_with(&[Some(3.0); 2], &[3.4; 2]);
        set_end(&mut m.sites[0], q(3.8, 0.1));
        set_end(&mut m.sites[1], q(3.2, 0.1));
        with_years(
            &mut m,
            &[
                (Some(NotBy(2100)), Some(Some(2033))),
                (Some(Year(2060)), Some(Some(2070))),
            ],
        );
        assert_eq!(order(&m), vec![1, 0]);
        let ranked = rank_sites(&m);
        assert!(ranked[1].limited_in_project && !ranked[0].limited_in_project);
        assert_eq!((ranked[0].rank, ranked[1].rank), (1, 2));
    }
}
