//! Pair solvers.
//!
//! Pairs that fix [H⁺] only implicitly (TA with DIC, CO2 or CO3²⁻) are solved for [H⁺] on
//! the total scale by a safeguarded Newton iteration: Newton steps are taken while they stay
//! inside a bracket known to hold the root, otherwise the bracket is bisected in log space.
//! The first estimate is the cubic-based one of Munhoven (2013), *Geosci. Model Dev.*
//! 6:1367–1388 (carbonate + borate alkalinity), which puts Newton within a few iterations of
//! the root for seawater. The iteration stops when a step changes [H⁺] by less than 1e-12
//! relative (pH change < 5e-13) and gives up with an error (never a hang or a NaN) after 200
//! iterations. Total alkalinity follows Dickson (1981) as written in Dickson et al. (2007):
//!
//! TA = [HCO3⁻] + 2[CO3²⁻] + [B(OH)4⁻] + [OH⁻] + [HPO4²⁻] + 2[PO4³⁻] + [SiO(OH)3⁻]
//!      − [H⁺]F − [HSO4⁻] − [HF] − [H3PO4]

use super::{CarbonateState, ChemError, Constants, Input, limits};

/// Relative [H⁺] step below which the iteration has converged.
const H_TOL: f64 = 1e-12;
const MAX_ITER: usize = 200;
/// The pH window searched for a root (wider than the accepted result range, so that a
/// state just outside the range is reported with its pH rather than as "no root").
const PH_SEARCH: (f64, f64) = (2.0, 13.0);

/// The parts of the alkalinity terms that do not depend on [H⁺], worked out once per solve
/// rather than at every step of the iteration. Each is the same operation on the same
/// values as written out in the terms (products taken in the same order), so the terms'
/// bits do not depend on this.
struct Alkalinity<'a> {
    k: &'a Constants,
    /// [H⁺]T/[H⁺]F = 1 + ST/KS, and its reciprocal.
    free_to_total: f64,
    total_to_free: f64,
    bt_kb: f64,
    sit_ksi: f64,
    st_ks: f64,
    ft_kf: f64,
    /// K1P·K2P, K1P·K2P·K3P, 2·K1P·K2P·K3P and 2·K1P.
    p12: f64,
    p123: f64,
    two_p123: f64,
    two_p1: f64,
    /// K1·K2 and 2·K1·K2.
    k1k2: f64,
    two_k1k2: f64,
}

impl Alkalinity<'_> {
    fn new(k: &Constants) -> Alkalinity<'_> {
        let free_to_total = 1.0 + k.st / k.ks;
        let (p12, p123) = (k.k1p * k.k2p, k.k1p * k.k2p * k.k3p);
        Alkalinity {
            k,
            free_to_total,
            total_to_free: 1.0 / free_to_total,
            bt_kb: k.bt * k.kb,
            sit_ksi: k.sit * k.ksi,
            st_ks: k.st * k.ks,
            ft_kf: k.ft * k.kf,
            p12,
            p123,
            two_p123: 2.0 * p123,
            two_p1: 2.0 * k.k1p,
            k1k2: k.k1 * k.k2,
            two_k1k2: 2.0 * k.k1 * k.k2,
        }
    }

    /// Non-carbonate alkalinity (mol/kg) and its derivative with respect to [H⁺]T.
    #[inline(always)]
    fn noncarbonate(&self, h: f64) -> (f64, f64) {
        let k = self.k;
        let hf = h / self.free_to_total;

        let borate = self.bt_kb / (k.kb + h);
        let d_borate = -self.bt_kb / ((k.kb + h) * (k.kb + h));
        let oh = k.kw / h;
        let d_oh = -k.kw / (h * h);
        let silicate = self.sit_ksi / (k.ksi + h);
        let d_silicate = -self.sit_ksi / ((k.ksi + h) * (k.ksi + h));

        let (p1, p12, p123) = (k.k1p, self.p12, self.p123);
        let h2 = h * h;
        let h3 = h2 * h;
        let den = h3 + p1 * h2 + p12 * h + p123;
        let num = p12 * h + self.two_p123 - h3;
        let phosphate = k.pt * num / den;
        let d_phosphate = k.pt
            * ((p12 - 3.0 * h2) * den - num * (3.0 * h2 + self.two_p1 * h + p12))
            / (den * den);

        let hso4 = k.st * hf / (hf + k.ks);
        let d_hso4 = self.st_ks / ((hf + k.ks) * (hf + k.ks)) / self.free_to_total;
        let hfl = k.ft * hf / (hf + k.kf);
        let d_hfl = self.ft_kf / ((hf + k.kf) * (hf + k.kf)) / self.free_to_total;

        (
            borate + oh + silicate + phosphate - hf - hso4 - hfl,
            d_borate + d_oh + d_silicate + d_phosphate - self.total_to_free - d_hso4 - d_hfl,
        )
    }

    /// Carbonate alkalinity per unit DIC, (K1·H + 2·K1·K2)/D, and its derivative in H.
    #[inline(always)]
    fn carbonate_per_dic(&self, h: f64) -> (f64, f64) {
        let k1 = self.k.k1;
        let d = h * h + k1 * h + self.k1k2;
        let n = k1 * h + self.two_k1k2;
        (n / d, (k1 * d - n * (2.0 * h + k1)) / (d * d))
    }
}

