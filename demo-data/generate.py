#!/usr/bin/env python3
# Generates calcisite's INVENTED demo data set (the fictional "Tala Vesi" atoll).
# Needs: numpy, PyCO2SYS==1.8.3.4 and gsw==3.6.23 (all PyPI). Regenerate with
#     python3 demo-data/generate.py
# Output is deterministic (fixed seed): running it again rewrites byte-identical files.
"""Invented water-chemistry records for three fictional candidate reef-restoration sites.

Nothing here is a measurement. The atoll, its sites, stations and numbers are made up; the
chemistry is made internally consistent by building TA from a salinity relation and pCO2/DIC
from seasonal (and, in the lagoon, diel) drivers, then computing every derived column with
PyCO2SYS (calcisite's default method set, see tests/reference/README.md) before adding
measurement noise. See demo-data/README.md for the scenario and every column.
"""

import math
import os
import sys
from datetime import datetime, timedelta, timezone

try:
    import numpy as np
    import PyCO2SYS as pyco2
    import gsw
    from PyCO2SYS import gas
except ImportError as e:
    sys.exit(f"generate.py needs numpy, PyCO2SYS==1.8.3.4 and gsw==3.6.23 ({e})")

if pyco2.__version__ != "1.8.3.4" or gsw.__version__ != "3.6.23":
    sys.exit(
        f"generate.py is pinned to PyCO2SYS 1.8.3.4 and gsw 3.6.23 "
        f"(found {pyco2.__version__}, {gsw.__version__}); the files would not be reproduced"
    )

HERE = os.path.dirname(os.path.abspath(__file__))
SEED = 20240917
YEAR = 2024

# Nominal position, used only for the TEOS-10 salinity conversion of the per-litre lab file.
# It is an open-ocean point with no atoll; the atoll is fictional.
LAT, LON = -8.0, -127.0
UTC_OFFSET = timezone(timedelta(hours=-8))

# calcisite default method set as PyCO2SYS options (see tests/reference/README.md):
# Lueker 2000 K1/K2, Dickson 1990 KSO4, Perez & Fraga 1987 KF, Lee 2010 boron, CODATA 2018 R,
# total pH scale, K0/fugacity at 1 atm.
OPTS = dict(opt_k_carbonic=10, opt_k_bisulfate=1, opt_k_fluoride=2, opt_total_borate=2,
            opt_gas_constant=3, opt_pH_scale=1, opt_pressured_kCO2=0)

XCO2_2024 = 422.80  # ppm, NOAA GML global marine-surface annual mean 2024 (facts file section 5)

rng = np.random.default_rng(SEED)


def co2sys(par1, par2, t1, t2, temp, sal, pres, si, po4):
    return pyco2.sys(par1, par2, t1, t2, salinity=sal, temperature=temp, pressure=pres,
                     total_silicate=si, total_phosphate=po4, **OPTS)


# ---------------------------------------------------------------------------------------------
# Offshore (oceanic) water around the atoll: smooth seasonal cycles, southern-hemisphere timing.
# ---------------------------------------------------------------------------------------------
def day_of_year(dt):
    """Fractional day of year (1.0 = 1 Jan 00:00 local)."""
    start = datetime(dt.year, 1, 1, tzinfo=dt.tzinfo)
    return 1.0 + (dt - start).total_seconds() / 86400.0


def t_offshore(doy):
    """Surface temperature, °C: warmest early March, coolest early September, plus an invented
    2024 warm spell (about +1.2 °C at its peak on 20 March, e-folding half-width ~13 days)."""
    seasonal = 27.4 + 1.0 * np.cos(2 * np.pi * (doy - 70.0) / 366.0)
    return seasonal + 1.2 * np.exp(-0.5 * ((doy - 80.0) / 9.0) ** 2)


def s_offshore(doy):
    """Practical salinity: slightly saltier late in the dry season."""
    return 35.30 + 0.08 * np.cos(2 * np.pi * (doy - 250.0) / 366.0)


def ta_offshore(sal):
    """Total alkalinity, µmol/kg, proportional to salinity (invented nTA ~2335 at S 35)."""
    return 2355.0 * sal / 35.30


