//! The exposure metrics through the whole run (a `#[cfg(test)]` module: its `unwrap`s never
//! meet user data): a synthetic diel swing with hours below worked out here, a steady
//! atmosphere that must leave the exposure as sampled, and the projected diel cycle of a
//! record against the PyCO2SYS reference table.

use chrono::{Datelike, NaiveDate, Timelike};

use super::*;
use crate::chem::{self, Constants, Input, MethodSet};
use crate::outlook::exposure::{ExposureError, ExposureRow, ExposureState};
use crate::outlook::result::{GroupId, Outlook};
use crate::outlook::thresholds::HabitatClasses;
use crate::outlook::{
    Disequilibrium, Observed, Pathway, PathwaySpec, ProjectionRecord, ProjectionSettings,
    SamplingUnit, SiteInput,
};

/// A record of a sensor series at station 0, `minutes` after midnight of `start`.
fn sensor(
    start: NaiveDate,
    minutes: i64,
    ta: f64,
    pco2: f64,
    continuous: bool,
) -> ProjectionRecord {
    let t = start.and_hms_opt(0, 0, 0).unwrap() + chrono::Duration::minutes(minutes);
    ProjectionRecord {
        label: format!("sensor.csv minute {minutes}"),
        season: 0,
        sample_year: t.year(),
        temp_c: 27.5,
        salinity: 35.1,
        pressure_dbar: 2.0,
        silicate: 2.0,
        phosphate: 0.2,
        ta,
        pco2,
        measured: None,
        unit: Some(SamplingUnit {
            station: 0,
            day: t.date().num_days_from_ce(),
            continuous,
            minute: Some(u16::try_from(t.hour() * 60 + t.minute()).unwrap()),
        }),
        source: None,
    }
}

fn site(records: Vec<ProjectionRecord>) -> SiteInput {
    SiteInput {
        name: "Invented exposure reef".into(),
        seasons: vec!["only".into()],
        records,
        stations: vec!["S1".into()],
        methods: MethodSet::default(),
        observed: Observed::noaa(),
    }
}

/// Ensemble off (each record once, central values), warming off, one pathway.
fn settings(
    s: &SiteInput,
    pathway: &str,
    years: Vec<i32>,
    classes: HabitatClasses,
) -> ProjectionSettings {
    let mut ps = ProjectionSettings::defaults_for(s);
    let obs = Observed::noaa();
    ps.pathways = vec![PathwaySpec::with_default_warming(
        Pathway::builtin(pathway).unwrap(),
        &obs,
    )];
    ps.warming = false;
    ps.years = years;
    ps.mode = Disequilibrium::Ratio;
    ps.ensemble.members = 0;
    ps.classes = classes;
    ps.calcification.relationships.clear();
    ps
}

fn row(o: &Outlook, state: ExposureState) -> &ExposureRow {
    o.exposure.row(state, GroupId::Season(0), 0).unwrap()
}

/// Omega_ar of TA 2300 µmol/kg and pCO2 `pco2` at the test records' conditions.
fn omega_at(pco2: f64) -> f64 {
    let r = sensor(
        NaiveDate::from_ymd_opt(2024, 3, 1).unwrap(),
        0,
        2300.0,
        pco2,
        true,
    );
    let k = Constants::new(&r.conditions_at(r.temp_c), &MethodSet::default());
    chem::solve_pair(Input::Ta(2300.0), Input::Pco2(pco2), &k)
        .unwrap()
        .omega_ar
}

/// Worked: pCO2(t) = 450 + 100 sin(2πt/24 h) at fixed TA, temperature and salinity. Omega_ar
/// falls as pCO2 rises, so it is below the level L = Omega_ar(500 µatm) exactly while
/// sin > 1/2, i.e. from π/6 to 5π/6: a third of each cycle, 8 hours a day and 33.3 % of the
/// time. Read every 10 minutes over 10 days; linear interpolation of Omega_ar between the
/// readings puts each crossing within a fraction of a minute of the true one. Under a steady
/// atmosphere with warming off every reading projects onto itself, so the projected rows
/// must equal the row as sampled.
#[test]
fn sinusoid_through_the_run_gives_eight_hours_a_day_and_steady_keeps_it() {
    let start = NaiveDate::from_ymd_opt(2024, 3, 1).unwrap();
    let records: Vec<ProjectionRecord> = (0..10 * 144)
        .map(|k| {
            let hours = (k * 10) as f64 / 60.0;
            let pco2 = 450.0 + 100.0 * (std::f64::consts::TAU * hours / 24.0).sin();
            sensor(start, k * 10, 2300.0, pco2, true)
        })
        .collect();
    let s = site(records);
    let level = omega_at(500.0);
    let classes = HabitatClasses::user(
        &[("above".to_string(), level)],
        "below",
        "worked example in the test",
    )
    .unwrap();
    let mut ps = settings(&s, "steady", vec![2030, 2050], classes);
    // The steady pathway holds the last observed year's CO2: sample in that year.
    let last = Observed::noaa().last_year();
    let s = SiteInput {
        records: s
            .records
            .into_iter()
            .map(|mut r| {
                r.sample_year = last;
                r
            })
            .collect(),
        ..s
    };
    ps.years = vec![last + 6, last + 26];
    let o = run(&s, &ps, &NoProgress).unwrap();
    assert!(o.exposure.unavailable.is_none());
    assert_eq!(o.exposure.stations, vec!["S1".to_string()]);
    let now = row(&o, ExposureState::AsSampled);
    let below = now.level(level).unwrap();
    assert!((below.hours_per_day_below - 8.0).abs() < 0.02, "{below:?}");
    assert!(
        (below.pct_time_below - 100.0 / 3.0).abs() < 0.1,
        "{below:?}"
    );
    assert_eq!(now.days, 10);
    // The lowest Omega_ar of a day is at the pCO2 maximum, 550 µatm (reached at 6 h).
    assert!((now.daily_min_omega_ar_mean - omega_at(550.0)).abs() < 1e-9);
    for &year in &ps.years {
        let p = row(
            &o,
            ExposureState::Projected {
                pathway: crate::outlook::PathwayId(0),
                scenario: crate::outlook::ScenarioId::Base,
                year,
            },
        );
        assert_eq!(p.days, now.days);
        assert!((p.below[0].hours_per_day_below - below.hours_per_day_below).abs() < 1e-9);
        assert!((p.below[0].pct_time_below - below.pct_time_below).abs() < 1e-9);
        assert!((p.daily_min_omega_ar_mean - now.daily_min_omega_ar_mean).abs() < 1e-9);
        for h in 0..24 {
            assert!((p.diel.omega_ar[h] - now.diel.omega_ar[h]).abs() < 1e-9);
            assert!((p.diel.pco2_uatm[h] - now.diel.pco2_uatm[h]).abs() < 1e-6);
        }
    }
}

