#!/usr/bin/env python3
# Projection reference table for calcisite's default projection method.
# Outside reference: PyCO2SYS==1.8.3.4 (PyPI), numpy. Regenerate with
#     python3 tests/reference/make_projection_reference.py
# Writes projection_reference.csv beside this file. The version is asserted at run time and the
# facts-file section 7g check runs first (refcommon.py).
"""Project two invented records' Omega_ar/pH under each SSP, every year, with PyCO2SYS.

Records (invented):
  A: TA 2290 µmol/kg, S 35.1, 27.5 °C, 2 dbar, Si 2, PO4 0.2 µmol/kg, sampled in 2024 at
     seawater pCO2 430 µatm;
  B: TA 2300 µmol/kg, S 34.8, 26.0 °C, 5 dbar, Si 1.5, PO4 0.1 µmol/kg, sampled in 2010 (before
     the SSPs split in 2015) at seawater pCO2 395 µatm.

Atmospheric CO2 (annual means, ppm), read from the repository's copy of the shared table
src/outlook/data/co2-annual.csv (sources in co2-annual.md beside it):
  observed years (1979-2025): the NOAA GML global marine-surface annual mean;
  later years y: SSP(y) - (SSP(2025) - NOAA(2025)) * max(0, 1 - (y - 2025) / 10), i.e. the
  pathway joined to the last observation with the offset fading linearly over ten years.
pCO2_air(y) = xCO2(y) * (1 atm - pH2O(T, S)), pH2O from Weiss & Price (1980) as PyCO2SYS
computes it (PyCO2SYS.gas.vpfactor returns 1 atm - pH2O).
ratio mode:    pCO2_sea(y) = pCO2_air(y) * (pCO2_rec / pCO2_air(sampling year))
additive mode: pCO2_sea(y) = pCO2_air(y) + (pCO2_rec - pCO2_air(sampling year))
Then TA + pCO2_sea(y) -> pH_T, DIC, Omega_ar, Omega_ca at in-situ T, S, P (no warming, TA fixed).
Years: every year from the sampling year to 2100, then 2150, 2200, 2250 and 2300.
"""

import csv
import os
import sys

sys.dont_write_bytecode = True  # keep tests/reference free of __pycache__
import refcommon as rc  # noqa: E402
from PyCO2SYS import gas  # noqa: E402

RECORDS = [
    dict(ta=2290.0, salinity=35.1, temp_c=27.5, pressure_dbar=2.0, silicate=2.0,
         phosphate=0.2, year=2024, pco2=430.0),
    dict(ta=2300.0, salinity=34.8, temp_c=26.0, pressure_dbar=5.0, silicate=1.5,
         phosphate=0.1, year=2010, pco2=395.0),
]
PATHWAYS = {"SSP1-1.9": 3, "SSP1-2.6": 4, "SSP2-4.5": 5, "SSP3-7.0": 6, "SSP5-8.5": 7}
FADE_YEARS = 10
HERE = os.path.dirname(os.path.abspath(__file__))
TABLE = os.path.join(HERE, "..", "..", "src", "outlook", "data", "co2-annual.csv")


def read_table():
    noaa, ssp = {}, {name: {} for name in PATHWAYS}
    with open(TABLE, newline="") as f:
        rows = list(csv.reader(f))
    for row in rows[1:]:
        year = int(row[0])
        if row[1]:
            noaa[year] = float(row[1])
        for name, col in PATHWAYS.items():
            ssp[name][year] = float(row[col])
    return noaa, ssp


def xco2(noaa, ssp, pathway, year):
    last = max(noaa)
    if year <= last:
        return noaa[year]
    offset = ssp[pathway][last] - noaa[last]
    fade = max(0.0, 1.0 - (year - last) / FADE_YEARS)
    return ssp[pathway][year] - offset * fade


def main():
    rc.check_facts_7g()
    noaa, ssp = read_table()
    assert min(noaa) == 1979 and max(noaa) == 2025, (min(noaa), max(noaa))
    rows = []
    for r in RECORDS:
        # 1 atm minus the water vapour pressure (atm), Weiss & Price (1980), PyCO2SYS.gas.vpfactor.
        dry = float(gas.vpfactor(r["temp_c"], r["salinity"], pressure_atmosphere=1.0))
        years = list(range(r["year"], 2101)) + [2150, 2200, 2250, 2300]
        for mode in ("ratio", "additive"):
            for pathway in PATHWAYS:
                air_sample = xco2(noaa, ssp, pathway, r["year"]) * dry
                for y in years:
                    x = xco2(noaa, ssp, pathway, y)
                    air = x * dry
                    if mode == "ratio":
                        sea = air * (r["pco2"] / air_sample)
                    else:
                        sea = air + (r["pco2"] - air_sample)
                    res = rc.sys_default(
                        r["ta"], sea, 1, 4, salinity=r["salinity"], temperature=r["temp_c"],
                        pressure=r["pressure_dbar"], total_silicate=r["silicate"],
                        total_phosphate=r["phosphate"],
                    )
                    if y == r["year"]:
                        assert abs(sea - r["pco2"]) < 1e-9, "sampling-year pCO2 must equal the record's"
                    rows.append([
                        mode, pathway, str(r["year"]), str(y), rc.fmt(x), rc.fmt(air),
                        rc.fmt(sea), rc.fmt(r["ta"]), rc.fmt(res["pH_total"]), rc.fmt(res["dic"]),
                        rc.fmt(res["saturation_aragonite"]), rc.fmt(res["saturation_calcite"]),
                    ])
    # Sanity: pathways are listed in increasing 2100 CO2, so 2100 Omega_ar must fall strictly.
    for mode in ("ratio", "additive"):
        for sy in ("2024", "2010"):
            om = [float(row[10]) for row in rows if row[0] == mode and row[2] == sy and row[3] == "2100"]
            assert all(a > b for a, b in zip(om, om[1:])), (mode, sy, om)
    header = ["mode", "pathway", "sample_year", "year", "xco2_ppm", "pco2_air", "pco2_sea", "ta",
              "ph_t", "dic", "omega_ar", "omega_ca"]
    rc.write_csv("projection_reference.csv", header, rows)
    print(f"{len(rows)} rows")


if __name__ == "__main__":
    main()
