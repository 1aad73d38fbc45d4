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
