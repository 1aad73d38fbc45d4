//! Tests of the whole ensemble run on a small invented site (a `#[cfg(test)]` module: its
//! `unwrap`s never meet user data).

use super::*;
use crate::chem::{self, Constants, Input, MethodSet};
use crate::outlook::result::{
    Criterion, CrossingGroup, CrossingKind, Outlook, Quantity, RelationshipId, ScenarioId,
};
use crate::outlook::{
    CalcificationSettings, Disequilibrium, LocalScenario, Observed, Offsets, OutputFormat,
    OutputTable, Pathway, PathwaySpec, ProjectionRecord, ProjectionSettings, SiteInput,
    project_record,
};

/// The quantile series of one quantity: (year, [p05, p25, p50, p75, p95]); empty when absent.
fn series(
    o: &Outlook,
    pathway: &str,
    scenario: &str,
    group: &str,
    q: Quantity,
) -> Vec<(i32, [f64; 5])> {
    let sid = o
        .scenario_ids()
        .find(|(_, n)| *n == scenario)
        .map(|(id, _)| id)
        .unwrap_or(ScenarioId::Base);
    match (o.pathway_id(pathway), o.group_id(group)) {
        (Some(p), Some(g)) => o
            .series(p, sid, g, q)
            .map(|s| s.points.iter().map(|pt| (pt.year, pt.q.levels())).collect())
            .unwrap_or_default(),
        _ => Vec::new(),
    }
}

fn rec(season: usize, i: usize, t: f64, ta: f64, pco2: f64) -> ProjectionRecord {
    ProjectionRecord {
        label: format!("records.csv line {}", i + 2),
        season,
        sample_year: 2024,
        temp_c: t,
        salinity: 35.0,
        pressure_dbar: 2.0,
        silicate: 2.0,
        phosphate: 0.2,
        ta,
        pco2,
        measured: None,
        unit: None,
        source: None,
    }
}

fn site() -> SiteInput {
    let records = vec![
        rec(0, 0, 26.0, 2290.0, 410.0),
        rec(0, 1, 26.5, 2300.0, 420.0),
        rec(0, 2, 27.0, 2310.0, 405.0),
        rec(1, 3, 28.5, 2270.0, 440.0),
        rec(1, 4, 29.0, 2280.0, 450.0),
        rec(1, 5, 29.5, 2275.0, 445.0),
    ];
    SiteInput {
        name: "Invented test reef".into(),
        seasons: vec!["dry".into(), "wet".into()],
        records,
        stations: Vec::new(),
        methods: MethodSet::default(),
        observed: Observed::noaa(),
    }
}

fn settings(site: &SiteInput, members: usize) -> ProjectionSettings {
    let mut s = ProjectionSettings::defaults_for(site);
    // These tests were written for the temperatures as measured.
    s.warming = false;
    s.ensemble.members = members;
    s.years = vec![2025, 2030, 2040, 2050, 2060, 2070, 2080, 2090, 2100];
    s
}

/// One record projected on its own (ratio mode, warming off, no scenario): the direct
/// computation the ensemble is checked against.
pub(super) fn direct_omega(
    site: &SiteInput,
    rec: &ProjectionRecord,
    pathway: &Pathway,
    year: i32,
) -> f64 {
    project_record(
        rec,
        pathway,
        &site.observed,
        None,
        &site.methods,
        Disequilibrium::Ratio,
        None,
        year,
    )
    .unwrap()
    .state
    .omega_ar
}

fn all_bytes(o: &Outlook) -> Vec<u8> {
    let mut v = Vec::new();
    for t in [
        OutputTable::Quantiles,
        OutputTable::Crossings,
        OutputTable::Thresholds,
    ] {
        o.write(&mut v, OutputFormat::Csv, t).unwrap();
    }
    o.write(&mut v, OutputFormat::Json, OutputTable::Quantiles)
        .unwrap();
    v
}

#[test]
fn results_do_not_depend_on_thread_count() {
    let site = site();
    let mut s = settings(&site, 150);
    s.ensemble.threads = Some(1);
    let a = run(&site, &s, &NoProgress).unwrap();
    s.ensemble.threads = Some(2);
    let b = run(&site, &s, &NoProgress).unwrap();
    s.ensemble.threads = Some(3);
    let c = run(&site, &s, &NoProgress).unwrap();
    assert_eq!(all_bytes(&a), all_bytes(&b));
    assert_eq!(all_bytes(&a), all_bytes(&c));
}

