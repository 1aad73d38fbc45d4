#!/usr/bin/env python3
# Density and xCO2 -> pCO2 reference tables for calcisite.
# Outside reference: gsw==3.6.23 (PyPI, TEOS-10 GSW Python), PyCO2SYS==1.8.3.4 (PyPI), numpy.
# Regenerate with
#     python3 tests/reference/make_density_reference.py
# Writes density_reference.csv and xco2_reference.csv beside this file.
"""TEOS-10 in-situ density (gsw) and xCO2 -> pCO2 at 1 atm (Weiss & Price 1980 via PyCO2SYS).

Density: SA = gsw.SA_from_SP(SP, p, lon, lat); CT = gsw.CT_from_t(SA, t, p); rho = gsw.rho(SA, CT, p).
p is sea pressure in dbar (excluding the atmosphere).

xCO2: pCO2 (µatm) = xCO2 (ppm, dry air) * (P_atm - pH2O), P_atm = 1 atm, with pH2O (atm) from
Weiss & Price (1980, Mar. Chem. 8:347) eq. 10 times exp(-0.000544 S), as computed by the
PyCO2SYS function PyCO2SYS.gas.vpfactor (which returns P_atm - pH2O). The script also checks
that PyCO2SYS's own xCO2 input (parameter type 9) gives the same pCO2.
"""

import sys

import numpy as np

sys.dont_write_bytecode = True  # keep tests/reference free of __pycache__
import refcommon as rc  # noqa: E402

PINNED_GSW = "3.6.23"
try:
    import gsw
except ImportError:
    sys.exit(f"gsw is not installed: python3 -m pip install gsw=={PINNED_GSW}")
if gsw.__version__ != PINNED_GSW:
    sys.exit(f"gsw {gsw.__version__} installed, tables pinned to {PINNED_GSW}")

from PyCO2SYS import gas  # noqa: E402

# (SP, t °C, p dbar, lon °E, lat °N). Open-ocean positions where the TEOS-10 absolute-salinity
# anomaly differs (Pacific, Atlantic, Indian, Southern Ocean) and a few 0/0 points.
DENSITY_POINTS = [
    (35.0, 25.0, 0.0, 0.0, 0.0),
    (35.0, 0.0, 0.0, 0.0, 0.0),
    (0.0, 4.0, 0.0, 0.0, 0.0),
    (0.0, 20.0, 0.0, 0.0, 0.0),
    (10.0, 15.0, 0.0, 0.0, 0.0),
    (20.0, 28.0, 1.0, 0.0, 0.0),
    (30.0, 30.0, 2.0, 0.0, 0.0),
    (35.1, 27.5, 2.0, -127.0, -8.0),
    (35.5, 28.0, 5.0, -127.0, -8.0),
    (34.8, 26.0, 20.0, 150.0, -15.0),
    (36.2, 29.0, 3.0, 120.0, 10.0),
    (40.0, 35.0, 0.0, 50.0, 25.0),
    (37.0, 33.0, 1.0, 55.0, 20.0),
    (34.7, 2.0, 1000.0, -30.0, 40.0),
    (34.9, 4.0, 500.0, -150.0, 30.0),
    (35.0, 10.0, 250.0, 180.0, -30.0),
    (34.0, 1.0, 100.0, 0.0, -60.0),
    (33.5, 12.0, 50.0, 145.0, 35.0),
    (35.2, 18.0, 750.0, -20.0, -20.0),
    (36.0, 22.0, 100.0, -65.0, 30.0),
    (38.0, 20.0, 10.0, 15.0, 36.0),
    (25.0, 5.0, 30.0, 20.0, 58.0),
]

# (T °C, S) for the xCO2 table; every point at 1 atm, several xCO2 values.
XCO2_POINTS = [(0.0, 35.0), (5.0, 34.0), (10.0, 35.0), (15.0, 30.0), (18.0, 35.0), (20.0, 20.0),
               (25.0, 35.0), (27.0, 35.0), (27.5, 35.1), (30.0, 36.0), (33.0, 38.0), (35.0, 40.0)]
XCO2_VALUES = [280.0, 422.8, 602.782, 1135.21]


def density_table():
    rows = []
    for sp, t, p, lon, lat in DENSITY_POINTS:
        sa = float(gsw.SA_from_SP(sp, p, lon, lat))
        ct = float(gsw.CT_from_t(sa, t, p))
        rho = float(gsw.rho(sa, ct, p))
        assert 990.0 < rho < 1040.0, (sp, t, p, rho)
        rows.append([rc.fmt(v) for v in (sp, t, p, lon, lat, sa, ct, rho)])
    # Sanity value, from memory: SP 35, 25 °C, 0 dbar seawater is about 1023.34 kg/m3.
    assert abs(float(rows[0][7]) - 1023.34) < 0.05, rows[0]
    header = ["sp", "temp_c", "pressure_dbar", "lon", "lat", "sa_g_kg", "ct_c", "rho_kg_m3"]
    return header, rows


def xco2_table():
    rows = []
    for t, s in XCO2_POINTS:
        dry = float(gas.vpfactor(t, s, pressure_atmosphere=1.0))  # 1 atm - pH2O
        vp = 1.0 - dry
        for x in XCO2_VALUES:
            pco2 = x * dry
            # Cross-check with PyCO2SYS's xCO2 input path (type 9) and a fixed TA.
            r = rc.sys_default(2300.0, x, 1, 9, salinity=s, temperature=t, pressure=0.0)
            assert abs(float(r["pCO2"]) - pco2) < 1e-9 * pco2, (t, s, x, float(r["pCO2"]), pco2)
            rows.append([rc.fmt(v) for v in (x, t, s, 1.0, vp, pco2)])
    header = ["xco2_ppm", "temp_c", "salinity", "pressure_atm", "vapour_pressure_atm", "pco2_uatm"]
    return header, rows


def main():
    h, rows = density_table()
    rc.write_csv("density_reference.csv", h, rows)
    h, rows = xco2_table()
    rc.write_csv("xco2_reference.csv", h, rows)


if __name__ == "__main__":
    main()
