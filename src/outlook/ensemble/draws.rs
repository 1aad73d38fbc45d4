//! One member's random draws and its carbonate state at sampling.

use crate::chem::{self, Constants, Input, MethodSet, ORR2018, Perturbation};

use super::super::ProjectionRecord;
use super::super::projection::shifted;
use super::super::source_water::SourceWater;
use super::settings::EnsembleSettings;

/// Shifts of the constants for eight standard normal deviates, in the order pK0, pK1, pK2,
/// pKB, pKW, pK*sp(aragonite), pK*sp(calcite), total boron; scaled by the standard
/// uncertainties of Orr et al. (2018), Mar. Chem. 207:84–107 (`chem::ORR2018`).
pub fn constants_perturbation(z: [f64; 8]) -> Perturbation {
    let u = ORR2018;
    Perturbation {
        pk0: u.pk0 * z[0],
        pk1: u.pk1 * z[1],
        pk2: u.pk2 * z[2],
        pkb: u.pkb * z[3],
        pkw: u.pkw * z[4],
        pksp_ar: u.pksp_ar * z[5],
        pksp_ca: u.pksp_ca * z[6],
        // ORR2018.boron_factor is a fractional standard uncertainty; keep the factor positive
        // (a 25-sigma draw would be needed to reach the floor).
        boron_factor: (1.0 + u.boron_factor * z[7]).max(0.5),
    }
}

/// A member's draws as applied to one record: the constants' shifts and the standard
/// normal deviates of the errors of the record's two measured parameters.
#[derive(Clone, Copy, Debug)]
pub(super) struct MemberDraw {
    pub perturbation: Option<Perturbation>,
    pub z_a: f64,
    pub z_b: f64,
}

/// The member's TA and seawater pCO2 at sampling: the record's measured pair with the
/// member's measurement errors, re-solved with the member's constants at the sampling
/// conditions (`k_sample`: central constants there, computed when `None`).
/// The constants of one member at a record's sampling conditions: `k_sample` (the central
/// constants there) or, when `None`, computed afresh; shifted by the member's draw of the
/// constants' uncertainties when it has one.
pub(super) fn member_constants<'a>(
    k_sample: Option<&'a Constants>,
    rec: &ProjectionRecord,
    methods: &MethodSet,
    perturbation: Option<&Perturbation>,
) -> std::borrow::Cow<'a, Constants> {
    use std::borrow::Cow;
    let k0 = match k_sample {
        Some(k) => Cow::Borrowed(k),
        None => Cow::Owned(Constants::new(&rec.conditions_at(rec.temp_c), methods)),
    };
    match perturbation {
        Some(pt) => Cow::Owned(k0.perturbed(pt)),
        None => k0,
    }
}

pub(super) fn member_start(
    e: &EnsembleSettings,
    methods: &MethodSet,
    rec: &ProjectionRecord,
    draw: &MemberDraw,
    k_sample: Option<&Constants>,
) -> Result<(f64, f64), String> {
    if e.members == 0 {
        return Ok((rec.ta, rec.pco2));
    }
    let u = &e.measurement;
    let (a, b) = match &rec.measured {
        Some(m) => (
            shifted(m.a, m.sd_a.unwrap_or_else(|| u.sd_of(&m.a)) * draw.z_a),
            shifted(m.b, m.sd_b.unwrap_or_else(|| u.sd_of(&m.b)) * draw.z_b),
        ),
        None => (
            Input::Ta(rec.ta + u.ta_umol_kg * draw.z_a),
            Input::Pco2(rec.pco2 + u.sd_of(&Input::Pco2(rec.pco2)) * draw.z_b),
        ),
    };
    match (a, b) {
        (Input::Ta(ta), Input::Pco2(p)) | (Input::Pco2(p), Input::Ta(ta)) => Ok((ta, p)),
        _ => {
            let k = member_constants(k_sample, rec, methods, draw.perturbation.as_ref());
            chem::solve_pair(a, b, &k)
                .map(|st| (st.ta, st.pco2))
                .map_err(|e| format!("re-solving the record with this member's draws: {e}"))
        }
    }
}

