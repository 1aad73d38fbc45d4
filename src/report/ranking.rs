//! Ranking the sites of a comparison: which pathway ranks them, each site's ranking key and the
//! order. This is analysis on the report model (numbers in, an order out); the view and the
//! figures only show the order it gives.

use super::model::{PathwayInfo, Quantiles, ReportModel, SiteReport};

/// Ω_ar quantiles of a site's limiting season under a pathway in a year; `None` when the year is
/// not projected or its median is not finite.
pub fn limiting_omega(site: &SiteReport, pathway: &str, year: i32) -> Option<Quantiles> {
    let season = site.limiting_season()?;
    let q = site.series(pathway, season)?.at(year)?.omega_ar;
    q.p50.is_finite().then_some(q)
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

/// One site's ranking key, in display order.
#[derive(Debug, Clone)]
pub struct RankEntry {
    /// Index into `model.sites`.
    pub site: usize,
    /// Median Ω_ar of the limiting season at the last horizon under the ranking pathway.
    pub end_median: Option<f64>,
    /// Lowest seasonal baseline mean Ω_ar.
    pub now_min: Option<f64>,
}

/// Ranks the sites: by the median Ω_ar of each site's limiting season in the last horizon
/// year under the ranking pathway (higher first), ties and missing values broken by the
/// present-day seasonal minimum, then by the order given.
pub fn rank_sites(model: &ReportModel) -> Vec<RankEntry> {
    let pathway = ranking_pathway(model)
        .map(|p| p.id.as_str())
        .unwrap_or_default();
    let last = model.horizons.last().copied();
    let mut entries: Vec<RankEntry> = model
        .sites
        .iter()
        .enumerate()
        .map(|(i, s)| RankEntry {
            site: i,
            end_median: last
                .and_then(|y| limiting_omega(s, pathway, y))
                .map(|q| q.p50),
            now_min: s
                .baseline
                .iter()
                .map(|b| b.omega_ar.mean)
                .filter(|v| v.is_finite())
                .min_by(f64::total_cmp),
        })
        .collect();
    let key = |v: Option<f64>| v.unwrap_or(f64::NEG_INFINITY);
    entries.sort_by(|a, b| {
        key(b.end_median)
            .total_cmp(&key(a.end_median))
            .then(key(b.now_min).total_cmp(&key(a.now_min)))
            .then(a.site.cmp(&b.site))
    });
    entries
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    /// A model of `ends.len()` sites whose limiting season has the given median Ω_ar in the
    /// last horizon year under every pathway (`None`: that year is missing from the series) and
    /// the given lowest seasonal baseline mean.
    fn model_with(ends: &[Option<f64>], now_mins: &[f64]) -> ReportModel {
        let mut model = example_model(ends.len());
        let last = *model.horizons.last().unwrap();
        for ((site, end), now) in model.sites.iter_mut().zip(ends).zip(now_mins) {
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
        }
        model
    }

    fn order(model: &ReportModel) -> Vec<usize> {
        rank_sites(model).iter().map(|e| e.site).collect()
    }

    #[test]
    fn higher_end_median_ranks_first() {
        // End medians 3.1, 3.6, 2.8, 3.3: descending gives sites 1 (3.6), 3 (3.3), 0 (3.1),
        // 2 (2.8).
        let m = model_with(
            &[Some(3.1), Some(3.6), Some(2.8), Some(3.3)],
            &[3.0, 3.0, 3.0, 3.0],
        );
        assert_eq!(order(&m), vec![1, 3, 0, 2]);
        let ranked = rank_sites(&m);
        assert_eq!(ranked[0].end_median, Some(3.6));
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
        assert_eq!(rank_sites(&m)[2].end_median, None);
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
}
