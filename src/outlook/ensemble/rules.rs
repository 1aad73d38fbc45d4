//! The three projection rules compared (structural uncertainty): at a site with offshore
//! source water, every record is projected on its own with central values by the ratio,
//! additive and source-offsets rules, and each group's time-weighted mean Omega_ar is
//! compared at the horizon years. The spread between the rules is a choice of model, not a
//! sampling uncertainty: it is reported beside the ensemble, never folded into it.

use super::super::projection::Disequilibrium;
use super::super::result::{PathwayId, RuleComparison};
use super::central::{Central, OMEGA_AR};
use super::prepare::{Group, Prepared};

/// The group's time-weighted mean of `omega(record)` over the records that could be solved
/// (weights renormalised); NaN when none could.
fn group_mean(g: &Group, omega: impl Fn(usize) -> Option<f64>) -> f64 {
    let (mut sum, mut w_all) = (0.0, 0.0);
    for (&r, &w) in g.records.iter().zip(&g.weights) {
        if let Some(x) = omega(r).filter(|x| x.is_finite()) {
            sum += w * x;
            w_all += w;
        }
    }
    if w_all > 0.0 { sum / w_all } else { f64::NAN }
}

/// The rules other than the settings' own, projected beside it by
/// [`super::central::project_all`] at the horizon years (base case).
pub(super) fn other_rules(mode: Disequilibrium) -> Vec<Disequilibrium> {
    Disequilibrium::ALL
        .into_iter()
        .filter(|m| *m != mode)
        .collect()
}

/// Every pathway, group and horizon year under the three rules (`centrals`: the run's own
/// central projections, which carry the other rules at the horizon years).
pub(super) fn compare_rules(prep: &Prepared<'_>, centrals: &[Central]) -> Vec<RuleComparison> {
    let s = prep.s;
    let mut out = Vec::new();
    for (p, c) in centrals.iter().enumerate().take(s.pathways.len()) {
        for g in &prep.groups {
            for (h, (&year, &k)) in s.years.iter().zip(&prep.horizon_knot).enumerate() {
                let mean = |m: Disequilibrium| {
                    if m == s.mode {
                        group_mean(g, |r| c.get(0, r, k).map(|v| v[OMEGA_AR]))
                    } else {
                        group_mean(g, |r| c.rule_omega(m, r, h))
                    }
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
