//! Speed of the carbonate-system solver: full TA + DIC → state solves, with every constant
//! computed afresh for each sample (temperature and salinity differ from sample to
//! sample), on one core. Target: ≥ 1,000,000 solves/s on one core of the project machine.
//! For a side-by-side figure from a general-purpose library, run
//! `python3 tests/reference/time_pyco2sys.py` (PyCO2SYS from PyPI).

use calcisite::chem::{Conditions, Constants, Input, MethodSet, solve_pair};
use calcisite::cli::solve::solve_stream;
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;

fn samples(n: usize) -> Vec<(Conditions, f64, f64)> {
    // A deterministic spread of reef-like waters: 20–32 °C, S 33–37, TA 2200–2400.
    (0..n)
        .map(|i| {
            let f = (i as f64 * 0.618_033_988_75).fract();
            let g = (i as f64 * 0.414_213_562_37).fract();
            let cond = Conditions {
                temp_c: 20.0 + 12.0 * f,
                salinity: 33.0 + 4.0 * g,
                pressure_dbar: 5.0 * f,
                silicate: 2.0,
                phosphate: 0.2,
            };
            let ta = 2200.0 + 200.0 * g;
            (cond, ta, ta * (0.85 + 0.07 * f))
        })
        .collect()
}

fn bench_solve(c: &mut Criterion) {
    let data = samples(10_000);
    let m = MethodSet::default();
    let mut group = c.benchmark_group("chem");
    group.throughput(Throughput::Elements(data.len() as u64));
    group.bench_function("ta_dic_with_fresh_constants", |b| {
        b.iter(|| {
            let mut acc = 0.0;
            for (cond, ta, dic) in &data {
                let k = Constants::new(black_box(cond), &m);
                if let Ok(st) = solve_pair(Input::Ta(*ta), Input::Dic(*dic), &k) {
                    acc += st.omega_ar;
                }
            }
            black_box(acc)
        })
    });
    let k = Constants::new(&data[0].0, &m);
    group.bench_function("ta_pco2_constants_reused", |b| {
        b.iter(|| {
            let mut acc = 0.0;
            for (_, ta, dic) in &data {
                if let Ok(st) = solve_pair(Input::Ta(*ta), Input::Pco2(dic / 5.0), black_box(&k)) {
                    acc += st.omega_ar;
                }
            }
            black_box(acc)
        })
    });
    group.finish();
}

/// The whole `solve` command on an in-memory CSV file (read, parse, solve, format, write),
/// all cores. Target for the command: ≥ 1,500,000 rows/s on the 2-core project machine
/// (`python3 benches/scale.py solve` measures the binary on a file).
fn bench_solve_csv(c: &mut Criterion) {
    let mut csv = String::from("date,station,temp_c,salinity,depth_m,ta,dic,silicate,phosphate\n");
    for (i, (cond, ta, dic)) in samples(100_000).iter().enumerate() {
        csv.push_str(&format!(
            "2024-01-01,S{},{:.3},{:.3},{},{ta:.2},{dic:.2},2.0,0.2\n",
            i % 7,
            cond.temp_c,
            cond.salinity,
            i % 20
        ));
    }
    let m = MethodSet::default();
    let mut out = Vec::with_capacity(csv.len() * 3);
    let mut group = c.benchmark_group("cli");
    group.throughput(Throughput::Elements(100_000));
    group.bench_function("solve_stream_csv_rows", |b| {
        b.iter(|| {
            out.clear();
            black_box(solve_stream(csv.as_bytes(), &mut out, &m))
        })
    });
    group.finish();
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20);
    targets = bench_solve, bench_solve_csv
}
criterion_main!(benches);
