#!/usr/bin/env python3
# Reference tables for calcisite's carbonate-system solver.
# Outside reference: PyCO2SYS==1.8.3.4 (PyPI), numpy. Regenerate with
#     python3 tests/reference/make_chem_reference.py
# Writes chem_reference.csv, alt_sets_reference.csv and constants_reference.csv beside this file.
# The version is asserted at run time (refcommon.py); the script first reproduces section 7g
# of the project's facts file and stops if that check fails.
"""Generate pair-solver, alternative-method-set and constants reference tables with PyCO2SYS.

Every row of chem_reference.csv is PyCO2SYS's own answer for the named input pair: a random
realistic seed state is made from TA and a target pH_T, the two pair values are taken from
PyCO2SYS's output for that state, and the pair is solved again by PyCO2SYS. The re-solved
state is written, and the script asserts that it reproduces the seed state.
"""

import sys

import numpy as np

sys.dont_write_bytecode = True  # keep tests/reference free of __pycache__
import refcommon as rc  # noqa: E402

SEED = 20240601
PER_PAIR = 40

PAIRS = [
    ("ta", "dic"),
    ("ta", "ph_t"),
    ("ta", "pco2"),
    ("ta", "fco2"),
    ("dic", "ph_t"),
    ("dic", "pco2"),
    ("dic", "fco2"),
    ("ph_t", "pco2"),
    ("ph_t", "fco2"),
    ("ta", "co3"),
    ("dic", "co3"),
]

STATE_COLS = list(rc.STATE_KEYS)
CHEM_HEADER = ["pair", "temp_c", "salinity", "pressure_dbar", "silicate", "phosphate"] + STATE_COLS


def random_conditions(rng, n, t_range=(0.0, 35.0), s_range=(20.0, 40.0)):
    """T, S, P, Si, PO4 spread over the requested ranges.

    Pressure: a quarter of the states at exactly 0 dbar, a quarter at 0-30 dbar (reef depths),
    half uniform over 0-1000 dbar.
    """
    t = rng.uniform(*t_range, n)
    s = rng.uniform(*s_range, n)
    kind = rng.integers(0, 4, n)
    p = np.where(kind == 0, 0.0, np.where(kind == 1, rng.uniform(0, 30, n), rng.uniform(0, 1000, n)))
    si = rng.uniform(0.0, 100.0, n)
    po4 = rng.uniform(0.0, 3.0, n)
    return t, s, p, si, po4


def seed_states(rng, cond, **opts):
    """Random TA (1900-2500 µmol/kg) and a target pH_T (7.5-8.4) -> full PyCO2SYS state."""
    t, s, p, si, po4 = cond
    n = len(t)
    ta = rng.uniform(1900.0, 2500.0, n)
    ph = rng.uniform(7.5, 8.4, n)
    r = rc.sys_default(
        ta, ph, 1, 3, salinity=s, temperature=t, pressure=p,
        total_silicate=si, total_phosphate=po4, **opts,
    )
    # Re-solve from TA + DIC so the seed is a TA/DIC state as the brief asks.
    dic = np.asarray(r["dic"], dtype=float)
    r = rc.sys_default(
        ta, dic, 1, 2, salinity=s, temperature=t, pressure=p,
        total_silicate=si, total_phosphate=po4, **opts,
    )
    return r


def state_row(label, cond, r, i):
    t, s, p, si, po4 = cond
    row = [label] + [rc.fmt(v[i]) for v in (t, s, p, si, po4)]
    row += [rc.fmt(np.asarray(r[rc.STATE_KEYS[c]])[i]) for c in STATE_COLS]
    return row


# Round-trip tolerances between the seed state and the re-solved state (absolute; µmol/kg for
# TA/DIC). PyCO2SYS 1.8.3.4 re-solves every pair to about 1e-12 here; the limits leave room
# without hiding a wrong root (a wrong root differs by whole pH units).
ROUNDTRIP_TOL = {"ph_t": 1e-9, "ta": 1e-8, "dic": 1e-8, "omega_ar": 1e-9}


def make_chem(rng):
    rows = []
    worst = {}
    for a, b in PAIRS:
        cond = random_conditions(rng, PER_PAIR)
        t, s, p, si, po4 = cond
        seed = seed_states(rng, cond)
        va = np.asarray(seed[rc.STATE_KEYS[a]], dtype=float)
        vb = np.asarray(seed[rc.STATE_KEYS[b]], dtype=float)
        r = rc.sys_default(
            va, vb, rc.PAR_TYPE[a], rc.PAR_TYPE[b], salinity=s, temperature=t, pressure=p,
            total_silicate=si, total_phosphate=po4,
        )
        label = f"{a}+{b}"
        for col, lim in ROUNDTRIP_TOL.items():
            d = np.abs(np.asarray(r[rc.STATE_KEYS[col]], dtype=float)
                       - np.asarray(seed[rc.STATE_KEYS[col]], dtype=float))
            assert np.all(np.isfinite(d)), f"{label}: non-finite result"
            assert d.max() <= lim, f"{label}: re-solved {col} differs from seed by {d.max()}"
            worst[(label, col)] = float(d.max())
        # The given pair must come back unchanged.
        for col, v in ((a, va), (b, vb)):
            back = np.asarray(r[rc.STATE_KEYS[col]], dtype=float)
            assert np.allclose(back, v, rtol=1e-12, atol=0), f"{label}: input {col} not preserved"
        for i in range(PER_PAIR):
            rows.append(state_row(label, cond, r, i))
    print("largest seed-vs-re-solve differences:")
    for a, b in PAIRS:
        label = f"{a}+{b}"
        print("  " + label.ljust(10) + "  ".join(f"{c} {worst[(label, c)]:.2e}" for c in ROUNDTRIP_TOL))
    return rows