/// Outside check: `tests/reference/projection_reference.csv` (PyCO2SYS 1.8.3.4, made by
/// `tests/reference/make_projection_reference.py`) gives the record TA 2290 µmol/kg, S 35.1,
/// 27.5 °C, 2 dbar, Si 2, PO4 0.2, pCO2 430 µatm sampled in 2024, projected under SSP2-4.5 to
/// 2050 in ratio mode with warming off: Omega_ar 3.0725324296590597 (row
/// "ratio,SSP2-4.5,2024,2050"). A day of hourly readings of that record must show it in every
/// hour of the projected diel cycle and as the daily minimum (±0.1 %, the tolerance of
/// `tests/projection_reference.rs`), and it lies below 3.5 all day and above 3.0 all day.
#[test]
fn projected_diel_cycle_equals_the_reference_solve_of_its_record() {
    let start = NaiveDate::from_ymd_opt(2024, 6, 1).unwrap();
    let records: Vec<ProjectionRecord> = (0..25)
        .map(|h| sensor(start, h * 60, 2290.0, 430.0, true))
        .collect();
    let s = site(records);
    let classes = HabitatClasses::user(
        &[("high".to_string(), 3.5), ("mid".to_string(), 3.0)],
        "low",
        "worked example in the test",
    )
    .unwrap();
    let ps = settings(&s, "SSP2-4.5", vec![2050], classes);
    let o = run(&s, &ps, &NoProgress).unwrap();
    let p = row(
        &o,
        ExposureState::Projected {
            pathway: crate::outlook::PathwayId(0),
            scenario: crate::outlook::ScenarioId::Base,
            year: 2050,
        },
    );
    let reference = 3.0725324296590597;
    for h in 0..24 {
        let rel = (p.diel.omega_ar[h] - reference).abs() / reference;
        assert!(rel < 1e-3, "hour {h}: {}", p.diel.omega_ar[h]);
    }
    assert!((p.daily_min_omega_ar_mean - reference).abs() / reference < 1e-3);
    // Day 1 is complete (24 clock hours); the last reading starts day 2, which is not.
    assert_eq!(p.days, 1);
    assert!((p.level(3.5).unwrap().hours_per_day_below - 24.0).abs() < 1e-9);
    assert_eq!(p.level(3.0).unwrap().hours_per_day_below, 0.0);
}

/// A site of bottle samples says that the metrics need sub-daily data, and gives none.
#[test]
fn bottles_give_no_exposure_and_say_why() {
    let start = NaiveDate::from_ymd_opt(2024, 1, 10).unwrap();
    let records: Vec<ProjectionRecord> = (0..12)
        .map(|m| sensor(start, m * 30 * 24 * 60, 2290.0, 430.0, false))
        .collect();
    let s = site(records);
    let ps = settings(
        &s,
        "SSP2-4.5",
        vec![2050],
        crate::outlook::thresholds::guinotte_2003(),
    );
    let o = run(&s, &ps, &NoProgress).unwrap();
    assert_eq!(o.exposure.unavailable, Some(ExposureError::NotSubDaily));
    assert!(o.exposure.rows.is_empty());
    let mut csv = Vec::new();
    o.write(
        &mut csv,
        crate::outlook::OutputFormat::Csv,
        crate::outlook::OutputTable::Exposure,
    )
    .unwrap();
    assert_eq!(
        String::from_utf8(csv).unwrap().lines().count(),
        1,
        "header only"
    );
    let mut json = Vec::new();
    o.write_json(&mut json).unwrap();
    let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
    assert_eq!(v["exposure"]["available"], false);
    assert!(
        v["exposure"]["reason"]
            .as_str()
            .unwrap()
            .contains("need sub-daily data")
    );
}