def pco2_offshore(temp, sal):
    """Seawater pCO2, µatm: tracks the 2024 atmosphere (moist air at 1 atm), a little under-
    saturated, rising ~1.5 %/°C with temperature (part of the thermal effect)."""
    air = XCO2_2024 * gas.vpfactor(temp, sal)  # Weiss & Price (1980) via PyCO2SYS
    return air * (1.0 + 0.015 * (temp - 27.4)) - 10.0


def monthly_dates():
    """One sampling day per month (day 8-20) at ~mid-morning local time."""
    out = []
    for m in range(1, 13):
        d = int(rng.integers(8, 21))
        minute = int(rng.integers(0, 42)) * 5  # 08:00-11:25
        out.append(datetime(YEAR, m, d, 8, 0, tzinfo=UTC_OFFSET) + timedelta(minutes=minute))
    return out


def bottle_rows(dates, stations, upwelling):
    """True and measured bottle values for the fore-reef (upwelling=False) or the pass site."""
    rows = []
    for dt in dates:
        doy = day_of_year(dt)
        # Upwelling index 0..~1: trade-wind upwelling peaking in late August (invented).
        u_season = math.exp(-0.5 * ((doy - 240.0) / 38.0) ** 2) if upwelling else 0.0
        u_event = float(np.clip(u_season * (1.0 + rng.normal(0.0, 0.10)), 0.0, 1.1))
        for k, (stn, depth) in enumerate(stations):
            u = u_event * (1.0 + 0.03 * k)  # deeper stations see a little more upwelled water
            temp = t_offshore(doy) - 0.02 * depth - 2.0 * u - 0.02 * depth * u + rng.normal(0, 0.12)
            sal = s_offshore(doy) + 0.12 * u + rng.normal(0, 0.02)
            ta = ta_offshore(sal) + 12.0 * u + rng.normal(0, 3.0)
            pco2 = pco2_offshore(temp, sal) + 165.0 * u + rng.normal(0, 4.0)
            si = 1.3 + 4.5 * u + rng.normal(0, 0.15)
            po4 = 0.20 + 0.55 * u + rng.normal(0, 0.03)
            rows.append(dict(dt=dt + timedelta(minutes=20 * k), station=stn, depth=depth, temp=temp, sal=sal, ta_true=ta,
                             pco2_true=pco2, si=max(si, 0.05), po4=max(po4, 0.01), u=u))
    temp = np.array([r["temp"] for r in rows])
    sal = np.array([r["sal"] for r in rows])
    dep = np.array([float(r["depth"]) for r in rows])
    si = np.array([r["si"] for r in rows])
    po4 = np.array([r["po4"] for r in rows])
    res = co2sys(np.array([r["ta_true"] for r in rows]), np.array([r["pco2_true"] for r in rows]),
                 1, 4, temp, sal, dep, si, po4)
    for i, r in enumerate(rows):
        r["dic_true"] = float(res["dic"][i])
        # Measurement noise: TA and DIC ~ ±2 µmol/kg (facts file section 2, "climate" quality).
        r["ta"] = round(r["ta_true"] + rng.normal(0, 2.0), 1)
        r["dic"] = round(r["dic_true"] + rng.normal(0, 2.0), 1)
        r["temp"] = round(r["temp"], 2)
        r["sal"] = round(r["sal"], 3)
        r["si"] = round(r["si"], 2)
        r["po4"] = round(r["po4"], 2)
    return rows


# ---------------------------------------------------------------------------------------------
# Back-reef lagoon: hourly truth with reef metabolism (diel DIC/TA swings), rain, tides.
# ---------------------------------------------------------------------------------------------
START = datetime(YEAR, 1, 1, 0, 0, tzinfo=UTC_OFFSET)
N_HOURS = 366 * 24
N_DAYS = 366

# Daily metabolic intensity: AR(1) "weather" factor (cloud, wind) around 1.
_daily = np.empty(N_DAYS + 2)
_daily[0] = 1.0
for _i in range(1, N_DAYS + 2):
    _daily[_i] = 1.0 + 0.7 * (_daily[_i - 1] - 1.0) + rng.normal(0, 0.14)
_daily = np.clip(_daily, 0.45, 1.6)

# Rain events (mostly in the wet season, Dec-Apr): (start hour, salinity drop).
_rain = []
for _ in range(9):
    month_pick = int(rng.choice([1, 1, 2, 2, 3, 3, 4, 11, 12]))
    day = int(rng.integers(1, 28))
    h0 = (datetime(YEAR, month_pick, day, int(rng.integers(0, 24)), tzinfo=UTC_OFFSET) - START)
    _rain.append((h0.total_seconds() / 3600.0, float(rng.uniform(0.3, 0.9))))

