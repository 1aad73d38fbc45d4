//! Property tests of the pair solvers: a state solved from any pair, solved again from any
//! other pair of its own outputs, is the same state; and no input, however wild, makes a
//! solver panic or return a non-finite number.

use calcisite::chem::{CarbonateState, Conditions, Input, MethodSet, solve};
use proptest::prelude::*;

fn inputs_of(st: &CarbonateState) -> [Input; 6] {
    [
        Input::Ta(st.ta),
        Input::Dic(st.dic),
        Input::PhT(st.ph_t),
        Input::Pco2(st.pco2),
        Input::Fco2(st.fco2),
        Input::Co3(st.co3),
    ]
}

fn conditions() -> impl Strategy<Value = Conditions> {
    (
        0.0..35.0f64,
        20.0..40.0f64,
        0.0..1000.0f64,
        0.0..100.0f64,
        0.0..3.0f64,
    )
        .prop_map(
            |(temp_c, salinity, pressure_dbar, silicate, phosphate)| Conditions {
                temp_c,
                salinity,
                pressure_dbar,
                silicate,
                phosphate,
            },
        )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn any_pair_reproduces_the_state(
        cond in conditions(),
        ta in 1900.0..2600.0f64,
        dic_frac in 0.80..0.97f64,
    ) {
        let m = MethodSet::default();
        let base = solve(Input::Ta(ta), Input::Dic(ta * dic_frac), &cond, &m);
        // Only states inside the seawater pH range are meaningful here.
        prop_assume!(base.is_ok());
        let base = base.unwrap();
        let inputs = inputs_of(&base);
        for (i, a) in inputs.iter().enumerate() {
            for b in inputs.iter().skip(i + 1) {
                if matches!((a, b), (Input::Pco2(_), Input::Fco2(_))) {
                    continue;
                }
                let st = solve(*a, *b, &cond, &m)
                    .map_err(|e| TestCaseError::fail(format!("{a:?} + {b:?}: {e}")))?;
                prop_assert!((st.ph_t - base.ph_t).abs() < 1e-8, "{a:?} {b:?}: {st:?} vs {base:?}");
                prop_assert!((st.dic / base.dic - 1.0).abs() < 1e-8, "{a:?} {b:?}");
                prop_assert!((st.ta / base.ta - 1.0).abs() < 1e-8, "{a:?} {b:?}");
                prop_assert!((st.omega_ar / base.omega_ar - 1.0).abs() < 1e-8, "{a:?} {b:?}");
            }
        }
    }

    #[test]
    fn wild_inputs_never_panic_or_give_nan(
        t in prop_oneof![-50.0..80.0f64, Just(f64::NAN), Just(f64::INFINITY)],
        s in prop_oneof![-5.0..80.0f64, Just(f64::NAN)],
        p in prop_oneof![-10.0..20000.0f64, Just(f64::NEG_INFINITY)],
        a in prop_oneof![-1e4..1e5f64, Just(f64::NAN), Just(0.0), Just(f64::INFINITY)],
        b in prop_oneof![-1e4..1e5f64, Just(f64::NAN), Just(0.0)],
        kinds in (0usize..6, 0usize..6),
    ) {
        let make = |k: usize, v: f64| match k {
            0 => Input::Ta(v), 1 => Input::Dic(v), 2 => Input::PhT(v / 1000.0),
            3 => Input::Pco2(v), 4 => Input::Fco2(v), _ => Input::Co3(v / 10.0),
        };
        let cond = Conditions { temp_c: t, salinity: s, pressure_dbar: p, silicate: 0.0, phosphate: 0.0 };
        if let Ok(st) = solve(make(kinds.0, a), make(kinds.1, b), &cond, &MethodSet::default()) {
            for v in [st.ta, st.dic, st.ph_t, st.pco2, st.fco2, st.hco3, st.co3, st.co2aq, st.omega_ar, st.omega_ca, st.revelle] {
                prop_assert!(v.is_finite());
            }
        }
    }
}

// ------------------------------------------------------------------ the measured-pair solver

mod measured_pair {
    use calcisite::chem::measured::{self, MeasuredParams, Options, Param};
    use calcisite::chem::{CarbonateState, Conditions, Constants, Input, MethodSet, solve};
    use proptest::prelude::*;

    use super::conditions;