# Fitted T/S ranges used when drawing states for each set. Sources: Lueker et al. (2000) 2-35 °C,
# S 19-43; Dickson & Millero (1987) S 20-40 (PyCO2SYS source comment); Millero (2010) and
# Waters et al. (2014) 0-50 °C, S 1-50 (from memory); Sulpis et al. (2020) -1.7-31.8 °C,
# S 30.7-37.6 (from memory). Draws stay inside with a margin.
ALT_RANGES = {
    "lueker2000": ((2.0, 35.0), (20.0, 40.0)),
    "millero2010": ((1.0, 35.0), (20.0, 40.0)),
    "wmw2014": ((1.0, 35.0), (20.0, 40.0)),
    "sulpis2020": ((0.0, 31.0), (31.0, 37.5)),
    "dm87": ((2.0, 35.0), (20.0, 40.0)),
    "uppstrom1974": ((2.0, 35.0), (20.0, 40.0)),
    "dr79": ((2.0, 35.0), (20.0, 40.0)),
}
ALT_PER_SET = 20


def make_alt(rng):
    rows = []
    for name, opts in rc.ALT_SETS.items():
        t_range, s_range = ALT_RANGES[name]
        cond = random_conditions(rng, ALT_PER_SET, t_range, s_range)
        r = seed_states(rng, cond, **opts)
        for k, v in opts.items():
            assert int(np.asarray(r[k]).ravel()[0]) == v, (name, k)
        for i in range(ALT_PER_SET):
            rows.append(state_row(name, cond, r, i))
    return rows


CONST_COLS = [
    ("k0", "k_CO2", 1.0),
    ("k1", "k_carbonic_1", 1.0),
    ("k2", "k_carbonic_2", 1.0),
    ("kb", "k_borate", 1.0),
    ("kw", "k_water", 1.0),
    ("ks", "k_bisulfate", 1.0),
    ("kf", "k_fluoride", 1.0),
    ("k1p", "k_phosphoric_1", 1.0),
    ("k2p", "k_phosphoric_2", 1.0),
    ("k3p", "k_phosphoric_3", 1.0),
    ("ksi", "k_silicate", 1.0),
    ("ksp_ar", "k_aragonite", 1.0),
    ("ksp_ca", "k_calcite", 1.0),
    ("fugacity_factor", "fugacity_factor", 1.0),
    ("bt", "total_borate", 1e-6),  # PyCO2SYS reports totals in µmol/kg; written in mol/kg
    ("st", "total_sulfate", 1e-6),
    ("ft", "total_fluoride", 1e-6),
    ("ca", "total_calcium", 1e-6),
]

# (T °C, S, P dbar): the facts-file point, reef conditions, cold/fresh/salty corners and pressure.
CONST_POINTS = [
    (25.0, 35.0, 0.0),
    (18.0, 35.0, 0.0),
    (27.5, 35.1, 2.0),
    (30.0, 36.0, 0.0),
    (35.0, 40.0, 0.0),
    (2.0, 34.5, 0.0),
    (0.0, 33.0, 0.0),
    (10.0, 20.0, 0.0),
    (15.0, 30.0, 10.0),
    (28.0, 34.0, 25.0),
    (25.0, 35.0, 100.0),
    (18.0, 35.0, 100.0),
    (25.0, 35.0, 3000.0),  # 300 bar, the ZWG (2001) pressure-factor check point
    (4.0, 34.8, 1000.0),
    (10.0, 35.0, 500.0),
]


def make_constants():
    t = np.array([p[0] for p in CONST_POINTS])
    s = np.array([p[1] for p in CONST_POINTS])
    p = np.array([p[2] for p in CONST_POINTS])
    r = rc.sys_default(2300.0, 2000.0, 1, 2, salinity=s, temperature=t, pressure=p)
    rows = []
    for i in range(len(CONST_POINTS)):
        row = [rc.fmt(t[i]), rc.fmt(s[i]), rc.fmt(p[i])]
        row += [rc.fmt(np.asarray(r[key], dtype=float)[i] * scale) for _, key, scale in CONST_COLS]
        rows.append(row)
    header = ["temp_c", "salinity", "pressure_dbar"] + [c for c, _, _ in CONST_COLS]
    return header, rows


def main():
    rc.check_facts_7g()
    rng = np.random.default_rng(SEED)
    chem = make_chem(rng)
    assert len(chem) >= 330
    rc.write_csv("chem_reference.csv", CHEM_HEADER, chem)
    alt = make_alt(rng)
    rc.write_csv("alt_sets_reference.csv", ["set"] + CHEM_HEADER[1:], alt)
    header, rows = make_constants()
    rc.write_csv("constants_reference.csv", header, rows)


if __name__ == "__main__":
    main()