#[test]
fn seed_reproduces_and_changes_the_ensemble() {
    let site = site();
    let s = settings(&site, 100);
    let a = all_bytes(&run(&site, &s, &NoProgress).unwrap());
    let b = all_bytes(&run(&site, &s, &NoProgress).unwrap());
    assert_eq!(a, b);
    let mut s2 = s.clone();
    s2.ensemble.seed += 1;
    let c = all_bytes(&run(&site, &s2, &NoProgress).unwrap());
    assert_ne!(a, c);
}

/// Common practice: the higher pathway is never above the lower one at the same member
/// (same draws) wherever its atmospheric CO2 is at least as high (warming off); so no
/// quantile of the higher pathway lies above the same quantile of the lower one.
#[test]
fn higher_pathway_never_above_lower_at_same_member() {
    let site = site();
    let mut s = settings(&site, 500);
    s.pathways.insert(
        0,
        PathwaySpec::with_default_warming(Pathway::builtin("steady").unwrap(), &site.observed),
    );
    let o = run(&site, &s, &NoProgress).unwrap();
    let xco2 = |p: &PathwaySpec, y: i32| p.pathway.xco2_ppm(&site.observed, y).unwrap();
    for group in ["dry", "wet", AGGREGATE_LABEL] {
        for a in &s.pathways {
            for b in &s.pathways {
                let qa = series(&o, &a.pathway.name, BASE_SCENARIO, group, Quantity::OmegaAr);
                let qb = series(&o, &b.pathway.name, BASE_SCENARIO, group, Quantity::OmegaAr);
                for ((y, la), (_, lb)) in qa.iter().zip(&qb) {
                    if xco2(a, *y) >= xco2(b, *y) {
                        for (x, z) in la.iter().zip(lb) {
                            assert!(x <= &(z + 1e-12), "{group} {y}");
                        }
                    }
                }
            }
        }
    }
}

#[test]
fn ensemble_off_reproduces_the_deterministic_projection() {
    let mut site = site();
    site.records.truncate(1);
    site.seasons.truncate(1);
    let s = settings(&site, 0);
    let o = run(&site, &s, &NoProgress).unwrap();
    for (p, spec) in s.pathways.iter().enumerate() {
        let series = series(
            &o,
            &spec.pathway.name,
            BASE_SCENARIO,
            "dry",
            Quantity::OmegaAr,
        );
        assert_eq!(series.len(), s.years.len());
        for (yi, (year, q)) in series.iter().enumerate() {
            let direct = direct_omega(&site, &site.records[0], &spec.pathway, *year);
            assert_eq!(*year, s.years[yi]);
            for v in q {
                assert!((v - direct).abs() < 1e-12, "pathway {p}");
            }
        }
    }
}

/// Common practice: the ensemble spread is dominated by the constants' uncertainty
/// (Orr et al. 2018 find u(Omega_ar) ≈ 0.16 with constants, ≈ 0.03 without); turning the
/// constants off must narrow the 5–95 % range several-fold for a single record.
#[test]
fn constants_dominate_the_spread() {
    let mut site = site();
    site.records.truncate(1);
    site.seasons.truncate(1);
    let mut s = settings(&site, 2000);
    let o = run(&site, &s, &NoProgress).unwrap();
    let w = |o: &Outlook| {
        let q = series(o, "SSP2-4.5", BASE_SCENARIO, "dry", Quantity::OmegaAr)[0].1;
        q[4] - q[0]
    };
    let with = w(&o);
    s.ensemble.constants = false;
    let without = w(&run(&site, &s, &NoProgress).unwrap());
    assert!(
        with > 0.35 && with < 0.7,
        "5-95 % width with constants {with}"
    );
    assert!(without < with / 3.0, "{without} vs {with}");
}

#[test]
fn scenario_offsets_raise_omega_member_by_member() {
    let site = site();
    let mut s = settings(&site, 200);
    s.scenarios.push(LocalScenario {
        name: "alkalinity +30".into(),
        all_seasons: Offsets {
            ta_umol_kg: 30.0,
            dic_umol_kg: 0.0,
        },
        by_season: vec![],
        start_year: Some(2040),
    });
    let o = run(&site, &s, &NoProgress).unwrap();
    for season in ["dry", "wet", AGGREGATE_LABEL] {
        let base = series(&o, "SSP2-4.5", BASE_SCENARIO, season, Quantity::OmegaAr);
        let with = series(&o, "SSP2-4.5", "alkalinity +30", season, Quantity::OmegaAr);
        for ((y, qb), (_, qs)) in base.iter().zip(&with) {
            if *y < 2040 {
                assert_eq!(qb, qs);
            } else {
                assert!(qs[2] > qb[2] + 0.05, "{season} {y}");
            }
        }
    }
    assert_eq!(o.scenarios.len(), 1);
}

