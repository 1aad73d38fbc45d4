//! Projection ensemble benchmark (issue 4 speed target): five SSPs × 16 horizon years ×
//! 12 seasons × 1,000 members (about a million TA + pCO2 solves, plus the all-records
//! aggregate) for one invented site with four records per month-season. Target: under 1 s
//! wall on a 2-core machine.
//!
//! Issue 12 speed target: the lagoon demo (a year of hourly sensor data and monthly bottles,
//! 8,748 records) projected with its exposure metrics, 3 pathways × 1,000 members: under
//! 1 s. Whole-run time and peak memory: `/usr/bin/time -v calcisite project
//! sites/tala-vesi-lagoon.toml`.
//!
//! Run: `cargo bench --no-default-features --bench projection`

use std::hint::black_box;
use std::time::Duration;

use calcisite::chem::MethodSet;
use calcisite::outlook::{
    NoProgress, Observed, ProjectionRecord, ProjectionSettings, SiteInput, horizon_years, run,
};
use criterion::{Criterion, criterion_group, criterion_main};

/// An invented site: 12 monthly seasons, 4 records each, with a seasonal temperature cycle.
fn invented_site() -> SiteInput {
    let seasons: Vec<String> = (1..=12).map(|m| format!("month-{m:02}")).collect();
    let mut records = Vec::new();
    for (si, _) in seasons.iter().enumerate() {
        let phase = (si as f64) / 12.0 * std::f64::consts::TAU;
        for j in 0..4 {
            let jf = j as f64;
            records.push(ProjectionRecord {
                label: format!("invented record {si}-{j}"),
                season: si,
                sample_year: 2024,
                temp_c: 27.0 + 1.5 * phase.sin() + 0.2 * jf,
                salinity: 35.0 + 0.1 * jf,
                pressure_dbar: 3.0,
                silicate: 2.0,
                phosphate: 0.2,
                ta: 2290.0 + 5.0 * jf,
                pco2: 415.0 + 15.0 * phase.cos() + 3.0 * jf,
                measured: None,
                unit: None,
                source: None,
            });
        }
    }
    SiteInput {
        name: "invented benchmark reef".into(),
        seasons,
        records,
        stations: Vec::new(),
        methods: MethodSet::default(),
        observed: Observed::noaa(),
    }
}

fn settings(site: &SiteInput, warming: bool) -> ProjectionSettings {
    let mut s = ProjectionSettings::defaults_for(site);
    s.years = horizon_years(2024, 2100, 5); // 2025..=2100: 16 years
    assert_eq!(s.years.len(), 16);
    s.ensemble.members = 1000;
    s.warming = warming;
    s
}

fn bench(c: &mut Criterion) {
    let site = invented_site();
    let mut g = c.benchmark_group("projection");
    g.sample_size(10).measurement_time(Duration::from_secs(20));
    for warming in [false, true] {
        let s = settings(&site, warming);
        let name = if warming {
            "5x16x12x1000_warming_on"
        } else {
            "5x16x12x1000_warming_off"
        };
        g.bench_function(name, |b| {
            b.iter(|| black_box(run(&site, &s, &NoProgress).unwrap()))
        });
    }
    // The lagoon demo as the site file gives it (3 pathways, 1,000 members), exposure included.
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("sites/tala-vesi-lagoon.toml");
    let loaded = calcisite::site::load_site(&path).expect("lagoon demo loads");
    let (lagoon, s) = calcisite::outlook::from_loaded_site(&loaded).expect("lagoon settings");
    g.bench_function("lagoon_3x8x1000_with_exposure", |b| {
        b.iter(|| black_box(run(&lagoon, &s, &NoProgress).unwrap()))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
