#!/usr/bin/env python3
# Projection reference table for calcisite's default projection method.
# Outside reference: PyCO2SYS==1.8.3.4 (PyPI), numpy. Regenerate with
#     python3 tests/reference/make_projection_reference.py
# Writes projection_reference.csv beside this file. The version is asserted at run time and the
# facts-file section 7g check runs first (refcommon.py).
"""Project one invented record's Omega_ar/pH under each SSP with PyCO2SYS.

Record (invented): TA 2290 µmol/kg, S 35.1, 27.5 °C, 2 dbar, Si 2, PO4 0.2 µmol/kg, sampled in
2024 with seawater pCO2 430 µatm.

pCO2_air(y) = xCO2(y) * (1 atm - pH2O(T, S)), pH2O from Weiss & Price (1980) as PyCO2SYS
computes it (PyCO2SYS.gas.vpfactor returns 1 atm - pH2O).
xCO2(2024) = 422.80 ppm (NOAA GML global marine-surface annual mean, facts file section 5).
xCO2(y), y >= 2030: SSP concentrations of Meinshausen et al. (2020) (facts file section 5, values
read from WRF run/CAMtr_volume_mixing_ratio.SSP*), linearly interpolated between listed years.
ratio mode:    pCO2_sea(y) = pCO2_air(y) * (430 / pCO2_air(2024))
additive mode: pCO2_sea(y) = pCO2_air(y) + (430 - pCO2_air(2024))
Then TA + pCO2_sea(y) -> pH_T, DIC, Omega_ar, Omega_ca at in-situ T, S, P (no warming, TA fixed).
"""

import sys

import numpy as np

sys.dont_write_bytecode = True  # keep tests/reference free of __pycache__
import refcommon as rc  # noqa: E402
from PyCO2SYS import gas

RECORD = dict(ta=2290.0, salinity=35.1, temp_c=27.5, pressure_dbar=2.0, silicate=2.0,
              phosphate=0.2, year=2024, pco2=430.0)
NOAA_2024 = 422.80

SSP_YEARS = [2015, 2020, 2030, 2040, 2050, 2060, 2070, 2080, 2090, 2100]
SSP = {
    "SSP1-1.9": [399.949, 414.214, 434.324, 440.179, 437.632, 431.314, 423.877, 415.288, 405.255, 393.506],
    "SSP1-2.6": [399.949, 414.232, 439.564, 458.201, 469.310, 473.750, 473.110, 467.390, 456.924, 445.625],
    "SSP2-4.5": [399.949, 414.390, 444.143, 475.336, 506.875, 537.085, 563.925, 585.074, 597.735, 602.782],
    "SSP3-7.0": [399.948, 415.155, 451.164, 493.221, 540.581, 593.230, 651.544, 716.008, 787.488, 867.191],
    "SSP5-8.5": [399.949, 414.891, 451.515, 500.019, 562.784, 643.041, 743.662, 864.369, 998.321, 1135.210],
}
# Decades 2030..2100 (listed values) plus two mid-decade years that exercise interpolation.
YEARS = [2024, 2030, 2035, 2040, 2050, 2060, 2065, 2070, 2080, 2090, 2100]


def xco2(pathway, year):
    if year == RECORD["year"]:
        return NOAA_2024
    return float(np.interp(year, SSP_YEARS, SSP[pathway]))


def main():
    rc.check_facts_7g()
    r = RECORD
    # 1 atm minus the water vapour pressure (atm), Weiss & Price (1980), PyCO2SYS.gas.vpfactor.
    dry = float(gas.vpfactor(r["temp_c"], r["salinity"], pressure_atmosphere=1.0))
    pair_2024 = NOAA_2024 * dry
    rows = []
    for mode in ("ratio", "additive"):
        for pathway in SSP:
            for y in YEARS:
                x = xco2(pathway, y)
                air = x * dry
                if mode == "ratio":
                    sea = air * (r["pco2"] / pair_2024)
                else:
                    sea = air + (r["pco2"] - pair_2024)
                res = rc.sys_default(
                    r["ta"], sea, 1, 4, salinity=r["salinity"], temperature=r["temp_c"],
                    pressure=r["pressure_dbar"], total_silicate=r["silicate"],
                    total_phosphate=r["phosphate"],
                )
                if y == r["year"]:
                    assert abs(sea - r["pco2"]) < 1e-9, "sampling-year pCO2 must equal the record's"
                rows.append([
                    mode, pathway, str(y), rc.fmt(x), rc.fmt(air), rc.fmt(sea), rc.fmt(r["ta"]),
                    rc.fmt(res["pH_total"]), rc.fmt(res["dic"]),
                    rc.fmt(res["saturation_aragonite"]), rc.fmt(res["saturation_calcite"]),
                ])
    # Sanity: pathways are listed in increasing 2100 CO2, so 2100 Omega_ar must fall strictly.
    for mode in ("ratio", "additive"):
        om2100 = [float(row[9]) for row in rows if row[0] == mode and row[2] == "2100"]
        assert all(a > b for a, b in zip(om2100, om2100[1:])), (mode, om2100)
    print(f"1 atm - pH2O at {r['temp_c']} °C, S {r['salinity']}: {dry!r}; pCO2_air(2024) {pair_2024!r}")
    header = ["mode", "pathway", "year", "xco2_ppm", "pco2_air", "pco2_sea", "ta", "ph_t", "dic",
              "omega_ar", "omega_ca"]
    rc.write_csv("projection_reference.csv", header, rows)


if __name__ == "__main__":
    main()