/// Under a rising pathway each member's mean declines, so the median crossing year and the
/// median of the horizon-year quantiles agree: the median member is below the threshold in a
/// horizon year exactly when at least half the members have crossed by then.
#[test]
fn crossing_rows_follow_the_quantile_series() {
    let site = site();
    let s = settings(&site, 301);
    let o = run(&site, &s, &NoProgress).unwrap();
    let mut compared = 0;
    for row in &o.crossings {
        let Criterion::OmegaArBelow {
            threshold_omega_ar: t,
            ..
        } = row.criterion
        else {
            continue;
        };
        if let (Some(a), Some(b)) = (row.first_year.p05, row.first_year.p50) {
            assert!(a <= b);
        }
        if let (Some(a), Some(b)) = (row.first_year.p50, row.first_year.p95) {
            assert!(a <= b);
        }
        let group = match row.group {
            CrossingGroup::WorstSeason => {
                // The limiting season crosses no later than any season.
                for season in ["dry", "wet"] {
                    let id = o.group_id(season).unwrap();
                    let other = o
                        .crossings
                        .iter()
                        .find(|r| {
                            r.group == CrossingGroup::Group(id)
                                && r.pathway == row.pathway
                                && r.criterion == row.criterion
                                && r.scenario == row.scenario
                        })
                        .unwrap();
                    if let Some(y) = other.first_year.p50 {
                        assert!(row.first_year.p50.is_some_and(|w| w <= y));
                    }
                }
                continue;
            }
            CrossingGroup::Group(g) => g,
        };
        if row.met_at_baseline || o.pathways[row.pathway.0].name == "SSP1-1.9" {
            continue;
        }
        let series = o
            .series(row.pathway, row.scenario, group, Quantity::OmegaAr)
            .unwrap();
        for pt in &series.points {
            if pt.q.p50 < t - 1e-3 {
                assert!(row.first_year.p50.is_some_and(|y| y <= pt.year), "{row:?}");
                compared += 1;
            } else if pt.q.p50 > t + 1e-3 {
                assert!(row.first_year.p50.is_none_or(|y| y > pt.year), "{row:?}");
                compared += 1;
            }
        }
    }
    assert!(compared > 100, "{compared}");
    assert!(
        o.probabilities
            .iter()
            .all(|p| (0.0..=100.0).contains(&p.prob_below_pct))
    );
}

/// Crossing years are annual whatever the horizon years: with horizons 2050 and 2100 only,
/// the ensemble-off crossing of one record below 3.5 is the first year in which the record,
/// projected on its own every year (`project_record`), is below 3.5 (interpolation between
/// computed years every five years may shift it by at most one year).
#[test]
fn crossing_years_are_annual() {
    let mut site = site();
    site.records.truncate(1);
    site.seasons.truncate(1);
    let mut s = settings(&site, 0);
    s.years = vec![2050, 2100];
    let o = run(&site, &s, &NoProgress).unwrap();
    let spec = s
        .pathways
        .iter()
        .find(|p| p.pathway.name == "SSP5-8.5")
        .unwrap();
    let direct =
        (2025..=2100).find(|&y| direct_omega(&site, &site.records[0], &spec.pathway, y) < 3.5);
    let row = o
        .crossings
        .iter()
        .find(|r| {
            o.pathways[r.pathway.0].name == "SSP5-8.5"
                && r.group == CrossingGroup::Group(o.group_id("dry").unwrap())
                && matches!(r.criterion, Criterion::OmegaArBelow { threshold_omega_ar, .. } if threshold_omega_ar == 3.5)
        })
        .unwrap();
    let (Some(d), Some(y)) = (direct, row.first_year.p50) else {
        panic!("{direct:?} {row:?}");
    };
    assert!((d - y).abs() <= 1, "direct {d}, outlook {y}");
    assert!(y != 2050 && y != 2100, "{y}");
}

