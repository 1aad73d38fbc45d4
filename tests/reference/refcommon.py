"""Shared helpers for the reference-table scripts in this folder.

Outside reference library: PyCO2SYS==1.8.3.4 (PyPI, Humphreys et al.). The option numbers
below were read in the installed PyCO2SYS source (`PyCO2SYS/engine/nd.py`,
`PyCO2SYS/equilibria/pressured.py`, `PyCO2SYS/constants.py`, `PyCO2SYS/salts.py`,
`PyCO2SYS/api/__init__.py` docstring) and are confirmed by reproducing section 7g of
/work/shared/reference/carbonate-and-reef-facts.md (see `check_facts_7g`).

Only numbers produced by PyCO2SYS are written to the tables; no PyCO2SYS code is copied.
"""

import math
import os
import sys

PINNED_PYCO2SYS = "1.8.3.4"

try:
    import PyCO2SYS as pyco2
except ImportError:  # pragma: no cover - environment message only
    sys.exit(
        "PyCO2SYS is not installed. Install the pinned version with\n"
        f"    python3 -m pip install PyCO2SYS=={PINNED_PYCO2SYS}\n"
        "and run this script again."
    )

if pyco2.__version__ != PINNED_PYCO2SYS:
    sys.exit(
        f"PyCO2SYS {pyco2.__version__} is installed but these tables are pinned to "
        f"{PINNED_PYCO2SYS}; install it with python3 -m pip install PyCO2SYS=={PINNED_PYCO2SYS}"
    )

HERE = os.path.dirname(os.path.abspath(__file__))

# PyCO2SYS option numbers for calcisite's default method set (see README.md here).
#   opt_k_carbonic   10 = Lueker, Dickson & Keeling (2000), total scale
#   opt_k_bisulfate   1 = Dickson (1990)
#   opt_k_fluoride    2 = Perez & Fraga (1987)   (1 would be Dickson & Riley 1979)
#   opt_total_borate  2 = Lee et al. (2010)      (1 would be Uppstrom 1974)
#   opt_gas_constant  3 = CODATA 2018 (83.14462618 cm3 bar K-1 mol-1)
#   opt_pH_scale      1 = total scale
#   opt_pressured_kCO2 0 = K0 and the fugacity factor at 1 atm (no hydrostatic pressure)
# KW, KP1-3, KSi are Millero (1995) and Ksp are Mucci (1983) for every opt_k_carbonic used
# here (PyCO2SYS only switches them for its GEOSECS/Peng/freshwater options 6, 7, 8).
DEFAULT_OPTS = dict(
    opt_k_carbonic=10,
    opt_k_bisulfate=1,
    opt_k_fluoride=2,
    opt_total_borate=2,
    opt_gas_constant=3,
    opt_pH_scale=1,
    opt_pressured_kCO2=0,
)

# Alternative method sets: calcisite name -> (which option differs, PyCO2SYS value).
ALT_SETS = {
    "lueker2000": {},  # the default itself, as a baseline
    "millero2010": {"opt_k_carbonic": 14},  # Millero (2010)
    "wmw2014": {"opt_k_carbonic": 15},  # Waters, Millero & Woosley (2014)
    "sulpis2020": {"opt_k_carbonic": 16},  # Sulpis et al. (2020)
    "dm87": {"opt_k_carbonic": 4},  # Dickson & Millero (1987) refit of Mehrbach et al. (1973)
    "uppstrom1974": {"opt_total_borate": 1},  # total boron of Uppstrom (1974)
    "dr79": {"opt_k_fluoride": 1},  # KF of Dickson & Riley (1979)
}

# PyCO2SYS parameter type codes (par1_type / par2_type), read in PyCO2SYS/solve/__init__.py
# (pair2core): 1 TA, 2 DIC, 3 pH, 4 pCO2, 5 fCO2, 6 carbonate ion, 7 bicarbonate ion.
PAR_TYPE = {"ta": 1, "dic": 2, "ph_t": 3, "pco2": 4, "fco2": 5, "co3": 6}

