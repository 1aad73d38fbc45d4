//! Checks of the source-offsets rule against buffer theory and worked arithmetic.

use super::*;
use crate::chem::{Conditions, MethodSet};
use crate::outlook::pathways::{Observed, Pathway};
use crate::outlook::projection::{Disequilibrium, ProjectionRecord, project_record};

/// Tropical surface conditions without nutrients (the buffer factors below leave out the
/// phosphate and silicate systems).
fn k_tropical() -> Constants {
    Constants::new(&Conditions::surface(27.0, 35.0), &MethodSet::default())
}

fn state(ta: f64, dic: f64, k: &Constants) -> CarbonateState {
    chem::solve_pair(Input::Ta(ta), Input::Dic(dic), k).unwrap()
}

/// The DIC buffer factors of Egleston, Sabine & Morel (2010), Global Biogeochem. Cycles 24,
/// GB1002, Table 1: gamma_DIC = (d ln[CO2]/d DIC)^-1, beta_DIC = (d ln[H+]/d DIC)^-1 and
/// omega_DIC = (d ln Omega/d DIC)^-1 at constant alkalinity, from the speciation, with the
/// two typographical corrections to their Table 1 (the sign of [OH-] in S, Orr, Epitalon,
/// Dickson & Gattuso 2018, Mar. Chem. 207:84–107; Q in place of [HCO3-] in omega_DIC,
/// supporting information of Richier et al. 2018, Global Change Biology 24:4438). µmol/kg.
fn egleston_dic_factors(st: &CarbonateState, k: &Constants) -> (f64, f64, f64) {
    let h_mol = 10f64.powf(-st.ph_t);
    let h = h_mol * 1e6;
    let oh = k.kw / h_mol * 1e6;
    let borate = k.bt * k.kb / (k.kb + h_mol) * 1e6;
    let hb = h_mol * borate / (k.kb + h_mol);
    let alk_c = st.hco3 + 2.0 * st.co3;
    let s = st.hco3 + 4.0 * st.co3 + hb + h + oh;
    let p = 2.0 * st.co2aq + st.hco3;
    let q = st.hco3 - hb - h - oh;
    let gamma = st.dic - alk_c * alk_c / s;
    let beta = (st.dic * s - alk_c * alk_c) / alk_c;
    let omega = st.dic - alk_c * p / q;
    (gamma, beta, omega)
}

/// Check (Egleston, Sabine & Morel 2010, Table 1, corrected as above): at two states, TA
/// 2300 µmol/kg with DIC 1950 (today's tropical surface water) and 2150 (a high-CO2 state),
/// the solver's numerical derivatives of ln pCO2, ln [H+] and ln Omega_ar with DIC match the
/// analytic factors within 0.1 % (seen: within 3e-6; the factors leave out bisulfate and
/// fluoride, which the solver's alkalinity keeps). Then the amplification buffer theory predicts: a fixed dDIC of
/// +100 µmol/kg (a night-time respiration offset) moves pCO2 and [H+] further and CO3 and
/// Omega_ar less at the high-DIC state.
#[test]
fn buffer_factors_match_egleston_2010_and_amplify_the_diel_swing() {
    let k = k_tropical();
    let h = 0.5;
    let mut swings = Vec::new();
    for dic in [1950.0, 2150.0] {
        let st = state(2300.0, dic, &k);
        let (up, dn) = (state(2300.0, dic + h, &k), state(2300.0, dic - h, &k));
        let d = |f: fn(&CarbonateState) -> f64| (f(&up).ln() - f(&dn).ln()) / (2.0 * h);
        let (gamma, beta, omega) = egleston_dic_factors(&st, &k);
        let pairs = [
            ("gamma_DIC", 1.0 / d(|s| s.pco2), gamma),
            ("beta_DIC", 1.0 / d(|s| 10f64.powf(-s.ph_t)), beta),
            ("omega_DIC", 1.0 / d(|s| s.omega_ar), omega),
        ];
        for (name, numeric, analytic) in pairs {
            assert!(
                (numeric / analytic - 1.0).abs() < 1e-3,
                "DIC {dic}: {name} numeric {numeric} vs analytic {analytic}"
            );
        }
        let hi = state(2300.0, dic + 100.0, &k);
        let h_of = |s: &CarbonateState| 10f64.powf(-s.ph_t) * 1e9; // nmol/kg
        swings.push((
            hi.pco2 - st.pco2,
            h_of(&hi) - h_of(&st),
            st.co3 - hi.co3,
            st.omega_ar - hi.omega_ar,
        ));
    }
    let (now, later) = (swings[0], swings[1]);
    assert!(later.0 > now.0, "pCO2 swing grows: {now:?} -> {later:?}");
    assert!(later.1 > now.1, "[H+] swing grows: {now:?} -> {later:?}");
    assert!(later.2 < now.2, "CO3 swing shrinks: {now:?} -> {later:?}");
    assert!(
        later.3 < now.3,
        "Omega_ar swing shrinks: {now:?} -> {later:?}"
    );
}