/// A record measured as TA + DIC keeps its measured DIC in its sampling year under every
/// draw of the constants (the pair is re-solved per member); one measured as TA + pCO2
/// keeps its pCO2 instead, and its DIC varies with the constants.
#[test]
fn members_respect_the_measured_pair() {
    use crate::outlook::projection::Measurement;
    let mut site = site();
    site.records.truncate(1);
    site.seasons.truncate(1);
    let k = Constants::new(&site.records[0].conditions_at(26.0), &site.methods);
    let st = chem::solve_pair(Input::Ta(2290.0), Input::Pco2(410.0), &k).unwrap();
    let mut s = settings(&site, 50);
    s.years = vec![2024, 2050];
    s.ensemble.measurement = MeasurementUncertainty {
        ta_umol_kg: 0.0,
        dic_umol_kg: 0.0,
        ph: 0.0,
        pco2_pct: 0.0,
    };
    let spans = |site: &SiteInput| {
        let o = run(site, &s, &NoProgress).unwrap();
        let w = |q| {
            let l = series(&o, "SSP2-4.5", BASE_SCENARIO, "dry", q)[0].1;
            l[4] - l[0]
        };
        (w(Quantity::Dic), w(Quantity::Pco2))
    };
    let (d, p) = spans(&site);
    assert!(
        d > 1.0 && p < 1e-9,
        "TA+pCO2 record: DIC span {d}, pCO2 span {p}"
    );
    site.records[0].measured = Some(Measurement {
        a: Input::Ta(2290.0),
        b: Input::Dic(st.dic),
        sd_a: None,
        sd_b: None,
    });
    let (d, p) = spans(&site);
    assert!(
        d < 1e-6 && p > 1.0,
        "TA+DIC record: DIC span {d}, pCO2 span {p}"
    );
}

/// Worked arithmetic on the rate laws: with G = 0 at Omega_ar <= 1 (Silverman et al. 2009)
/// and G proportional to Omega_ar - 1 (Langdon & Atkinson 2005), the relative change reaches
/// -100 % once Omega_ar <= 1 (and the rows are flagged as outside the fitted range); no
/// net-zero crossing is given, since no relationship has a dissolution term.
#[test]
fn rate_laws_reach_minus_100_percent_below_saturation() {
    let mut site = site();
    site.records.truncate(1);
    site.seasons.truncate(1);
    let mut s = settings(&site, 0);
    s.pathways = vec![PathwaySpec::with_default_warming(
        Pathway::user("extreme", &[(2030, 600.0), (2100, 3000.0)]).unwrap(),
        &site.observed,
    )];
    let o = run(&site, &s, &NoProgress).unwrap();
    let omega = series(&o, "extreme", BASE_SCENARIO, "dry", Quantity::OmegaAr);
    let first_unsat = omega.iter().find(|(_, q)| q[2] <= 1.0).map(|(y, _)| *y);
    assert!(first_unsat.is_some(), "{omega:?}");
    let silverman = series(
        &o,
        "extreme",
        BASE_SCENARIO,
        "dry",
        Quantity::CalcChangePct(RelationshipId("silverman2009")),
    );
    for (y, q) in &silverman {
        if Some(*y) >= first_unsat {
            assert_eq!(q[2], -100.0, "{y}");
        } else {
            assert!(q[2] > -100.0, "{y}");
        }
    }
    // The organism laws give no net-zero crossing; only the field NEC relationships, which
    // carry dissolution, give a net-dissolution year.
    assert!(o.crossings.iter().all(|c| match &c.criterion {
        Criterion::OmegaArBelow { .. } => true,
        Criterion::NetDissolution { relationship, .. } => {
            o.nec
                .relationships
                .iter()
                .any(|r| r.id == relationship.as_str())
        }
    }));
    assert!(
        o.crossings
            .iter()
            .any(|c| c.criterion.kind() == CrossingKind::NetDissolution)
    );
    // Rows below Omega_ar 1 are flagged as extrapolation.
    let flagged = o
        .series
        .iter()
        .filter(|s| s.quantity == Quantity::CalcChangePct(RelationshipId("silverman2009")))
        .flat_map(|s| s.points.iter())
        .filter(|pt| Some(pt.year) >= first_unsat)
        .all(|pt| pt.outside_fit_pct == Some(100.0));
    assert!(flagged);
    // No site rate: no absolute net calcification anywhere.
    assert!(
        !o.series
            .iter()
            .any(|s| matches!(s.quantity, Quantity::NetCalc(_)))
    );
}

