//! Tests of the two questions the outlook answers apart: how well the season's mean is known
//! (uncertainty) and how much of the time the water is below a level (variability). A
//! `#[cfg(test)]` module: its `unwrap`s never meet user data.

use super::*;
use crate::chem::{self, Constants, Input, MethodSet};
use crate::outlook::result::{GroupId, Outlook, Quantity, ScenarioId};
use crate::outlook::warming::standard_normal_quantile;
use crate::outlook::{
    Disequilibrium, Observed, ProjectionRecord, ProjectionSettings, SamplingUnit, SiteInput,
};

fn record(ta: f64, pco2: f64, unit: Option<SamplingUnit>) -> ProjectionRecord {
    ProjectionRecord {
        label: "invented".into(),
        season: 0,
        sample_year: 2024,
        temp_c: 27.0,
        salinity: 35.0,
        pressure_dbar: 1.0,
        silicate: 2.0,
        phosphate: 0.2,
        ta,
        pco2,
        measured: None,
        unit,
        source: None,
    }
}

fn site_of(records: Vec<ProjectionRecord>) -> SiteInput {
    SiteInput {
        name: "Invented season".into(),
        seasons: vec!["only".into()],
        records,
        stations: Vec::new(),
        methods: MethodSet::default(),
        observed: Observed::noaa(),
    }
}

fn quiet_settings(site: &SiteInput, members: usize) -> ProjectionSettings {
    let mut s = ProjectionSettings::defaults_for(site);
    s.warming = false;
    s.ensemble.members = members;
    s.ensemble.constants = false;
    s.ensemble.measurement = MeasurementUncertainty {
        ta_umol_kg: 0.0,
        dic_umol_kg: 0.0,
        ph: 0.0,
        pco2_pct: 0.0,
    };
    s.years = vec![2030, 2050];
    s
}