/// Munhoven (2013) first estimate of [H⁺] from TA and DIC with carbonate and borate only.
fn munhoven_initial_h(ta: f64, dic: f64, k: &Constants) -> f64 {
    if ta <= 0.0 {
        return 1e-3;
    }
    if ta >= 2.0 * dic + k.bt {
        return 1e-10;
    }
    let zca = dic / ta;
    let zba = k.bt / ta;
    let a2 = k.kb * (1.0 - zba) + k.k1 * (1.0 - zca);
    let a1 = k.k1 * k.kb * (1.0 - zba - zca) + k.k1 * k.k2 * (1.0 - 2.0 * zca);
    let a0 = k.k1 * k.k2 * k.kb * (1.0 - zba - 2.0 * zca);
    let d = a2 * a2 - 3.0 * a1;
    if d <= 0.0 {
        return 1e-8;
    }
    let sd = d.sqrt();
    let hmin = if a2 < 0.0 {
        (-a2 + sd) / 3.0
    } else {
        -a1 / (a2 + sd)
    };
    let arg = -(a0 + hmin * (a1 + hmin * (a2 + hmin))) / sd;
    let h = hmin + arg.max(0.0).sqrt();
    if h.is_finite() && h > 0.0 { h } else { 1e-8 }
}

/// What the Newton iteration saw of `g`'s sign: a point with g > 0 (so g(lo) > 0 for the
/// decreasing `g`) and a point with g < 0 (so g(hi) < 0). A side seen needs no check at the
/// end of the window.
#[derive(Default)]
struct Seen {
    above: bool,
    below: bool,
}

/// Find the [H⁺] where `g` (decreasing in H on `[lo, hi]`, g(lo) > 0 > g(hi)) is zero.
fn safeguarded_newton(
    mut lo: f64,
    mut hi: f64,
    h0: f64,
    g: impl Fn(f64) -> (f64, f64),
    seen: &mut Seen,
) -> Result<f64, ChemError> {
    let mut h = if h0 > lo && h0 < hi {
        h0
    } else {
        (lo * hi).sqrt()
    };
    for _ in 0..MAX_ITER {
        let (val, der) = g(h);
        if !val.is_finite() {
            break;
        }
        if val == 0.0 {
            seen.above = true;
            seen.below = true;
            return Ok(h);
        }
        if val > 0.0 {
            lo = h;
            seen.above = true;
        } else {
            hi = h;
            seen.below = true;
        }
        let newton = h - val / der;
        let inside = newton.is_finite() && newton > lo && newton < hi;
        let next = if inside { newton } else { (lo * hi).sqrt() };
        if (next - h).abs() <= H_TOL * h || hi / lo - 1.0 <= H_TOL {
            if inside && (next - h).abs() <= H_TOL * h {
                // A Newton step this small, accepted strictly inside the bracket, puts the
                // root inside it too (within 1e-24 relative): `g` changes sign within the
                // bracket, so it is above zero at its low end and below at its high end.
                // (A root outside the window is approached by bisection, never by an
                // accepted step, and keeps the end checks.)
                seen.above = true;
                seen.below = true;
            }
            return Ok(next);
        }
        h = next;
    }
    Err(ChemError::NoSolution(
        "the [H+] iteration did not converge; check that the inputs describe seawater".into(),
    ))
}

