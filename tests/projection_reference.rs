//! Outside checks of the projection (issue 4):
//!
//! 1. `tests/reference/projection_reference.csv`, generated with PyCO2SYS 1.8.3.4 (PyPI) by
//!    `tests/reference/make_projection_reference.py` (beside the table): two invented records
//!    (one sampled in 2024, one in 2010, before the SSPs split) projected under each SSP every
//!    year to 2100 and at 2150-2300, ratio and additive modes, warming off, with the script's
//!    own join of the annual pathway table to the NOAA record. The project's ensemble-off
//!    projection must reproduce xCO2, air and sea pCO2, pH_T (±0.0005), DIC (±0.1 µmol/kg)
//!    and Omega_ar / Omega_ca (±0.1 %).
//! 2. Pathway values at 2050 and 2100 against Meinshausen et al. (2020), GMD 13:3571 (as
//!    carried in the CMIP6/AR6 concentration files; fact sheet §5, status V).

use std::path::Path;

use calcisite::chem::MethodSet;
use calcisite::outlook::{Disequilibrium, Observed, Pathway, ProjectionRecord, project_record};

fn reference_rows() -> Vec<csv::StringRecord> {
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/projection_reference.csv");
    let mut r = csv::Reader::from_path(&path).expect("projection_reference.csv is committed");
    let headers = r.headers().expect("header").clone();
    assert_eq!(
        headers.iter().collect::<Vec<_>>(),
        [
            "mode",
            "pathway",
            "sample_year",
            "year",
            "xco2_ppm",
            "pco2_air",
            "pco2_sea",
            "ta",
            "ph_t",
            "dic",
            "omega_ar",
            "omega_ca"
        ]
    );
    r.records().map(|x| x.expect("row")).collect()
}

fn num(r: &csv::StringRecord, i: usize) -> f64 {
    r.get(i)
        .and_then(|v| v.parse().ok())
        .expect("numeric field")
}

#[test]
fn ensemble_off_projection_reproduces_pyco2sys_table() {
    let rows = reference_rows();
    assert_eq!(
        rows.len(),
        1760,
        "2 modes x 5 SSPs x (81 years from 2024 + 95 years from 2010)"
    );
    // The two invented records of the script, by sampling year.
    let record = |sample_year: i32| {
        let (t, s, p, si, po4, ta, pco2) = match sample_year {
            2024 => (27.5, 35.1, 2.0, 2.0, 0.2, 2290.0, 430.0),
            _ => (26.0, 34.8, 5.0, 1.5, 0.1, 2300.0, 395.0),
        };
        ProjectionRecord {
            label: format!("reference record sampled {sample_year}"),
            season: 0,
            sample_year,
            temp_c: t,
            salinity: s,
            pressure_dbar: p,
            silicate: si,
            phosphate: po4,
            ta,
            pco2,
            measured: None,
            unit: None,
            source: None,
        }
    };
    let obs = Observed::noaa();
    let methods = MethodSet::default();
    let (mut worst_om, mut worst_ph, mut worst_dic) = (0.0f64, 0.0f64, 0.0f64);
    for r in &rows {
        let mode: Disequilibrium = r.get(0).unwrap().parse().unwrap();
        let pathway = Pathway::builtin(r.get(1).unwrap()).unwrap();
        let sample_year: i32 = r.get(2).unwrap().parse().unwrap();
        let year: i32 = r.get(3).unwrap().parse().unwrap();
        let rec = record(sample_year);
        let pt = project_record(&rec, &pathway, &obs, None, &methods, mode, None, year).unwrap();
        let ctx = format!(
            "{} {} sampled {sample_year}, {year}",
            r.get(0).unwrap(),
            r.get(1).unwrap()
        );
        assert!((pt.xco2_ppm - num(r, 4)).abs() < 1e-9, "xco2 {ctx}");
        assert!(
            (pt.pco2_air / num(r, 5) - 1.0).abs() < 1e-9,
            "pco2_air {ctx}: {}",
            pt.pco2_air
        );
        assert!(
            (pt.pco2_sea / num(r, 6) - 1.0).abs() < 1e-9,
            "pco2_sea {ctx}: {}",
            pt.pco2_sea
        );
        assert!((pt.state.ta - num(r, 7)).abs() < 1e-6, "ta {ctx}");
        let d_ph = (pt.state.ph_t - num(r, 8)).abs();
        let d_dic = (pt.state.dic - num(r, 9)).abs();
        let d_om = (pt.state.omega_ar / num(r, 10) - 1.0).abs();
        let d_oc = (pt.state.omega_ca / num(r, 11) - 1.0).abs();
        assert!(
            d_ph <= 0.0005,
            "ph_t {ctx}: {} vs {}",
            pt.state.ph_t,
            num(r, 8)
        );
        assert!(d_dic <= 0.1, "dic {ctx}: {} vs {}", pt.state.dic, num(r, 9));
        assert!(
            d_om <= 1e-3,
            "omega_ar {ctx}: {} vs {}",
            pt.state.omega_ar,
            num(r, 10)
        );
        assert!(
            d_oc <= 1e-3,
            "omega_ca {ctx}: {} vs {}",
            pt.state.omega_ca,
            num(r, 11)
        );
        worst_om = worst_om.max(d_om);
        worst_ph = worst_ph.max(d_ph);
        worst_dic = worst_dic.max(d_dic);
    }
    eprintln!(
        "projection vs PyCO2SYS: worst |rel. dOmega_ar| {worst_om:.2e}, |dpH_T| {worst_ph:.2e}, |dDIC| {worst_dic:.3} umol/kg"
    );
}

#[test]
fn pathway_values_at_2050_and_2100_match_meinshausen_2020() {
    let obs = Observed::noaa();
    for (name, v2050, v2100) in [
        ("SSP1-1.9", 437.632, 393.506),
        ("SSP1-2.6", 469.310, 445.625),
        ("SSP2-4.5", 506.875, 602.782),
        ("SSP3-7.0", 540.581, 867.191),
        ("SSP5-8.5", 562.784, 1135.210),
    ] {
        let p = Pathway::builtin(name).unwrap();
        assert!(
            (p.xco2_ppm(&obs, 2050).unwrap() - v2050).abs() < 1e-9,
            "{name} 2050"
        );
        assert!(
            (p.xco2_ppm(&obs, 2100).unwrap() - v2100).abs() < 1e-9,
            "{name} 2100"
        );
    }
}