/// The pCO2 (µatm) that gives `omega` at TA 2300 µmol/kg and 27 °C (bisection on the
/// engine's own TA + pCO2 solve: Omega_ar falls as pCO2 rises).
fn pco2_for(omega: f64) -> f64 {
    let r = record(2300.0, 400.0, None);
    let k = Constants::new(&r.conditions_at(27.0), &MethodSet::default());
    let (mut lo, mut hi) = (50.0, 5000.0);
    for _ in 0..80 {
        let mid = 0.5 * (lo + hi);
        let om = chem::solve_pair(Input::Ta(2300.0), Input::Pco2(mid), &k)
            .unwrap()
            .omega_ar;
        if om > omega {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

fn ssp245(s: &ProjectionSettings) -> &crate::outlook::PathwaySpec {
    s.pathways
        .iter()
        .find(|p| p.pathway.name == "SSP2-4.5")
        .unwrap()
}

fn omega_quantiles(o: &Outlook, year: i32) -> [f64; 5] {
    let p = o.pathway_id("SSP2-4.5").unwrap();
    o.series(p, ScenarioId::Base, GroupId::Season(0), Quantity::OmegaAr)
        .unwrap()
        .at(year)
        .unwrap()
        .q
        .levels()
}

/// Analytic check: a season whose records' Omega_ar follow a normal distribution with mean
/// 3.2 and standard deviation 0.3 (400 records at the stratified quantiles) lies below 3.0
/// for Φ((3.0 − 3.2)/0.3) = Φ(−0.667) = 25.25 % of the time (standard normal table). The
/// share of time below is taken over the records, not over the ensemble.
#[test]
fn normal_variability_gives_the_analytic_share_below() {
    let n = 400;
    let records: Vec<ProjectionRecord> = (0..n)
        .map(|i| {
            let z = standard_normal_quantile((i as f64 + 0.5) / n as f64);
            record(2300.0, pco2_for(3.2 + 0.3 * z), None)
        })
        .collect();
    let site = site_of(records);
    let o = run(&site, &quiet_settings(&site, 50), &NoProgress).unwrap();
    let share = o
        .time_below_at(None, ScenarioId::Base, GroupId::Season(0), None, 3.0)
        .unwrap();
    assert!((share - 25.25).abs() < 0.3, "{share}");
    // The chance that the season's mean (3.2) is below 3.0 is another question: with 400
    // records its uncertainty is about 0.3/20 = 0.015, so that chance is nil.
    let p = o.pathway_id("SSP2-4.5").unwrap();
    let mean_below = o
        .probabilities
        .iter()
        .find(|b| b.pathway == p && b.year == 2030 && b.threshold_omega_ar == 3.5)
        .unwrap();
    assert!(mean_below.prob_below_pct > 99.0);
}

/// Analytic check of the bootstrap of a mean (Efron & Tibshirani 1993, ch. 6): with
/// constants and measurement errors left out, the members' 5–95 % range of the season's
/// mean is 2 × 1.645 × σ/√n, σ the standard deviation of the n records' projected values
/// (with n in the denominator, the plug-in estimate), so it shrinks as 1/√n: quadrupling the
/// records halves it.
#[test]
fn uncertainty_of_the_mean_shrinks_as_one_over_root_n() {
    let width = |n: usize| {
        let records: Vec<ProjectionRecord> = (0..n)
            .map(|i| record(2300.0, [360.0, 400.0, 440.0, 480.0][i % 4], None))
            .collect();
        let site = site_of(records);
        let s = quiet_settings(&site, 4000);
        let o = run(&site, &s, &NoProgress).unwrap();
        let q = omega_quantiles(&o, 2050);
        // The records' own projected values, worked out one by one.
        let spec = ssp245(&s);
        let v: Vec<f64> = site
            .records
            .iter()
            .map(|r| super::tests::direct_omega(&site, r, &spec.pathway, 2050))
            .collect();
        let mean = v.iter().sum::<f64>() / n as f64;
        let sd = (v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / n as f64).sqrt();
        // The median member is the mean of the records.
        assert!((q[2] - mean).abs() < 0.2 * sd, "n {n}: {} vs {mean}", q[2]);
        (q[4] - q[0], 2.0 * 1.644_854 * sd / (n as f64).sqrt())
    };
    let (w16, expect16) = width(16);
    let (w64, expect64) = width(64);
    assert!((w16 / expect16 - 1.0).abs() < 0.1, "{w16} vs {expect16}");
    assert!((w64 / expect64 - 1.0).abs() < 0.1, "{w64} vs {expect64}");
    assert!((w16 / w64 - 2.0).abs() < 0.25, "{w16} / {w64}");
}

/// Worked arithmetic on time weighting: 24 hourly readings on one day and one bottle on
/// another are two station-days of equal weight. With the ensemble off, the season's mean
/// Omega_ar is (mean of the 24 readings + the bottle) / 2, not the mean of 25 values.
#[test]
fn hourly_series_does_not_swamp_a_bottle() {
    let day = |d: i32, continuous: bool| {
        Some(SamplingUnit {
            station: 0,
            day: d,
            continuous,
            minute: None,
        })
    };
    let mut records: Vec<ProjectionRecord> = (0..24)
        .map(|h| record(2300.0, 380.0 + 4.0 * h as f64, day(1, true)))
        .collect();
    records.push(record(2300.0, 520.0, day(2, false)));
    let site = site_of(records);
    let s = quiet_settings(&site, 0);
    let o = run(&site, &s, &NoProgress).unwrap();
    let spec = ssp245(&s);
    let omega = |r: &ProjectionRecord| super::tests::direct_omega(&site, r, &spec.pathway, 2050);
    let hourly = site.records[..24].iter().map(omega).sum::<f64>() / 24.0;
    let expect = 0.5 * (hourly + omega(&site.records[24]));
    let q = omega_quantiles(&o, 2050);
    for v in q {
        assert!((v - expect).abs() < 1e-9, "{v} vs {expect}");
    }
}

/// The constants' uncertainty is propagated through the season's representative record.
/// Checked against the direct computation: a season of three different records on one
/// station-day (so the bootstrap has nothing to resample), with 4,000 draws of the Orr et
/// al. (2018) constants, each record solved with the drawn constants and the three averaged.
/// The 5–95 % ranges agree within 5 %.
#[test]
fn constants_through_the_representative_match_direct_solves() {
    use crate::outlook::projection::{RecordAnchor, YearConditions, solve_projected};
    use crate::outlook::rng::Xoshiro256;
    let one_day = Some(SamplingUnit {
        station: 0,
        day: 1,
        continuous: false,
        minute: None,
    });
    let mut records = vec![
        record(2290.0, 380.0, one_day),
        record(2300.0, 430.0, one_day),
        record(2310.0, 480.0, one_day),
    ];
    records[0].temp_c = 26.0;
    records[2].temp_c = 28.0;
    let site = site_of(records);
    let mut s = quiet_settings(&site, 4000);
    s.ensemble.constants = true;
    let o = run(&site, &s, &NoProgress).unwrap();
    let q = omega_quantiles(&o, 2050);
    let spec = ssp245(&s);
    let mut rng = Xoshiro256::seed_from_u64(99);
    let mut direct: Vec<f64> = (0..4000)
        .map(|_| {
            let z: [f64; 8] = std::array::from_fn(|_| rng.normal());
            let pt = constants_perturbation(z);
            site.records
                .iter()
                .map(|r| {
                    let a =
                        RecordAnchor::new(r, &spec.pathway, &site.observed, &site.methods).unwrap();
                    let yc = YearConditions::new(
                        r,
                        &spec.pathway,
                        &site.observed,
                        None,
                        &site.methods,
                        2050,
                        Disequilibrium::Ratio,
                    )
                    .unwrap();
                    let pco2 = a.project_pco2(r.pco2, yc.pco2_air, Disequilibrium::Ratio);
                    solve_projected(r.ta, pco2, None, &yc.constants.perturbed(&pt))
                        .unwrap()
                        .omega_ar
                })
                .sum::<f64>()
                / 3.0
        })
        .collect();
    direct.sort_by(f64::total_cmp);
    let d05 = quantile_sorted(&direct, 0.05);
    let d95 = quantile_sorted(&direct, 0.95);
    let d50 = quantile_sorted(&direct, 0.5);
    assert!(
        ((q[4] - q[0]) / (d95 - d05) - 1.0).abs() < 0.05,
        "{q:?} vs {d05} {d95}"
    );
    assert!((q[2] - d50).abs() < 0.01, "{} vs {d50}", q[2]);
}