/// [H⁺] at the ends of the pH search window, worked out once.
fn h_bounds() -> (f64, f64) {
    static BOUNDS: std::sync::LazyLock<(f64, f64)> =
        std::sync::LazyLock::new(|| (10f64.powf(-PH_SEARCH.1), 10f64.powf(-PH_SEARCH.0)));
    *BOUNDS
}

/// Solve `g(H) = 0` for g decreasing in H over the pH search window, or explain which
/// side the inputs fall off.
///
/// The iteration runs first; an end of the window is evaluated only when the iteration
/// never saw `g` with that end's sign (for a decreasing `g`, a point with g > 0 implies
/// g(lo) > 0, and one with g < 0 implies g(hi) < 0). The bracket does not depend on those
/// checks, so the root is the same as with both ends checked first, and so is the message
/// when an end fails (it takes precedence over the iteration's own error, as before).
fn solve_decreasing(h0: f64, g: impl Fn(f64) -> (f64, f64), what: &str) -> Result<f64, ChemError> {
    let (lo, hi) = h_bounds();
    let mut seen = Seen::default();
    let root = safeguarded_newton(lo, hi, h0, &g, &mut seen);
    if !seen.above && g(lo).0 < 0.0 {
        return Err(ChemError::NoSolution(format!(
            "no seawater state matches {what}: alkalinity is too high (pH_T would exceed {})",
            PH_SEARCH.1
        )));
    }
    if !seen.below && g(hi).0 > 0.0 {
        return Err(ChemError::NoSolution(format!(
            "no seawater state matches {what}: alkalinity is too low (pH_T would be below {})",
            PH_SEARCH.0
        )));
    }
    root
}

/// Every output from [H⁺]T and DIC (both mol/kg).
pub fn solve_from_h(h: f64, dic: f64, k: &Constants) -> CarbonateState {
    state_from_h(h, dic, &Alkalinity::new(k))
}

/// [`solve_from_h`] with the alkalinity terms' constant parts already worked out (by the
/// solve that found `h`, which needs them too).
fn state_from_h(h: f64, dic: f64, alk: &Alkalinity<'_>) -> CarbonateState {
    let k = alk.k;
    let d = h * h + k.k1 * h + k.k1 * k.k2;
    let co2 = dic * h * h / d;
    let hco3 = dic * k.k1 * h / d;
    let co3 = dic * k.k1 * k.k2 / d;
    let (ca_per_dic, d_ca_per_dic) = alk.carbonate_per_dic(h);
    let (nc, d_nc) = alk.noncarbonate(h);
    let ta = dic * ca_per_dic + nc;

    // Revelle factor (∂ln pCO2/∂ln DIC at constant TA), analytically:
    // RF = 1 + DIC·(α0'/α0)·dH/dDIC with dH/dDIC = −(α1 + 2α2)/(∂TA/∂H).
    let dta_dh = dic * d_ca_per_dic + d_nc;
    let dlog_a0_dh = k.k1 * (h + 2.0 * k.k2) / (d * h);
    let revelle = 1.0 + dic * dlog_a0_dh * (-ca_per_dic / dta_dh);

    let fco2 = co2 / k.k0 * 1e6;
    CarbonateState {
        ta: ta * 1e6,
        dic: dic * 1e6,
        ph_t: -h.log10(),
        pco2: fco2 / k.fugacity_factor,
        fco2,
        hco3: hco3 * 1e6,
        co3: co3 * 1e6,
        co2aq: co2 * 1e6,
        omega_ar: k.ca * co3 / k.ksp_ar,
        omega_ca: k.ca * co3 / k.ksp_ca,
        revelle,
    }
}