# Output column -> PyCO2SYS result key (µmol/kg, µatm, pH total scale).
STATE_KEYS = {
    "ta": "alkalinity",
    "dic": "dic",
    "ph_t": "pH_total",
    "pco2": "pCO2",
    "fco2": "fCO2",
    "hco3": "HCO3",
    "co3": "CO3",
    "co2aq": "aqueous_CO2",
    "omega_ar": "saturation_aragonite",
    "omega_ca": "saturation_calcite",
    "revelle": "revelle_factor",
}


def sys_default(par1, par2, t1, t2, **kw):
    """Run PyCO2SYS with the default method set (overridable through kw)."""
    opts = dict(DEFAULT_OPTS)
    opts.update({k: v for k, v in kw.items() if k.startswith("opt_")})
    rest = {k: v for k, v in kw.items() if not k.startswith("opt_")}
    return pyco2.sys(par1, par2, t1, t2, **opts, **rest)


def fmt(x):
    """Full-precision decimal text (shortest repr that round-trips a float64)."""
    x = float(x)
    if not math.isfinite(x):
        raise ValueError(f"non-finite value {x!r} would be written to a reference table")
    return repr(x)


def write_csv(name, header, rows):
    """Write rows (lists of already formatted strings) to HERE/name with a header, LF endings."""
    path = os.path.join(HERE, name)
    tmp = path + ".tmp"
    with open(tmp, "w", newline="\n", encoding="utf-8") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            assert len(r) == len(header), (name, r)
            f.write(",".join(r) + "\n")
    os.replace(tmp, path)
    print(f"wrote {path} ({len(rows)} rows)")


def close(a, b, rel=0.0, abs_=0.0):
    return abs(a - b) <= max(abs_, rel * max(abs(a), abs(b)))


def check_facts_7g():
    """Reproduce section 7g of the facts file (C values computed with PyCO2SYS 1.8.3.4).

    TA 2300, DIC 2000 µmol/kg, S 35, 25 °C, P 0, no nutrients, default method set:
    pH_T 8.040225, Omega_ar 3.346727, Revelle 9.5617 (plus the other printed values).
    Raises AssertionError if the option numbers above do not give these numbers.
    """
    r = sys_default(2300.0, 2000.0, 1, 2, salinity=35.0, temperature=25.0, pressure=0.0)
    got = {
        "pH_T": float(r["pH_total"]),
        "Omega_ar": float(r["saturation_aragonite"]),
        "Revelle": float(r["revelle_factor"]),
        "Omega_ca": float(r["saturation_calcite"]),
        "pCO2": float(r["pCO2"]),
        "fCO2": float(r["fCO2"]),
        "CO3": float(r["CO3"]),
        "KF": float(r["k_fluoride"]),
        "total_borate": float(r["total_borate"]),
        "R": float(r["gas_constant"]),
    }
    expect = {  # (value printed in the facts file, absolute tolerance = half its last digit)
        "pH_T": (8.040225, 5e-7),
        "Omega_ar": (3.346727, 5e-7),
        "Revelle": (9.5617, 5e-5),
        "Omega_ca": (5.077458, 5e-7),
        "pCO2": (402.693, 5e-4),
        "fCO2": (401.409, 5e-4),
        "CO3": (210.925, 5e-4),
        "KF": (2.261098e-3, 5e-10),
        "total_borate": (432.6, 5e-2),
        "R": (83.14462618, 1e-9),
    }
    for k, (v, tol) in expect.items():
        assert abs(got[k] - v) <= tol, f"facts 7g check failed for {k}: got {got[k]!r}, expected {v}"
    print(
        "facts 7g reproduced: pH_T {pH_T:.6f}, Omega_ar {Omega_ar:.6f}, Revelle {Revelle:.4f}, "
        "Omega_ca {Omega_ca:.6f}, pCO2 {pCO2:.3f}, fCO2 {fCO2:.3f}, CO3 {CO3:.3f}".format(**got)
    )
    return got
