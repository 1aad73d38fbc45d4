#!/usr/bin/env python3
# Generates the INVENTED temperature-logger records of calcisite's demo atoll (the fictional
# "Tala Vesi"). Pure Python 3, no packages. Regenerate with
#     python3 demo-data/generate_temperature.py
# Output is deterministic (fixed seed): running it again rewrites byte-identical files.
"""Invented water-temperature records, 1 October 2021 to 31 December 2024, for the three demo
sites. Nothing here is a measurement.

The offshore surface temperature follows the same seasonal cycle and 2024 warm spell as the
chemistry records made by generate.py (warmest early March, coolest early September), so the
loggers agree with the temperatures in the bottle and sensor files. Added for the thermal-stress
outlook: an invented marine heatwave in early 2022 (about +2.4 °C at its peak on 15 March),
strongest in the shallow lagoon, damped at the pass where cool upwelled water mixes in.

- forereef-temperature.csv: daily means from a fore-reef logger at 8 m (date, temp_c).
- lagoon-temperature.csv: hourly readings from a lagoon logger at 2 m with the day-night
  heating cycle (datetime with the site's UTC offset, temp_c).
- pass-temperature.csv: daily means from a logger in the upwelling pass (date, temp_c).
"""

import math
import os
import random
from datetime import datetime, timedelta, timezone

HERE = os.path.dirname(os.path.abspath(__file__))
SEED = 20211001
START = datetime(2021, 10, 1, tzinfo=timezone(timedelta(hours=-8)))
END = datetime(2024, 12, 31, 23, tzinfo=timezone(timedelta(hours=-8)))

rng = random.Random(SEED)


def day_of_year(dt):
    start = datetime(dt.year, 1, 1, tzinfo=dt.tzinfo)
    return 1.0 + (dt - start).total_seconds() / 86400.0


def t_offshore(dt):
    """°C: the seasonal cycle and 2024 warm spell of generate.py, plus the 2022 heatwave."""
    doy = day_of_year(dt)
    t = 27.4 + 1.0 * math.cos(2 * math.pi * (doy - 70.0) / 366.0)
    if dt.year == 2024:
        t += 1.2 * math.exp(-0.5 * ((doy - 80.0) / 9.0) ** 2)
    if dt.year == 2022:
        t += 2.4 * math.exp(-0.5 * ((doy - 74.0) / 20.0) ** 2)
    return t


class Weather:
    """Day-to-day weather noise: AR(1) with lag-one correlation `r` and standard deviation `sd`."""

    def __init__(self, r, sd):
        self.r, self.sd, self.x = r, sd, 0.0

    def step(self):
        self.x = self.r * self.x + math.sqrt(1 - self.r ** 2) * rng.gauss(0.0, self.sd)
        return self.x


def upwelling(dt):
    """0-1 strength of cool water entering the pass: dry-season events (invented)."""
    doy = day_of_year(dt)
    season = max(0.0, math.cos(2 * math.pi * (doy - 240.0) / 366.0))
    return season * (0.5 + 0.5 * math.sin(2 * math.pi * doy / 13.0)) ** 2


def days():
    d = START
    while d <= END:
        yield d
        d += timedelta(days=1)


def write(name, header, rows):
    path = os.path.join(HERE, name)
    with open(path, "w", newline="\n") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            f.write(",".join(r) + "\n")


def main():
    w = Weather(0.85, 0.15)
    fore = []
    for d in days():
        noon = d + timedelta(hours=12)
        fore.append([d.date().isoformat(), f"{t_offshore(noon) - 0.15 + w.step():.2f}"])
    write("forereef-temperature.csv", ["date", "temp_c"], fore)

    w = Weather(0.85, 0.12)
    pas = []
    for d in days():
        noon = d + timedelta(hours=12)
        t = t_offshore(noon) - 0.3 * (t_offshore(noon) - 27.4) * (1 if d.year == 2022 else 0)
        t -= 2.0 * upwelling(noon)
        pas.append([d.date().isoformat(), f"{t + w.step():.2f}"])
    write("pass-temperature.csv", ["date", "temp_c"], pas)

    w = Weather(0.97, 0.2)
    lag = []
    h = START
    while h <= END:
        hod = h.hour
        # Shallow water heats by day: +0.5 °C on average, a 0.6 °C diel swing peaking at 15:00,
        # and heatwaves amplified by a quarter in the still lagoon.
        anomaly = t_offshore(h) - (27.4 + 1.0 * math.cos(2 * math.pi * (day_of_year(h) - 70.0) / 366.0))
        t = t_offshore(h) + 0.5 + 0.25 * anomaly + 0.6 * math.cos(2 * math.pi * (hod - 15.0) / 24.0)
        lag.append([h.isoformat(), f"{t + w.step():.2f}"])
        h += timedelta(hours=1)
    write("lagoon-temperature.csv", ["datetime", "temp_c"], lag)


if __name__ == "__main__":
    main()