/// The measured quantities sorted into a fixed order, in mol/kg and atm (CO2 as CO2*).
#[derive(Default)]
struct Known {
    ta: Option<f64>,
    dic: Option<f64>,
    h: Option<f64>,
    co2: Option<f64>,
    co3: Option<f64>,
}

/// Solve the carbonate system from two measured parameters.
///
/// Valid pairs: any two of TA, DIC, pH_T, CO2 (given as pCO2 or fCO2), CO3²⁻. Errors name
/// the offending parameter and limit; no NaN or infinite value is ever returned.
pub fn solve_pair(a: Input, b: Input, k: &Constants) -> Result<CarbonateState, ChemError> {
    let mut known = Known::default();
    // The slots filled so far (two at most; no allocation on this per-row path).
    let mut seen: [Option<&'static str>; 2] = [None; 2];
    for (i, input) in [a, b].into_iter().enumerate() {
        let col = input.column();
        let v = input.value();
        match input_limit(&input) {
            Some(l) => l.check(v),
            None => limits::check(col, v),
        }
        .map_err(ChemError::OutOfRange)?;
        let slot_name = match input {
            Input::Pco2(_) | Input::Fco2(_) => "co2",
            _ => col,
        };
        if let Some(first) = seen.iter().flatten().find(|s| **s == slot_name) {
            let first_col = if *first == "co2" {
                match a {
                    Input::Pco2(_) => "pco2",
                    Input::Fco2(_) => "fco2",
                    _ => col,
                }
            } else {
                col
            };
            return Err(ChemError::InvalidPair(first_col, col));
        }
        if let Some(slot) = seen.get_mut(i) {
            *slot = Some(slot_name);
        }
        match input {
            Input::Ta(v) => known.ta = Some(v * 1e-6),
            Input::Dic(v) => known.dic = Some(v * 1e-6),
            Input::PhT(v) => known.h = Some(10f64.powf(-v)),
            Input::Pco2(v) => known.co2 = Some(v * 1e-6 * k.fugacity_factor * k.k0),
            Input::Fco2(v) => known.co2 = Some(v * 1e-6 * k.k0),
            Input::Co3(v) => known.co3 = Some(v * 1e-6),
        }
    }
    let alk = Alkalinity::new(k);
    let (h, dic) = find_h_and_dic(&known, &alk)?;
    let state = state_from_h(h, dic, &alk);
    let (ph_lo, ph_hi) = ph_result_range();
    if !(state.ph_t >= ph_lo && state.ph_t <= ph_hi) {
        return Err(ChemError::NoSolution(format!(
            "these inputs imply pH_T {:.2}, outside the seawater range {ph_lo}–{ph_hi}; \
             check units and which columns were paired",
            state.ph_t
        )));
    }
    let values = [
        state.ta,
        state.dic,
        state.ph_t,
        state.pco2,
        state.fco2,
        state.hco3,
        state.co3,
        state.co2aq,
        state.omega_ar,
        state.omega_ca,
        state.revelle,
    ];
    if values.iter().any(|v| !v.is_finite()) {
        return Err(ChemError::NoSolution("the solution is not finite".into()));
    }
    Ok(state)
}

/// The physical limit of an input's column, looked up once for each kind of input.
fn input_limit(input: &Input) -> Option<&'static limits::Limit> {
    static TABLE: std::sync::LazyLock<[Option<limits::Limit>; 6]> =
        std::sync::LazyLock::new(|| {
            [
                Input::Ta(0.0),
                Input::Dic(0.0),
                Input::PhT(0.0),
                Input::Pco2(0.0),
                Input::Fco2(0.0),
                Input::Co3(0.0),
            ]
            .map(|i| limits::Limit::of(i.column()))
        });
    let slot = match input {
        Input::Ta(_) => 0,
        Input::Dic(_) => 1,
        Input::PhT(_) => 2,
        Input::Pco2(_) => 3,
        Input::Fco2(_) => 4,
        Input::Co3(_) => 5,
    };
    TABLE.get(slot)?.as_ref()
}

