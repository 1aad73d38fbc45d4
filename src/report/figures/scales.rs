//! The y-axis ranges a report's figures share: one range per quantity over every site, so that
//! the same Ω_ar, pH, temperature or calcification change sits at the same height in every
//! site's figures of a comparison (and in every panel of one site).

use super::calcification::calc_extent;
use super::fan::fan_data;
use super::seasonal::{PANELS, panel_extent};
use super::toolkit::{nice_range, omega_range};
use crate::report::model::{CalcUnit, ReportModel, SiteReport};

/// Shared axis ranges of one report.
#[derive(Debug, Clone)]
pub(super) struct Scales {
    /// Ω_ar of the fan charts, the key figures and the comparison charts: the 5–95 % range of
    /// every site's limiting season under every pathway, with the threshold levels.
    pub(super) omega: (f64, f64),
    /// The seasonal-cycle panels (Ω_ar, pH_T, temperature), in [`PANELS`] order.
    pub(super) seasonal: [(f64, f64); 3],
    /// Calcification change per relationship (by name and unit) over every site.
    calcification: Vec<(String, CalcUnit, (f64, f64))>,
}

/// The sites shown in full: only their figures share these axes.
fn detailed(model: &ReportModel) -> impl Iterator<Item = &SiteReport> {
    model
        .sites
        .iter()
        .enumerate()
        .filter(|(i, _)| model.in_detail(*i))
        .map(|(_, s)| s)
}

impl Scales {
    /// The ranges of a report's model.
    pub(super) fn of(model: &ReportModel) -> Self {
        let mut lo = f64::INFINITY;
        let mut hi = f64::NEG_INFINITY;
        for site in detailed(model) {
            let season = site.limiting_season().unwrap_or_default();
            for p in &model.pathways {
                if let Some(d) = fan_data(site, &p.id, season) {
                    for q in &d.q {
                        lo = lo.min(q.p05);
                        hi = hi.max(q.p95);
                    }
                }
            }
        }
        let omega = omega_range(lo, hi, &model.thresholds);
        let seasonal = PANELS.map(|spec| {
            let (lo, hi) = detailed(model)
                .map(|s| panel_extent(&s.baseline, spec))
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), (c, d)| {
                    (a.min(c), b.max(d))
                });
            nice_range(lo, hi, spec.2)
        });
        // Relationships are matched by name and unit: the model gives them no other identity.
        let mut calc: Vec<(String, CalcUnit, (f64, f64))> = Vec::new();
        for c in detailed(model).flat_map(|s| &s.calcification) {
            let Some((lo, hi)) = calc_extent(model, c) else {
                continue;
            };
            match calc
                .iter_mut()
                .find(|(name, unit, _)| *name == c.relationship && *unit == c.unit)
            {
                Some((_, _, r)) => *r = (r.0.min(lo), r.1.max(hi)),
                None => calc.push((c.relationship.clone(), c.unit, (lo, hi))),
            }
        }
        let calcification = calc
            .into_iter()
            .map(|(name, unit, (lo, hi))| {
                let step = match unit {
                    CalcUnit::PercentChange => 10.0,
                    CalcUnit::KgCaco3PerM2Year => 0.5,
                    CalcUnit::MmolCaco3PerM2Day => 10.0,
                };
                (name, unit, nice_range(lo, hi, step))
            })
            .collect();
        Self {
            omega,
            seasonal,
            calcification,
        }
    }

    /// The calcification axis of a relationship (`None` when it has no finite value).
    pub(super) fn calcification(&self, name: &str, unit: CalcUnit) -> Option<(f64, f64)> {
        self.calcification
            .iter()
            .find(|(n, u, _)| n == name && *u == unit)
            .map(|(_, _, r)| *r)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    #[test]
    fn one_omega_range_covers_every_site() {
        let model = example_model(3);
        let scales = Scales::of(&model);
        // Worked from the example: every site's limiting-season 5–95 % values lie inside, and
        // the range is the union of the single-site ranges.
        let (lo, hi) = scales.omega;
        for i in 0..3 {
            let mut one = model.clone();
            one.sites = vec![model.sites[i].clone()];
            let (a, b) = Scales::of(&one).omega;
            assert!(
                lo <= a && b <= hi,
                "site {i}: ({a}, {b}) not within ({lo}, {hi})"
            );
        }
        // Sites differ (the example's base Ω_ar 3.95, 3.55 and 4.15): their own ranges are
        // not all the same, so the shared one is wider than at least one of them.
        let singles: Vec<(f64, f64)> = (0..3)
            .map(|i| {
                let mut one = model.clone();
                one.sites = vec![model.sites[i].clone()];
                Scales::of(&one).omega
            })
            .collect();
        assert!(singles.iter().any(|r| *r != (lo, hi)), "{singles:?}");
    }

    #[test]
    fn calcification_axes_are_shared_by_relationship_across_sites() {
        let mut model = example_model(2);
        // Make the second site's first relationship fall twice as far: the shared axis must
        // reach its lowest 25 % quantile, on a 10 % step.
        for s in &mut model.sites[1].calcification[0].series {
            for p in &mut s.points {
                p.value.p25 *= 2.0;
            }
        }
        let lowest = model.sites[1].calcification[0]
            .series
            .iter()
            .flat_map(|s| &s.points)
            .map(|p| p.value.p25)
            .fold(f64::INFINITY, f64::min);
        let scales = Scales::of(&model);
        let c = &model.sites[0].calcification[0];
        let (y0, _) = scales.calcification(&c.relationship, c.unit).unwrap();
        assert!(y0 <= lowest, "{y0} vs {lowest}");
        assert_eq!(y0 % 10.0, 0.0);
        // The first site alone does not reach that low: the axis is shared, not its own.
        let mut first = model.clone();
        first.sites.truncate(1);
        let (own, _) = Scales::of(&first)
            .calcification(&c.relationship, c.unit)
            .unwrap();
        assert!(own > lowest, "{own} vs {lowest}");
        assert!(
            scales
                .calcification("no such relationship", c.unit)
                .is_none()
        );
    }
}