fn record(ta: f64, pco2: f64, source: Option<SourceWater>) -> ProjectionRecord {
    ProjectionRecord {
        label: "invented reef record".into(),
        season: 0,
        sample_year: 2024,
        temp_c: 27.0,
        salinity: 35.0,
        pressure_dbar: 0.0,
        silicate: 0.0,
        phosphate: 0.0,
        ta,
        pco2,
        measured: None,
        unit: None,
        source,
    }
}

fn source(ta: f64, dic: f64, follows: Follows) -> SourceWater {
    let k = k_tropical();
    let st = state(ta, dic, &k);
    SourceWater {
        rule: MatchRule::SameHour,
        follows,
        sample_year: 2024,
        temp_c: 27.0,
        salinity: 35.0,
        pressure_dbar: 0.0,
        silicate: 0.0,
        phosphate: 0.0,
        ta,
        dic,
        pco2: st.pco2,
        rows: 1,
    }
}

/// Worked arithmetic: a reef record equal to its source water (zero offsets) is projected
/// exactly as the source water is by the source's own rule; with offsets the sampling year
/// returns the record itself; and a day/night pair of records with dDIC −100/+100 µmol/kg
/// about the same source has a wider pCO2 swing and a narrower Omega_ar swing under SSP5-8.5
/// in 2100 than at sampling (Shaw et al. 2013: amplified diel pCO2 on a reef flat).
#[test]
fn held_offsets_reproduce_the_source_rule_and_widen_the_pco2_swing() {
    let obs = Observed::noaa();
    let m = MethodSet::default();
    let p = Pathway::builtin("SSP5-8.5").unwrap();
    let k = k_tropical();
    for follows in [Follows::Ratio, Follows::Additive] {
        let sw = source(2300.0, 1960.0, follows);
        let same = record(sw.ta, sw.pco2, Some(sw.clone()));
        let mode = match follows {
            Follows::Ratio => Disequilibrium::Ratio,
            Follows::Additive => Disequilibrium::Additive,
        };
        for year in [2024, 2060, 2100] {
            let held = project_record(
                &same,
                &p,
                &obs,
                None,
                &m,
                Disequilibrium::SourceOffsets,
                None,
                year,
            )
            .unwrap();
            let own = project_record(&same, &p, &obs, None, &m, mode, None, year).unwrap();
            assert!(
                (held.state.omega_ar - own.state.omega_ar).abs() < 1e-9
                    && (held.state.pco2 - own.state.pco2).abs() < 1e-6,
                "{follows:?} {year}: {} vs {}",
                held.state.omega_ar,
                own.state.omega_ar
            );
        }
    }
    let sw = source(2300.0, 1960.0, Follows::Ratio);
    let swing = |year: i32| {
        let at = |d_dic: f64| {
            let reef = state(2300.0 - 20.0, 1960.0 + d_dic, &k);
            let rec = record(reef.ta, reef.pco2, Some(sw.clone()));
            project_record(
                &rec,
                &p,
                &obs,
                None,
                &m,
                Disequilibrium::SourceOffsets,
                None,
                year,
            )
            .unwrap()
            .state
        };
        let (day, night) = (at(-100.0), at(100.0));
        (
            night.pco2 - day.pco2,
            day.omega_ar - night.omega_ar,
            day,
            night,
        )
    };
    let (p_now, om_now, day, _) = swing(2024);
    let reef_day = state(2280.0, 1860.0, &k);
    assert!((day.omega_ar - reef_day.omega_ar).abs() < 1e-9);
    let (p_2100, om_2100, day_2100, night_2100) = swing(2100);
    assert!(
        p_2100 > 1.5 * p_now,
        "pCO2 swing {p_now:.0} -> {p_2100:.0} uatm"
    );
    assert!(
        om_2100 < om_now,
        "Omega_ar swing {om_now:.3} -> {om_2100:.3}"
    );
    // The offsets are held: dTA and dDIC of 2100 equal those at sampling.
    assert!((day_2100.ta - 2280.0).abs() < 1e-6 && (night_2100.ta - 2280.0).abs() < 1e-6);
    assert!((night_2100.dic - day_2100.dic - 200.0).abs() < 1e-6);
}

/// A record without source water cannot be projected by the source-offsets rule: the
/// message says why.
#[test]
fn source_offsets_without_source_water_is_refused() {
    let obs = Observed::noaa();
    let p = Pathway::builtin("SSP2-4.5").unwrap();
    let rec = record(2300.0, 420.0, None);
    let e = project_record(
        &rec,
        &p,
        &obs,
        None,
        &MethodSet::default(),
        Disequilibrium::SourceOffsets,
        None,
        2050,
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("source water"), "{e}");
}