/// Accepted pH_T range of a solution: the same as the input limit for pH_T.
fn ph_result_range() -> (f64, f64) {
    static RANGE: std::sync::LazyLock<(f64, f64)> = std::sync::LazyLock::new(|| {
        limits::LIMITS
            .iter()
            .find(|(c, ..)| *c == "ph_t")
            .map(|&(_, lo, hi, _)| (lo, hi))
            .unwrap_or((6.0, 9.5))
    });
    *RANGE
}

fn find_h_and_dic(kn: &Known, alk: &Alkalinity<'_>) -> Result<(f64, f64), ChemError> {
    let k = alk.k;
    let (k1, k2) = (k.k1, k.k2);
    let alpha_sum = |h: f64| h * h + k1 * h + k1 * k2; // DIC = CO3·sum/(K1K2) = CO2·sum/H²
    match (kn.ta, kn.dic, kn.h, kn.co2, kn.co3) {
        (Some(ta), Some(dic), None, None, None) => {
            let g = |h: f64| {
                let (ca, dca) = alk.carbonate_per_dic(h);
                let (nc, dnc) = alk.noncarbonate(h);
                (dic * ca + nc - ta, dic * dca + dnc)
            };
            let h = solve_decreasing(munhoven_initial_h(ta, dic, k), g, "this TA and DIC")?;
            Ok((h, dic))
        }
        (Some(ta), None, Some(h), None, None) => {
            let (ca, _) = alk.carbonate_per_dic(h);
            let carb_alk = ta - alk.noncarbonate(h).0;
            if carb_alk <= 0.0 {
                return Err(ChemError::NoSolution(
                    "TA is too low for this pH: no DIC can match (carbonate alkalinity ≤ 0)".into(),
                ));
            }
            Ok((h, carb_alk / ca))
        }
        (Some(ta), None, None, Some(co2), None) => {
            let g = |h: f64| {
                let (nc, dnc) = alk.noncarbonate(h);
                let ca = co2 * (k1 / h + 2.0 * k1 * k2 / (h * h));
                let dca = co2 * (-k1 / (h * h) - 4.0 * k1 * k2 / (h * h * h));
                (ca + nc - ta, dca + dnc)
            };
            let h = solve_decreasing(1e-8, g, "this TA and pCO2")?;
            Ok((h, co2 * alpha_sum(h) / (h * h)))
        }
        (Some(ta), None, None, None, Some(co3)) => {
            // g(H) = CO3·(H/K2 + 2) + NC(H) − TA has a minimum; the seawater root is the one
            // on the high-[H⁺] side of it. Scan pH upwards for the first sign change.
            let g = |h: f64| {
                let (nc, dnc) = alk.noncarbonate(h);
                (co3 * (h / k2 + 2.0) + nc - ta, co3 / k2 + dnc)
            };
            let mut ph = PH_SEARCH.0;
            let mut prev_h = 10f64.powf(-ph);
            if g(prev_h).0 <= 0.0 {
                return Err(ChemError::NoSolution(
                    "no seawater state matches this TA and CO3".into(),
                ));
            }
            while ph < PH_SEARCH.1 {
                ph += 0.25;
                let h = 10f64.powf(-ph);
                if g(h).0 < 0.0 {
                    // On [h, prev_h] g goes from negative to positive with increasing H.
                    let neg = |x: f64| {
                        let (v, d) = g(x);
                        (-v, -d)
                    };
                    let mut seen = Seen::default();
                    let root = safeguarded_newton(h, prev_h, (h * prev_h).sqrt(), neg, &mut seen)?;
                    return Ok((root, co3 * alpha_sum(root) / (k1 * k2)));
                }
                prev_h = h;
            }
            Err(ChemError::NoSolution(
                "no seawater state matches this TA and CO3: CO3 is too high for this alkalinity"
                    .into(),
            ))
        }
        (None, Some(dic), Some(h), None, None) => Ok((h, dic)),
        (None, Some(dic), None, Some(co2), None) => {
            if dic <= co2 {
                return Err(ChemError::NoSolution(
                    "DIC must exceed dissolved CO2 (K0·fCO2); this pCO2 is too high for this DIC"
                        .into(),
                ));
            }
            // DIC/CO2 − 1 = K1/H + K1K2/H², solved for x = 1/H in a cancellation-free form.
            let r = dic / co2 - 1.0;
            let x = 2.0 * r / (k1 + (k1 * k1 + 4.0 * k1 * k2 * r).sqrt());
            Ok((1.0 / x, dic))
        }
        (None, Some(dic), None, None, Some(co3)) => {
            if dic <= co3 {
                return Err(ChemError::NoSolution("DIC must exceed CO3".into()));
            }
            // H² + K1·H − K1K2·(DIC/CO3 − 1) = 0
            let q = k1 * k2 * (dic / co3 - 1.0);
            let h = 2.0 * q / (k1 + (k1 * k1 + 4.0 * q).sqrt());
            Ok((h, dic))
        }
        (None, None, Some(h), Some(co2), None) => Ok((h, co2 * alpha_sum(h) / (h * h))),
        (None, None, Some(h), None, Some(co3)) => Ok((h, co3 * alpha_sum(h) / (k1 * k2))),
        (None, None, None, Some(co2), Some(co3)) => {
            let h = (k1 * k2 * co2 / co3).sqrt();
            Ok((h, co2 * alpha_sum(h) / (h * h)))
        }
        _ => Err(ChemError::NoSolution(
            "exactly two distinct parameters are needed".into(),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::super::{Conditions, MethodSet, solve};
    use super::*;

    fn state(a: Input, b: Input, t: f64, s: f64) -> CarbonateState {
        solve(a, b, &Conditions::surface(t, s), &MethodSet::default()).unwrap()
    }

    /// PyCO2SYS 1.8.3.4 with the project's default method set (fact sheet §7g), TA 2300,
    /// DIC 2000 µmol/kg, S 35, 25 °C, 0 dbar, no nutrients.
    #[test]
    fn default_set_matches_pyco2sys_at_s35_t25() {
        let st = state(Input::Ta(2300.0), Input::Dic(2000.0), 25.0, 35.0);
        assert!((st.ph_t - 8.040225).abs() < 5e-6, "{st:?}");
        assert!((st.pco2 - 402.693).abs() < 0.01);
        assert!((st.fco2 - 401.409).abs() < 0.01);
        assert!((st.hco3 - 1777.679).abs() < 0.01);
        assert!((st.co3 - 210.925).abs() < 0.01);
        assert!((st.co2aq - 11.3967).abs() < 1e-3);
        assert!((st.omega_ar - 3.346727).abs() < 1e-5);
        assert!((st.omega_ca - 5.077458).abs() < 1e-5);
        assert!((st.revelle - 9.5617).abs() < 1e-3);
    }

    /// mocsy's test (Orr & Epitalon 2015; fact sheet §7a): TA 2300, DIC 2000, 18 °C, S 35,
    /// 100 dbar, Uppström boron, Dickson & Riley KF. Speciation to 1e-4 relative, Omega to
    /// 3e-4 (pressure-correction and calcium conventions differ slightly).
    #[test]
    fn mocsy_check_at_100_dbar() {
        use super::super::{BoronTotal, KfSource};
        let m = MethodSet {
            boron: BoronTotal::Uppstrom1974,
            kf: KfSource::DicksonRiley1979,
            ..Default::default()
        };
        let c = Conditions {
            temp_c: 18.0,
            salinity: 35.0,
            pressure_dbar: 100.0,
            silicate: 0.0,
            phosphate: 0.0,
        };
        let st = solve(Input::Ta(2300.0), Input::Dic(2000.0), &c, &m).unwrap();
        assert!((st.ph_t - 8.14892578).abs() < 2e-4, "{st:?}");
        assert!((st.co3 / 210.31 - 1.0).abs() < 3e-4);
        assert!((st.hco3 / 1779.52 - 1.0).abs() < 1e-4);
        assert!((st.omega_ar / 3.19940853 - 1.0).abs() < 3e-4);
        assert!((st.omega_ca / 4.94189167 - 1.0).abs() < 3e-4);
    }

    #[test]
    fn every_pair_round_trips_at_the_reference_state() {
        let base = state(Input::Ta(2300.0), Input::Dic(2000.0), 25.0, 35.0);
        let inputs = [
            Input::Ta(base.ta),
            Input::Dic(base.dic),
            Input::PhT(base.ph_t),
            Input::Pco2(base.pco2),
            Input::Co3(base.co3),
        ];
        for (i, a) in inputs.iter().enumerate() {
            for b in inputs.iter().skip(i + 1) {
                let st = state(*a, *b, 25.0, 35.0);
                assert!((st.ph_t - base.ph_t).abs() < 1e-9, "{a:?} {b:?}");
                assert!((st.dic - base.dic).abs() < 1e-6, "{a:?} {b:?}");
                assert!((st.ta - base.ta).abs() < 1e-6, "{a:?} {b:?}");
            }
        }
    }

    #[test]
    fn impossible_inputs_are_errors_not_nans() {
        let c = Conditions::surface(25.0, 35.0);
        let m = MethodSet::default();
        assert!(matches!(
            solve(Input::Pco2(400.0), Input::Fco2(400.0), &c, &m),
            Err(ChemError::InvalidPair(..))
        ));
        assert!(matches!(
            solve(Input::Ta(2300.0), Input::Ta(2300.0), &c, &m),
            Err(ChemError::InvalidPair(..))
        ));
        assert!(matches!(
            solve(Input::Pco2(-4.0), Input::Ta(2300.0), &c, &m),
            Err(ChemError::OutOfRange(_))
        ));
        assert!(matches!(
            solve(Input::Ta(f64::NAN), Input::Dic(2000.0), &c, &m),
            Err(ChemError::OutOfRange(_))
        ));
        let message = |a, b| match solve(a, b, &c, &m) {
            Err(e) => e.to_string(),
            Ok(st) => format!("solved: {st:?}"),
        };
        // Alkalinity far above twice DIC: no state in the seawater range.
        let e = message(Input::Ta(4900.0), Input::Dic(100.0));
        assert!(e.starts_with("these inputs imply pH_T 10."), "{e}");
        assert!(e.contains("outside the seawater range 6–9.5"), "{e}");
        // At pH 9.4 borate and hydroxide alone exceed a TA of 10 µmol/kg: no DIC matches.
        assert_eq!(
            message(Input::Ta(10.0), Input::PhT(9.4)),
            "TA is too low for this pH: no DIC can match (carbonate alkalinity ≤ 0)"
        );
        // 19000 µatm × K0 (≈0.028 mol/kg/atm) ≈ 540 µmol/kg of CO2*, above this DIC.
        assert_eq!(
            message(Input::Dic(500.0), Input::Pco2(19000.0)),
            "DIC must exceed dissolved CO2 (K0·fCO2); this pCO2 is too high for this DIC"
        );
    }
}
