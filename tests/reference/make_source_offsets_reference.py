#!/usr/bin/env python3
# Reference table for calcisite's "source offsets" projection rule (issue 12).
# Outside reference: PyCO2SYS==1.8.3.4 (PyPI), numpy. Regenerate with
#     python3 tests/reference/make_source_offsets_reference.py
# Writes source_offsets_reference.csv beside this file. The version is asserted at run time and
# the facts-file section 7g check runs first (refcommon.py).
"""Project invented reef records with their TA/DIC offsets from an offshore source water held.

Source water (invented): TA 2300, DIC 1975 umol/kg, 28.0 degC, S 35.2, 1 dbar, Si 1.2,
PO4 0.12 umol/kg, sampled in 2024. Reef records (invented), sampled in 2024 at 29.5 degC,
S 35.3, 2 dbar, Si 2.0, PO4 0.2 umol/kg:
  day   TA 2280, DIC 1880;  mean TA 2295, DIC 1990;  night TA 2310, DIC 2090 (umol/kg).

Method (written out here from the rule's description, not from calcisite's code):
  air(y, T, S) = xCO2(y) * (1 atm - pH2O(T, S))  (PyCO2SYS.gas.vpfactor; xCO2 from the
  repository's pathway table joined to the NOAA record as make_projection_reference.py does);
  the source water follows the atmosphere:
    ratio:    pCO2_src(y) = air_src(y) * pCO2_src / air_src(2024)
    additive: pCO2_src(y) = air_src(y) + (pCO2_src - air_src(2024));
  DIC_src(y) from TA_src and pCO2_src(y) at the source's T, S, P (no warming);
  dTA = TA_reef - TA_src, dDIC = DIC_reef - DIC_src (both at sampling);
  reef(y) from TA_src + dTA and DIC_src(y) + dDIC at the reef record's T, S, P.
Years 2024, 2030, 2040, ..., 2100 under SSP2-4.5 and SSP5-8.5.
"""

import sys

sys.dont_write_bytecode = True  # keep tests/reference free of __pycache__
import refcommon as rc  # noqa: E402
from make_projection_reference import read_table, xco2  # noqa: E402
from PyCO2SYS import gas  # noqa: E402

SOURCE = dict(ta=2300.0, dic=1975.0, temperature=28.0, salinity=35.2, pressure=1.0,
              total_silicate=1.2, total_phosphate=0.12)
REEF_CONDITIONS = dict(temperature=29.5, salinity=35.3, pressure=2.0, total_silicate=2.0,
                       total_phosphate=0.2)
REEF = [("day", 2280.0, 1880.0), ("mean", 2295.0, 1990.0), ("night", 2310.0, 2090.0)]
PATHWAYS = ["SSP2-4.5", "SSP5-8.5"]
YEARS = [2024] + list(range(2030, 2101, 10))
SAMPLE_YEAR = 2024


def conds(d):
    return {k: v for k, v in d.items() if k not in ("ta", "dic")}


def main():
    rc.check_facts_7g()
    noaa, ssp = read_table()
    src_now = rc.sys_default(SOURCE["ta"], SOURCE["dic"], 1, 2, **conds(SOURCE))
    src_pco2 = float(src_now["pCO2"])
    dry_src = float(gas.vpfactor(SOURCE["temperature"], SOURCE["salinity"], pressure_atmosphere=1.0))
    rows = []
    for follows in ("ratio", "additive"):
        for pathway in PATHWAYS:
            air_sample = xco2(noaa, ssp, pathway, SAMPLE_YEAR) * dry_src
            for name, ta, dic in REEF:
                reef_now = rc.sys_default(ta, dic, 1, 2, **REEF_CONDITIONS)
                d_ta = ta - SOURCE["ta"]
                d_dic = dic - SOURCE["dic"]
                for y in YEARS:
                    air = xco2(noaa, ssp, pathway, y) * dry_src
                    if follows == "ratio":
                        p_src = air * (src_pco2 / air_sample)
                    else:
                        p_src = air + (src_pco2 - air_sample)
                    src_y = rc.sys_default(SOURCE["ta"], p_src, 1, 4, **conds(SOURCE))
                    reef_y = rc.sys_default(SOURCE["ta"] + d_ta, float(src_y["dic"]) + d_dic, 1, 2,
                                            **REEF_CONDITIONS)
                    if y == SAMPLE_YEAR:
                        assert abs(float(reef_y["dic"]) - dic) < 1e-6
                        assert abs(float(reef_y["pCO2"]) - float(reef_now["pCO2"])) < 1e-6
                    rows.append([
                        follows, pathway, name, str(y), rc.fmt(src_pco2), rc.fmt(float(reef_now["pCO2"])),
                        rc.fmt(p_src), rc.fmt(reef_y["alkalinity"]), rc.fmt(reef_y["dic"]),
                        rc.fmt(reef_y["pCO2"]), rc.fmt(reef_y["pH_total"]),
                        rc.fmt(reef_y["saturation_aragonite"]),
                    ])
    # Sanity (buffer theory): under SSP5-8.5 the night-day pCO2 swing widens from 2024 to 2100.
    def swing(year):
        at = {r[2]: float(r[9]) for r in rows
              if r[0] == "ratio" and r[1] == "SSP5-8.5" and r[3] == str(year)}
        return at["night"] - at["day"]
    assert swing(2100) > 2.0 * swing(2024), (swing(2024), swing(2100))
    header = ["follows", "pathway", "record", "year", "source_pco2_sample", "reef_pco2_sample",
              "source_pco2", "ta", "dic", "pco2", "ph_t", "omega_ar"]
    rc.write_csv("source_offsets_reference.csv", header, rows)


if __name__ == "__main__":
    main()
