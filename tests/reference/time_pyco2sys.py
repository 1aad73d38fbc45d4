#!/usr/bin/env python3
# Speed reference: PyCO2SYS (PyPI, pinned 1.8.3.4 for the tables here) on N TA + DIC solves with
# the calcisite default method set and buffer factors off (opt_buffers_mode=0).
# Run:   python3 tests/reference/time_pyco2sys.py [--n 200000] [--repeat 3]
# Compare side by side with:   cargo bench --bench solve
"""Time PyCO2SYS TA + DIC solves and print solves per second."""

import argparse
import sys
import time

try:
    import numpy as np
except ImportError:
    sys.exit("numpy is not installed (python3 -m pip install numpy); nothing was timed.")
try:
    import PyCO2SYS as pyco2
except ImportError:
    sys.exit(
        "PyCO2SYS is not installed, so there is nothing to time.\n"
        "Install it with: python3 -m pip install PyCO2SYS==1.8.3.4"
    )

OPTS = dict(opt_k_carbonic=10, opt_k_bisulfate=1, opt_k_fluoride=2, opt_total_borate=2,
            opt_gas_constant=3, opt_pH_scale=1, opt_pressured_kCO2=0)


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--n", type=int, default=200_000, help="number of TA+DIC solves (default 200000)")
    ap.add_argument("--repeat", type=int, default=3, help="timed repeats; the best is reported")
    ap.add_argument("--seed", type=int, default=1)
    a = ap.parse_args()
    if a.n < 1 or a.repeat < 1:
        sys.exit("--n and --repeat must be positive")
    rng = np.random.default_rng(a.seed)
    n = a.n
    t = rng.uniform(0, 35, n)
    s = rng.uniform(20, 40, n)
    p = rng.uniform(0, 100, n)
    ta = rng.uniform(1900, 2500, n)
    dic = ta * rng.uniform(0.80, 0.95, n)
    si = rng.uniform(0, 20, n)
    po4 = rng.uniform(0, 2, n)
    kw = dict(salinity=s, temperature=t, pressure=p, total_silicate=si, total_phosphate=po4,
              opt_buffers_mode=0, **OPTS)
    pyco2.sys(ta[:100], dic[:100], 1, 2, **{k: (v[:100] if isinstance(v, np.ndarray) else v)
                                             for k, v in kw.items()})  # warm-up
    best = float("inf")
    for _ in range(a.repeat):
        t0 = time.perf_counter()
        r = pyco2.sys(ta, dic, 1, 2, **kw)
        dt = time.perf_counter() - t0
        best = min(best, dt)
    om = np.asarray(r["saturation_aragonite"])
    bad = int(np.sum(~np.isfinite(om)))
    print(f"PyCO2SYS {pyco2.__version__}, numpy {np.__version__}: {n} TA+DIC solves "
          f"(constants + speciation + Omega, buffers off), best of {a.repeat}: {best:.3f} s "
          f"-> {n / best:,.0f} solves/s (single process; {bad} non-finite results)")


if __name__ == "__main__":
    main()