/// The member's source-water TA and pCO2 at sampling: the source's mean TA and DIC with
/// the member's measurement errors of a mean of `rows` values (the site's TA and DIC
/// uncertainties divided by √rows; deviates `z`), re-solved with the member's constants at
/// the source's conditions (`k_sample`: central constants there). The same constants'
/// shift as the reef record's, so that the two stay paired.
pub(super) fn member_source_start(
    e: &EnsembleSettings,
    sw: &SourceWater,
    z: (f64, f64),
    k_sample: &Constants,
    perturbation: Option<&Perturbation>,
) -> Result<(f64, f64), String> {
    if e.members == 0 || (z == (0.0, 0.0) && perturbation.is_none()) {
        return Ok((sw.ta, sw.pco2));
    }
    let scale = 1.0 / (sw.rows.max(1) as f64).sqrt();
    let ta = sw.ta + e.measurement.ta_umol_kg * z.0 * scale;
    let dic = sw.dic + e.measurement.dic_umol_kg * z.1 * scale;
    let k = perturbation.map_or(*k_sample, |p| k_sample.perturbed(p));
    chem::solve_pair(Input::Ta(ta), Input::Dic(dic), &k)
        .map(|st| (st.ta, st.pco2))
        .map_err(|e| format!("re-solving the source water with this member's draws: {e}"))
}

#[cfg(test)]
mod tests {
    use super::super::super::rng::Xoshiro256;
    use super::*;
    use crate::chem::{BoronTotal, Conditions, K1K2, KfSource};

    /// Outside check: Orr et al. (2018), Mar. Chem. 207:84–107, Table 4 (fact sheet §2b, V):
    /// AT 2300 ± 2, CT 2000 ± 2 µmol/kg, S 35, 18 °C, P 0, PO4 2 ± 0.1, Si 60 ± 4, Lueker
    /// K1/K2, Uppström boron; standard uncertainty with inputs + constants + boron:
    /// u(Omega_ar) = 0.15579, u(pCO2) = 9.7333 µatm. The project's constant draws plus input
    /// draws must give the same standard deviations within Monte Carlo error (±4 % here).
    #[test]
    fn constant_draws_reproduce_orr2018_table4() {
        let m = MethodSet {
            k1k2: K1K2::Lueker2000,
            boron: BoronTotal::Uppstrom1974,
            kf: KfSource::DicksonRiley1979,
        };
        let mut rng = Xoshiro256::seed_from_u64(2018);
        let n = 20_000;
        let (mut om, mut pc) = (Vec::with_capacity(n), Vec::with_capacity(n));
        for _ in 0..n {
            let z: [f64; 8] = std::array::from_fn(|_| rng.normal());
            let cond = Conditions {
                temp_c: 18.0,
                salinity: 35.0,
                pressure_dbar: 0.0,
                silicate: 60.0 + 4.0 * rng.normal(),
                phosphate: 2.0 + 0.1 * rng.normal(),
            };
            let k = Constants::new(&cond, &m).perturbed(&constants_perturbation(z));
            let ta = 2300.0 + 2.0 * rng.normal();
            let dic = 2000.0 + 2.0 * rng.normal();
            let st = chem::solve_pair(Input::Ta(ta), Input::Dic(dic), &k).unwrap();
            om.push(st.omega_ar);
            pc.push(st.pco2);
        }
        let sd = |v: &[f64]| {
            let mean = v.iter().sum::<f64>() / v.len() as f64;
            (v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (v.len() - 1) as f64).sqrt()
        };
        let (s_om, s_pc) = (sd(&om), sd(&pc));
        assert!((s_om / 0.15579 - 1.0).abs() < 0.04, "u(Omega_ar) {s_om}");
        assert!((s_pc / 9.7333 - 1.0).abs() < 0.04, "u(pCO2) {s_pc}");
    }
}
