//! Thermal-stress benchmark: ten years of an invented hourly logger record (87,600 readings)
//! through daily means, the climatology and the delta-method projection for five pathways ×
//! 1,000 members, with 16 horizon years and the yearly onset search from 2025 to 2100.
//! Target: under 1 s on a 2-core machine (measured here, never asserted in a test).
//!
//! Run: `cargo bench --no-default-features --bench thermal`

use std::hint::black_box;
use std::time::Duration;

use calcisite::outlook::thermal::projection::{HeatInput, HeatSettings};
use calcisite::outlook::thermal::{TimedTemp, climatology, daily_means, project_heat};
use chrono::{Datelike, NaiveDate};
use criterion::{Criterion, criterion_group, criterion_main};

/// Invented hourly temperatures 2015–2024: a seasonal cycle, a diel swing and a warm year.
fn invented_record() -> Vec<TimedTemp> {
    let start = NaiveDate::from_ymd_opt(2015, 1, 1)
        .and_then(|d| d.and_hms_opt(0, 0, 0))
        .expect("valid start");
    (0..87_600_i64)
        .map(|h| {
            let local = start + chrono::Duration::hours(h);
            let doy = f64::from(local.ordinal());
            let season = 1.8 * (std::f64::consts::TAU * (doy - 50.0) / 365.25).cos();
            let diel = 0.3 * (std::f64::consts::TAU * (h % 24) as f64 / 24.0).sin();
            let warm_year = if local.year() == 2020 { 0.9 } else { 0.0 };
            TimedTemp {
                local,
                has_time: true,
                temp_c: 27.2 + season + diel + warm_year,
            }
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let readings = invented_record();
    let pathways: Vec<String> = ["SSP1-1.9", "SSP1-2.6", "SSP2-4.5", "SSP3-7.0", "SSP5-8.5"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    // Invented warming per pathway (°C per year after 2020), each member scaling it by a
    // factor between 0.7 and 1.3, the same factor under every pathway (paired members).
    let rate = [0.005, 0.01, 0.02, 0.03, 0.04];
    let warming = move |p: usize, y: i32, m: usize| {
        rate[p] * (0.7 + 0.6 * m as f64 / 999.0) * f64::from((y - 2020).max(0))
    };
    let settings = HeatSettings {
        pathways,
        horizon_years: (2025..=2100).step_by(5).collect(),
        onset_span: (2025, 2100),
        members: 1000,
    };
    let mut group = c.benchmark_group("thermal");
    group
        .sample_size(10)
        .measurement_time(Duration::from_secs(20));
    group.bench_function("ten_years_hourly_5_pathways_1000_members", |b| {
        b.iter(|| {
            let (daily, _) = daily_means(black_box(&readings)).expect("valid record");
            let clim = climatology(&daily).expect("ten full years");
            let input = HeatInput {
                daily: &daily,
                mmm_c: clim.mmm_c,
                allowance_c_per_decade: 0.0,
                allowance_from_year: 2024,
            };
            black_box(project_heat(&input, &settings, &warming))
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
