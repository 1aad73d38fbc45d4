#!/usr/bin/env python3
"""Writes lagoon-offshore.csv: INVENTED offshore source-water bottles for the Tala Vesi
back-reef lagoon demo site (station OFF1, outside the western rim of the invented atoll).

Nothing here was measured. The numbers are made up so that the demo shows the
"source offsets" projection rule and the comparison of the three rules:
offshore surface water with little diel change (TA near 2300 umol/kg, DIC near 1975
umol/kg), a seasonal cycle of temperature and DIC, one bottle a month near 10:00 and, in
four months, a dawn and an afternoon bottle as well. Deterministic (fixed seed); standard
library only.

    python3 demo-data/generate_offshore.py
"""

import math
import os
import random

HERE = os.path.dirname(os.path.abspath(__file__))
SEED = 20240917


def main():
    rng = random.Random(SEED)
    rows = []
    for month in range(1, 13):
        # Warmest in early March, coolest in early September (as the rest of the scenario).
        phase = 2 * math.pi * (month - 3) / 12
        temp = 27.8 + 1.6 * math.cos(phase)
        dic_mean = 1976.0 - 9.0 * math.cos(phase)
        hours = [10]
        if month in (1, 4, 7, 10):
            hours = [5, 10, 15]
        for hour in hours:
            minute = rng.randrange(0, 50)
            diel = -3.0 * math.sin(2 * math.pi * (hour - 9) / 24)
            rows.append([
                f"2024-{month:02d}-14T{hour:02d}:{minute:02d}:00-08:00",
                "OFF1",
                f"{temp + 0.3 * math.sin(2 * math.pi * (hour - 9) / 24) + rng.gauss(0, 0.05):.2f}",
                f"{35.20 + rng.gauss(0, 0.02):.3f}",
                "1.0",
                f"{2300.0 + rng.gauss(0, 2.0):.1f}",
                f"{dic_mean + diel + rng.gauss(0, 2.0):.1f}",
                f"{1.2 + rng.gauss(0, 0.1):.2f}",
                f"{0.12 + rng.gauss(0, 0.01):.2f}",
            ])
    header = "date,station,temp_c,salinity,depth_m,ta,dic,silicate,phosphate"
    path = os.path.join(HERE, "lagoon-offshore.csv")
    with open(path, "w", newline="\n") as f:
        f.write(header + "\n")
        for r in rows:
            f.write(",".join(r) + "\n")
    print(f"{len(rows)} rows -> {path}")


if __name__ == "__main__":
    main()
