//! The three projection rules compared (structural uncertainty): at a site with offshore
//! source water, every record is projected on its own with central values by the ratio,
//! additive and source-offsets rules, and each group's time-weighted mean Omega_ar is
//! compared at the horizon years. The spread between the rules is a choice of model, not a
//! sampling uncertainty: it is reported beside the ensemble, never folded into it.

use super::super::projection::Disequilibrium;
use super::super::result::{PathwayId, RuleComparison};
use super::central::{Central, OMEGA_AR, project_at};
use super::prepare::{Group, Prepared};

/// The group's time-weighted mean Omega_ar at computed year `k` (base case), over the
/// records that could be solved (weights renormalised); NaN when none could.
fn group_mean(g: &Group, central: &Central, k: usize) -> f64 {
    let (mut sum, mut w_all) = (0.0, 0.0);
    for (&r, &w) in g.records.iter().zip(&g.weights) {
        if let Some(x) = central
            .get(0, r, k)
            .map(|v| v[OMEGA_AR])
            .filter(|x| x.is_finite())
        {
            sum += w * x;
            w_all += w;
        }
    }
    if w_all > 0.0 { sum / w_all } else { f64::NAN }
}

/// Every pathway, group and horizon year under the three rules (`centrals`: the run's own
/// central projections by the settings' rule, reused).
pub(super) fn compare_rules(prep: &Prepared<'_>, centrals: &[Central]) -> Vec<RuleComparison> {
    let s = prep.s;
    let mut out = Vec::new();
    for (p, own) in centrals.iter().enumerate().take(s.pathways.len()) {
        // The other two rules are needed at the horizon years and for the base case only.
        let others: Vec<(Disequilibrium, Central)> = Disequilibrium::ALL
            .into_iter()
            .filter(|m| *m != s.mode)
            .map(|m| (m, project_at(prep, p, m, &s.years, 1)))
            .collect();
        for g in &prep.groups {
            for (h, (&year, &k)) in s.years.iter().zip(&prep.horizon_knot).enumerate() {
                let mean = |m: Disequilibrium| match others.iter().find(|(x, _)| *x == m) {
                    Some((_, c)) => group_mean(g, c, h),
                    None => group_mean(g, own, k),
                };
                out.push(RuleComparison {
                    pathway: PathwayId(p),
                    group: g.id,
                    year,
                    omega_ar: Disequilibrium::ALL.map(mean),
                });
            }
        }
    }
    out
}