# Hourly temperature weather noise (AR(1), hour-to-hour correlation 0.97).
_tnoise = np.empty(N_HOURS + 48)
_tnoise[0] = 0.0
for _i in range(1, len(_tnoise)):
    _tnoise[_i] = 0.97 * _tnoise[_i - 1] + rng.normal(0, 0.035)


def lagoon_truth(hours, amp_scale=1.0, depth_mean=2.0):
    """True lagoon state at `hours` since 2024-01-01T00:00 local (array)."""
    hours = np.asarray(hours, dtype=float)
    doy = 1.0 + hours / 24.0
    hod = np.mod(hours, 24.0)
    # offshore source water
    t_off = t_offshore(doy)
    s_off = s_offshore(doy)
    ta_off = ta_offshore(s_off)
    # metabolic amplitude: weather x spring-neap flushing x seasonal light
    daily = np.interp(hours / 24.0, np.arange(N_DAYS + 2) - 0.5, _daily)
    springneap = 1.0 + 0.25 * np.sin(2 * np.pi * hours / (14.765 * 24.0))
    light = 1.0 + 0.15 * np.cos(2 * np.pi * (doy - 355.0) / 366.0)
    amp = amp_scale * daily * springneap * light
    # diel shape: highest DIC (and TA) just before dawn, lowest late afternoon
    f = np.cos(2 * np.pi * (hod - 5.0) / 24.0)
    # salinity: evaporation in the shallow lagoon, freshening after rain (4-day recovery)
    rain = np.zeros_like(hours)
    for h0, drop in _rain:
        dt = hours - h0
        rain += np.where(dt >= 0, drop * np.exp(-np.clip(dt, 0, None) / 96.0), 0.0)
    sal = s_off + 0.25 + 0.12 * np.cos(2 * np.pi * (doy - 250.0) / 366.0) - rain
    dil = sal / s_off  # rain dilutes TA and DIC with the salt; evaporation concentrates them
    temp = (t_off + 0.5 + 0.6 * np.sqrt(amp) * np.cos(2 * np.pi * (hod - 15.0) / 24.0)
            + np.interp(hours, np.arange(len(_tnoise)), _tnoise))
    depth = depth_mean + 0.35 * np.sin(2 * np.pi * hours / 12.42) + 0.08 * np.sin(2 * np.pi * hours / 23.93 + 1.0)
    pco2_off = pco2_offshore(t_off, s_off)
    dic_off = np.asarray(co2sys(ta_off, pco2_off, 1, 4, t_off, s_off, 0.0, 1.3, 0.2)["dic"])
    ta = ta_off * dil - 30.0 + 18.0 * amp * f  # net calcification draws TA down by day
    dic = dic_off * dil - 20.0 + 90.0 * amp * f  # photosynthesis by day, respiration by night
    return dict(temp=temp, sal=sal, ta=ta, dic=dic, depth=depth, amp=amp)


def lagoon_sensor():
    hours = np.arange(N_HOURS, dtype=float)
    tr = lagoon_truth(hours)
    si, po4 = 2.0, 0.15
    res = co2sys(tr["ta"], tr["dic"], 1, 2, tr["temp"], tr["sal"], tr["depth"], si, po4)
    ph = np.asarray(res["pH_total"]) + rng.normal(0, 0.003, N_HOURS)  # sensor pH noise
    pco2 = np.asarray(res["pCO2"]) * (1.0 + rng.normal(0, 0.005, N_HOURS))  # ~0.5 % pCO2
    om = np.asarray(res["saturation_aragonite"])
    # Sensor serviced 10-12 June: no data for those three days.
    gap0 = (datetime(YEAR, 6, 10, tzinfo=UTC_OFFSET) - START).total_seconds() / 3600.0
    keep = (hours < gap0) | (hours >= gap0 + 72)
    rows = []
    for i in np.nonzero(keep)[0]:
        dt = START + timedelta(hours=float(hours[i]))
        rows.append([dt.isoformat(), "LG1", f"{tr['temp'][i]:.2f}", f"{tr['sal'][i]:.2f}",
                     f"{tr['depth'][i]:.2f}", f"{ph[i]:.4f}", f"{pco2[i]:.1f}"])
    return rows, om[keep], tr, keep