#[test]
fn bad_settings_give_clear_errors() {
    let site = site();
    let mut s = settings(&site, 10);
    s.ensemble.members = MAX_MEMBERS + 1;
    assert!(
        run(&site, &s, &NoProgress)
            .unwrap_err()
            .to_string()
            .contains("limit")
    );
    let mut s = settings(&site, 10);
    s.ensemble.threads = Some(0);
    assert!(run(&site, &s, &NoProgress).is_err());
    let mut s = settings(&site, 10);
    s.years = vec![2050, 2040];
    assert!(
        run(&site, &s, &NoProgress)
            .unwrap_err()
            .to_string()
            .contains("increase")
    );
    let mut s = settings(&site, 10);
    s.pathways.push(s.pathways[0].clone());
    assert!(
        run(&site, &s, &NoProgress)
            .unwrap_err()
            .to_string()
            .contains("twice")
    );
    let mut s = settings(&site, 10);
    s.years = vec![2301];
    let e = run(&site, &s, &NoProgress).unwrap_err().to_string();
    assert!(e.contains("2301") && e.contains("SSP1-1.9"), "{e}");
    let mut bad = site.clone();
    bad.records[2].pco2 = -5.0;
    let e = run(&bad, &settings(&bad, 10), &NoProgress)
        .unwrap_err()
        .to_string();
    assert!(e.contains("line 4") && e.contains("pco2"), "{e}");
    let mut s = settings(&site, 10);
    s.scenarios.push(LocalScenario {
        name: "none".into(),
        ..Default::default()
    });
    assert!(run(&site, &s, &NoProgress).is_err());
}

#[test]
fn outputs_carry_units_and_fixed_decimals() {
    let site = site();
    let mut s = settings(&site, 50);
    s.calcification =
        CalcificationSettings::from_site(Some(2.0), Some("invented survey"), &[]).unwrap();
    let o = run(&site, &s, &NoProgress).unwrap();
    let mut csv = Vec::new();
    o.write_quantiles_csv(&mut csv).unwrap();
    let text = String::from_utf8(csv).unwrap();
    let mut lines = text.lines();
    assert_eq!(
        lines.next().unwrap(),
        "pathway,scenario,year,season,quantity,p05,p25,p50,p75,p95,members,outside_fit_pct"
    );
    let omega = lines.find(|l| l.contains(",omega_ar,")).unwrap();
    let p50 = omega.split(',').nth(7).unwrap();
    assert_eq!(p50.split('.').nth(1).unwrap().len(), 4, "{omega}");
    for q in [
        "pco2_uatm",
        "dic_umol_kg",
        "net_calc_kg_m2_yr_chan2013",
        "calc_change_pct_silverman2009",
    ] {
        assert!(text.contains(&format!(",{q},")), "{q}");
    }
    let mut json = Vec::new();
    o.write_json(&mut json).unwrap();
    let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
    assert!(!v["thresholds"]["crossings"].as_array().unwrap().is_empty());
    assert!(v["calcification"].get("zero_years").is_none());
    assert_eq!(v["calcification"]["baseline_rate_kg_m2_yr"], 2.0);
    assert_eq!(
        v["calcification"]["baseline_rate_source"],
        "invented survey"
    );
    assert_eq!(
        v["calcification"]["relationships"]
            .as_array()
            .unwrap()
            .len(),
        3
    );
    assert_eq!(
        v["quantiles"].as_array().unwrap().len(),
        o.quantile_rows().len()
    );
}