    /// A reef-like state from TA and DIC, and the constants it was solved with.
    fn state(cond: &Conditions, ta: f64, dic_frac: f64) -> Option<(CarbonateState, Constants)> {
        let m = MethodSet::default();
        let st = solve(Input::Ta(ta), Input::Dic(ta * dic_frac), cond, &m).ok()?;
        Some((st, Constants::new(cond, &m)))
    }

    /// The parameters of `st` named by the bits of `mask` (bit i = `Param::ALL[i]`).
    fn measured_from(st: &CarbonateState, mask: u32) -> MeasuredParams {
        let mut m = MeasuredParams::default();
        for (i, p) in Param::ALL.into_iter().enumerate() {
            if mask & (1 << i) != 0 {
                m.set(p, Some(p.of(st)));
            }
        }
        m
    }

    /// Masks of three or more parameters that hold at least one solvable pair.
    fn over_determined() -> impl Strategy<Value = u32> {
        (0u32..64).prop_filter("three or more distinct quantities", |mask| {
            let m = measured_from(
                &CarbonateState {
                    ta: 1.0,
                    dic: 1.0,
                    ph_t: 1.0,
                    pco2: 1.0,
                    fco2: 1.0,
                    hco3: 1.0,
                    co3: 1.0,
                    co2aq: 1.0,
                    omega_ar: 1.0,
                    omega_ca: 1.0,
                    revelle: 1.0,
                },
                *mask,
            );
            m.count() >= 3
        })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]

        /// Whatever pair the order of preference picks from a consistent set, the state is
        /// the one the set came from and no further parameter is flagged.
        #[test]
        fn consistent_sets_resolve_to_the_same_state(
            cond in conditions(),
            ta in 1900.0..2600.0f64,
            dic_frac in 0.80..0.97f64,
            mask in over_determined(),
        ) {
            let base = state(&cond, ta, dic_frac);
            prop_assume!(base.is_some());
            let (base, k) = base.unwrap();
            let m = measured_from(&base, mask);
            let sol = measured::solve_measured(&m, &k, &Options::default())
                .map_err(|e| TestCaseError::fail(format!("{m:?}: {e}")))?;
            let st = sol.state;
            prop_assert!((st.ph_t - base.ph_t).abs() < 1e-8, "{}: {st:?} vs {base:?}", sol.pair);
            prop_assert!((st.dic / base.dic - 1.0).abs() < 1e-8, "{}", sol.pair);
            prop_assert!((st.ta / base.ta - 1.0).abs() < 1e-8, "{}", sol.pair);
            prop_assert!((st.omega_ar / base.omega_ar - 1.0).abs() < 1e-8, "{}", sol.pair);
            prop_assert_eq!(sol.misfits.len(), m.given().len() - 2);
            prop_assert!(sol.inconsistent().next().is_none(), "{:?}", sol.misfits);
        }

        /// A further parameter moved by `factor` × its tolerance (1.2–5: flagged; below
        /// 0.8: not) is the only one flagged.
        #[test]
        fn a_moved_parameter_is_flagged_beyond_its_tolerance(
            cond in conditions(),
            ta in 1900.0..2600.0f64,
            dic_frac in 0.80..0.97f64,
            mask in over_determined(),
            which in 0usize..4,
            factor in prop_oneof![1.2..5.0f64, 0.0..0.8f64],
            sign in prop_oneof![Just(1.0), Just(-1.0)],
        ) {
            let base = state(&cond, ta, dic_frac);
            prop_assume!(base.is_some());
            let (base, k) = base.unwrap();
            let mut m = measured_from(&base, mask);
            let (pair, _) = measured::choose_pair(&m, &Options::default())
                .ok_or_else(|| TestCaseError::fail("no pair"))?;
            let extras: Vec<Param> = m.given().into_iter().filter(|p| !pair.contains(*p)).collect();
            let moved = extras[which % extras.len()];
            let tol = moved.tolerance();
            let v = moved.of(&base);
            let shift = sign * factor * tol.limit;
            m.set(moved, Some(if tol.relative { v * (1.0 + shift) } else { v + shift }));
            let sol = measured::solve_measured(&m, &k, &Options::default())
                .map_err(|e| TestCaseError::fail(format!("{m:?}: {e}")))?;
            prop_assert_eq!(sol.pair, pair);
            let flagged: Vec<Param> = sol.inconsistent().map(|x| x.param).collect();
            if factor > 1.0 {
                prop_assert_eq!(flagged, vec![moved]);
            } else {
                prop_assert!(flagged.is_empty(), "{:?}", sol.misfits);
            }
        }
    }
}