def lagoon_bottles():
    """Monthly bottles: LG1 before dawn (05:30) and mid-afternoon (15:30); LG2 at ~10:30."""
    specs = []
    for m in range(1, 13):
        d = int(rng.integers(8, 21))
        for stn, hh, mm, depth, amp in (("LG1", 5, 30, 2.0, 1.0), ("LG1", 15, 30, 2.0, 1.0),
                                        ("LG2", 10, 30, 3.0, 0.7)):
            dt = datetime(YEAR, m, d, hh, mm, tzinfo=UTC_OFFSET) + timedelta(minutes=int(rng.integers(-10, 11)))
            specs.append((dt, stn, depth, amp))
    specs.sort(key=lambda s: (s[0], s[1]))
    rows = []
    for dt, stn, depth, amp in specs:
        h = (dt - START).total_seconds() / 3600.0
        tr = lagoon_truth([h], amp_scale=amp, depth_mean=depth)
        rows.append(dict(dt=dt, station=stn, depth=round(float(tr["depth"][0]), 1),
                         temp=round(float(tr["temp"][0]) + rng.normal(0, 0.02), 2),
                         sal=round(float(tr["sal"][0]) + rng.normal(0, 0.005), 3),
                         ta=round(float(tr["ta"][0]) + rng.normal(0, 2.0), 1),
                         dic=round(float(tr["dic"][0]) + rng.normal(0, 2.0), 1),
                         si=round(2.0 + rng.normal(0, 0.3), 2),
                         po4=round(0.15 + rng.normal(0, 0.03), 2)))
    return rows


# ---------------------------------------------------------------------------------------------
# Writing and checking
# ---------------------------------------------------------------------------------------------
def write_csv(name, header, rows):
    path = os.path.join(HERE, name)
    tmp = path + ".tmp"
    with open(tmp, "w", newline="\n", encoding="utf-8") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            assert len(r) == len(header)
            f.write(",".join(str(v) for v in r) + "\n")
    os.replace(tmp, path)
    size = os.path.getsize(path)
    assert size < 2_000_000, f"{name} is {size} bytes, over the 2 MB limit"
    print(f"wrote {name}: {len(rows)} rows, {size} bytes")


CANON = ["date", "station", "temp_c", "salinity", "depth_m", "ta", "dic", "silicate", "phosphate"]


def canon_row(r, with_time=False):
    d = r["dt"].isoformat() if with_time else r["dt"].date().isoformat()
    return [d, r["station"], f"{r['temp']:.2f}", f"{r['sal']:.3f}", f"{r['depth']:.1f}",
            f"{r['ta']:.1f}", f"{r['dic']:.1f}", f"{r['si']:.2f}", f"{r['po4']:.2f}"]


def omega_of(rows):
    a = {k: np.array([float(r[k]) for r in rows]) for k in ("ta", "dic", "temp", "sal", "depth", "si", "po4")}
    res = co2sys(a["ta"], a["dic"], 1, 2, a["temp"], a["sal"], a["depth"], a["si"], a["po4"])
    return res


