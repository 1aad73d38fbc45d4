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

/// Outside check (issue 12): `tests/reference/source_offsets_reference.csv`, generated with
/// PyCO2SYS 1.8.3.4 by `tests/reference/make_source_offsets_reference.py` (beside the table;
/// the method is written out in its docstring): three invented reef records (day, mean,
/// night) with their TA/DIC offsets from an invented offshore source water held, the source
/// following the atmosphere by the ratio and additive rules under SSP2-4.5 and SSP5-8.5,
/// warming off, source and reef at their own temperatures, salinities and pressures. The
/// project's "source offsets" rule must reproduce TA and DIC (±0.1 µmol/kg), pH_T
/// (±0.0005), pCO2 and Omega_ar (±0.1 %).
#[test]
fn source_offsets_projection_reproduces_pyco2sys_table() {
    use calcisite::outlook::source_water::{Follows, MatchRule, SourceWater};
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/source_offsets_reference.csv");
    let mut r = csv::Reader::from_path(&path).expect("source_offsets_reference.csv is committed");
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.expect("row")).collect();
    assert_eq!(
        rows.len(),
        108,
        "2 rules x 2 pathways x 3 records x 9 years"
    );
    let obs = Observed::noaa();
    let methods = MethodSet::default();
    let mut worst = (0.0f64, 0.0f64, 0.0f64);
    for row in &rows {
        let follows = match row.get(0) {
            Some("ratio") => Follows::Ratio,
            _ => Follows::Additive,
        };
        let pathway = Pathway::builtin(row.get(1).expect("pathway")).expect("built-in pathway");
        let ta = match row.get(2) {
            Some("day") => 2280.0,
            Some("mean") => 2295.0,
            _ => 2310.0,
        };
        let year: i32 = row.get(3).and_then(|v| v.parse().ok()).expect("year");
        let source = SourceWater {
            rule: MatchRule::SameHour,
            follows,
            sample_year: 2024,
            temp_c: 28.0,
            salinity: 35.2,
            pressure_dbar: 1.0,
            silicate: 1.2,
            phosphate: 0.12,
            ta: 2300.0,
            dic: 1975.0,
            pco2: num(row, 4),
            rows: 1,
        };
        let rec = ProjectionRecord {
            label: "invented reef record".into(),
            season: 0,
            sample_year: 2024,
            temp_c: 29.5,
            salinity: 35.3,
            pressure_dbar: 2.0,
            silicate: 2.0,
            phosphate: 0.2,
            ta,
            pco2: num(row, 5),
            measured: None,
            unit: None,
            source: Some(source),
        };
        let pt = project_record(
            &rec,
            &pathway,
            &obs,
            None,
            &methods,
            Disequilibrium::SourceOffsets,
            None,
            year,
        )
        .expect("projects");
        let st = pt.state;
        assert!((st.ta - num(row, 7)).abs() < 0.1, "{row:?}: TA {}", st.ta);
        assert!(
            (st.dic - num(row, 8)).abs() < 0.1,
            "{row:?}: DIC {}",
            st.dic
        );
        let rel_pco2 = (st.pco2 / num(row, 9) - 1.0).abs();
        let d_ph = (st.ph_t - num(row, 10)).abs();
        let rel_om = (st.omega_ar / num(row, 11) - 1.0).abs();
        assert!(rel_pco2 < 1e-3, "{row:?}: pCO2 {}", st.pco2);
        assert!(d_ph < 5e-4, "{row:?}: pH {}", st.ph_t);
        assert!(rel_om < 1e-3, "{row:?}: Omega_ar {}", st.omega_ar);
        worst = (
            worst.0.max(rel_pco2),
            worst.1.max(d_ph),
            worst.2.max(rel_om),
        );
    }
    eprintln!(
        "source offsets vs PyCO2SYS: worst pCO2 {:.2e} (rel), pH {:.2e}, Omega_ar {:.2e} (rel)",
        worst.0, worst.1, worst.2
    );
}