/// Worked arithmetic: a member compared with itself. Records sampled in 2025 (the last
/// observed year) under the steady pathway (the atmosphere held at the 2025 mean) with
/// warming off are projected to exactly their present-day state, so every paired change
/// (Omega_ar, pH_T, calcification per relationship) is zero with a zero-width 5-95 % band,
/// with every source of uncertainty drawn.
#[test]
fn steady_atmosphere_without_warming_gives_zero_change() {
    let mut site = site();
    for r in &mut site.records {
        r.sample_year = 2025;
    }
    let mut s = settings(&site, 200);
    s.years = vec![2030, 2050, 2100];
    s.warming = false;
    s.pathways = vec![PathwaySpec::with_default_warming(
        Pathway::builtin("steady").unwrap(),
        &site.observed,
    )];
    let o = run(&site, &s, &NoProgress).unwrap();
    let mut checked = 0;
    for series in &o.series {
        let is_change = matches!(
            series.quantity,
            Quantity::OmegaArChange
                | Quantity::PhTChange
                | Quantity::CalcChangePct(_)
                | Quantity::NecChange(_)
        );
        if !is_change {
            continue;
        }
        for pt in &series.points {
            assert_eq!(pt.members, 200, "{:?}", series.quantity);
            for v in pt.q.levels() {
                assert_eq!(
                    v, 0.0,
                    "{:?} {:?} {}",
                    series.quantity, series.group, pt.year
                );
            }
            checked += 1;
        }
    }
    // 3 groups x 3 years x (2 state changes + 3 relationships + the field NEC relationships
    // that need neither coral cover nor a measured NEC: Eyre et al. 2018 sediments and the
    // global average, see outlook::nec).
    assert_eq!(checked, 3 * 3 * (2 + 3 + 2));
    // The states themselves still spread (constants, measurement, record draws).
    let om = series(&o, "steady", BASE_SCENARIO, "dry", Quantity::OmegaAr);
    assert!(om[0].1[4] - om[0].1[0] > 0.1, "{om:?}");
}

/// The source water's draws are paired with the reef record's (worked arithmetic): a reef
/// record that is its own source water (same conditions, TA and DIC, so zero offsets) must
/// give, member by member, what the ratio rule gives for the record alone, with the
/// constants' draws and the warming range on (measurement errors off: the source's are its
/// own measurements, drawn apart). Were the source water's constants drawn apart from the
/// reef record's, its DIC offset would move with every member and the quantiles would part:
/// with the source's constants left undrawn the SSP1-2.6 dry-season 2050 values differ by
/// 9e-4 in Omega_ar, far above the 1e-7 allowed here.
#[test]
fn source_water_draws_are_paired_with_the_reef_records() {
    use crate::outlook::source_water::{Follows, MatchRule, SourceWater};
    let mut site = site();
    for r in &mut site.records {
        let k = Constants::new(&r.conditions_at(r.temp_c), &site.methods);
        let st = chem::solve_pair(Input::Ta(r.ta), Input::Pco2(r.pco2), &k).unwrap();
        r.measured = Some(crate::outlook::Measurement {
            a: Input::Ta(st.ta),
            b: Input::Dic(st.dic),
            sd_a: Some(0.0),
            sd_b: Some(0.0),
        });
        r.source = Some(SourceWater {
            rule: MatchRule::SiteFile,
            follows: Follows::Ratio,
            sample_year: r.sample_year,
            temp_c: r.temp_c,
            salinity: r.salinity,
            pressure_dbar: r.pressure_dbar,
            silicate: r.silicate,
            phosphate: r.phosphate,
            ta: st.ta,
            dic: st.dic,
            pco2: st.pco2,
            rows: 1,
        });
    }
    let mut s = settings(&site, 300);
    s.warming = true;
    s.years = vec![2050, 2100];
    s.ensemble.measurement.ta_umol_kg = 0.0;
    s.ensemble.measurement.dic_umol_kg = 0.0;
    let run_with = |mode: Disequilibrium| {
        let mut s = s.clone();
        s.mode = mode;
        run(&site, &s, &NoProgress).unwrap()
    };
    let (ratio, held) = (
        run_with(Disequilibrium::Ratio),
        run_with(Disequilibrium::SourceOffsets),
    );
    let mut compared = 0;
    for p in ["SSP1-2.6", "SSP2-4.5", "SSP5-8.5"] {
        for g in ["dry", "wet", AGGREGATE_LABEL] {
            let a = series(&ratio, p, BASE_SCENARIO, g, Quantity::OmegaAr);
            let b = series(&held, p, BASE_SCENARIO, g, Quantity::OmegaAr);
            assert_eq!(a.len(), b.len(), "{p} {g}");
            for ((year, qa), (_, qb)) in a.iter().zip(&b) {
                for (x, y) in qa.iter().zip(qb) {
                    assert!((x - y).abs() < 1e-7, "{p} {g} {year}: {x} vs {y}");
                }
                // The members do spread: the check compares distributions, not constants.
                assert!(qa[4] - qa[0] > 0.02, "{p} {g} {year}: {qa:?}");
                compared += 1;
            }
        }
    }
    assert_eq!(compared, 3 * 3 * 2);
}