def main():
    # Site (a): windward fore-reef, three stations.
    fr = bottle_rows(monthly_dates(), [("FR1", 5), ("FR2", 10), ("FR3", 15)], upwelling=False)
    # Site (b): southern pass with seasonal upwelling, three stations.
    up_dates = monthly_dates()
    up = bottle_rows(up_dates, [("UP1", 6), ("UP2", 12), ("UP3", 18)], upwelling=True)
    # Site (c): back-reef lagoon.
    sensor_rows, sensor_om, _, _ = lagoon_sensor()
    lg = lagoon_bottles()

    write_csv("forereef-bottles.csv", CANON, [canon_row(r) for r in fr])
    write_csv("upwelling-bottles.csv", CANON, [canon_row(r) for r in up])

    # Site (b) again, as a lab would send it: other headers, µmol per litre, pH on the seawater
    # scale, day-first local date-times. Same bottles as upwelling-bottles.csv.
    up_res = omega_of(up)
    lab_rows = []
    for i, r in enumerate(up):
        sa = gsw.SA_from_SP(r["sal"], r["depth"], LON, LAT)
        ct = gsw.CT_from_t(sa, r["temp"], r["depth"])
        rho = float(gsw.rho(sa, ct, r["depth"]))  # in-situ TEOS-10 density, kg/m3
        r["rho"] = rho
        ta_l = r["ta"] * rho / 1000.0
        lab_rows.append([r["station"], r["dt"].strftime("%d/%m/%Y %H:%M"), f"{r['depth']:.1f}",
                         f"{r['temp']:.2f}", f"{r['sal']:.3f}", f"{ta_l:.1f}",
                         f"{float(up_res['pH_sws'][i]):.4f}", f"{r['si']:.2f}", f"{r['po4']:.2f}"])
    write_csv("upwelling-bottles-lab.csv",
              ["Stn", "Sample time", "Depth (m)", "T_degC", "Sal_PSU", "TA_umol_L", "pH_SWS",
               "Silicate (umol/kg)", "Phosphate (umol/kg)"], lab_rows)

    write_csv("lagoon-sensor.csv",
              ["datetime", "station", "temp_c", "salinity", "depth_m", "ph_t", "pco2"], sensor_rows)
    write_csv("lagoon-bottles.csv", CANON, [canon_row(r, with_time=True) for r in lg])
    lg1 = [r for r in lg if r["station"] == "LG1"]
    solve_rows = []
    for r in lg1:
        tag = "dawn" if r["dt"].hour < 12 else "pm"
        solve_rows.append([f"TV-LG1-{r['dt']:%m}-{tag}"] + canon_row(r, with_time=True))
    write_csv("lagoon-bottles-solve.csv", ["sample_id"] + CANON, solve_rows)

    # ---- checks that the invented data show what the scenario says (fail loudly if not) ----
    om_fr = np.asarray(omega_of(fr)["saturation_aragonite"])
    om_up = np.asarray(up_res["saturation_aragonite"])
    up_season = np.array([7 <= r["dt"].month <= 10 for r in up])
    om_lg = np.asarray(omega_of(lg)["saturation_aragonite"])
    print(f"fore-reef Omega_ar {om_fr.min():.2f}-{om_fr.max():.2f} (mean {om_fr.mean():.2f})")
    print(f"upwelling Omega_ar Jul-Oct {om_up[up_season].min():.2f}-{om_up[up_season].max():.2f}; "
          f"other months {om_up[~up_season].min():.2f}-{om_up[~up_season].max():.2f}")
    print(f"lagoon sensor Omega_ar (from true TA/DIC) {sensor_om.min():.2f}-{sensor_om.max():.2f}, "
          f"5-95 % {np.percentile(sensor_om, 5):.2f}-{np.percentile(sensor_om, 95):.2f}")
    print(f"lagoon bottles Omega_ar {om_lg.min():.2f}-{om_lg.max():.2f}")
    assert 3.55 <= om_fr.min() and om_fr.max() <= 3.95, "fore-reef Omega_ar outside 3.6-3.9 target"
    assert 2.6 <= om_up[up_season].min() <= 2.85 and om_up[up_season].max() <= 3.4, "upwelling season target"
    assert om_up[~up_season].min() > 3.2, "upwelling site outside the season should be near oceanic"
    assert np.percentile(sensor_om, 95) - np.percentile(sensor_om, 5) > 1.2, "lagoon diel swing too small"
    # The lab file must describe the same water as the canonical file.
    ta_back = np.array([float(lab[5]) * 1000.0 / r["rho"] for r, lab in zip(up, lab_rows)])
    ph_sws = np.array([float(lab[6]) for lab in lab_rows])
    ta_can = np.array([r["ta"] for r in up])
    assert np.all(np.abs(ta_back - ta_can) < 0.06), "per-litre TA does not convert back"
    a = {k: np.array([float(r[k]) for r in up]) for k in ("dic", "temp", "sal", "depth", "si", "po4")}
    back = pyco2.sys(ta_back, ph_sws, 1, 3, salinity=a["sal"], temperature=a["temp"],
                     pressure=a["depth"], total_silicate=a["si"], total_phosphate=a["po4"],
                     **{**OPTS, "opt_pH_scale": 2})
    d_dic = np.abs(np.asarray(back["dic"]) - a["dic"])
    print(f"lab file (TA per litre + pH_SWS) re-solved: largest DIC difference {d_dic.max():.3f} µmol/kg")
    assert d_dic.max() < 0.5, "lab file does not describe the same water as upwelling-bottles.csv"


if __name__ == "__main__":
    main()
