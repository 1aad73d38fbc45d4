#!/usr/bin/env python3
"""Wall time and peak memory of whole calcisite runs at scale (a bench script, not a test).

Usage:  python3 benches/scale.py [--rows 1000000] [--bin target/release/calcisite] [what ...]
  what: solve (1,000,000-row bottle CSV), check (1,000,000-row sensor series),
        project (one demo site), report (three-site demo comparison), batch (50 sites),
        many (--sites generated invented sites, default 1,000, from benches/make_sites.py:
        `report --site-list` with the ranking CSV, 10 sites in detail and one PDF per site)
Build first:  cargo build --release
Each figure is the median of --repeat runs; CPU is user + sys time; peak memory is the
child's maximum RSS. Target for solve: at least 1,500,000 rows/s on the 2-core project
machine when idle (0.67 s wall, and so at most about 1.3 s CPU, per 1,000,000 rows).
Generated inputs go to a temporary folder that is removed afterwards.
"""
import argparse, math, os, shutil, statistics, subprocess, sys, tempfile, time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


# A fresh interpreter per run, so that its RUSAGE_CHILDREN peak is this run's alone.
PROBE = (
    "import resource, subprocess, sys, time\n"
    "t0 = time.perf_counter()\n"
    "p = subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)\n"
    "dt = time.perf_counter() - t0\n"
    "sys.stderr.write(p.stderr.decode(errors='replace'))\n"
    "u = resource.getrusage(resource.RUSAGE_CHILDREN)\n"
    "print(dt, u.ru_maxrss, p.returncode, u.ru_utime + u.ru_stime)\n"
)


def run(cmd):
    """Run cmd; return (seconds, peak RSS in MB, exit code, stderr, CPU seconds user+sys)."""
    p = subprocess.run([sys.executable, "-c", PROBE, *cmd], capture_output=True, text=True)
    dt, rss_kb, code, cpu = p.stdout.split()
    return float(dt), int(rss_kb) / 1024.0, int(code), p.stderr, float(cpu)


def bottle_rows(path, n):
    with open(path, "w") as f:
        f.write("date,station,temp_c,salinity,depth_m,ta,dic,silicate,phosphate\n")
        for i in range(n):
            x = (i * 0.6180339887) % 1.0
            y = (i * 0.4142135623) % 1.0
            t = 24.0 + 6.0 * x
            s = 34.0 + 2.0 * y
            ta = 2250.0 + 100.0 * y
            dic = ta * (0.86 + 0.05 * x)
            f.write(f"2024-01-01,S{i % 7},{t:.3f},{s:.3f},{(i % 20):d},{ta:.2f},{dic:.2f},2.0,0.2\n")


def sensor_site(folder, n):
    """A site whose record is an n-row sub-daily sensor series (pH + pCO2 + T + S)."""
    os.makedirs(folder, exist_ok=True)
    csv_path = os.path.join(folder, "sensor.csv")
    start = 1704067200  # 2024-01-01T00:00:00Z
    step = max(1, int(365 * 86400 / n))
    with open(csv_path, "w") as f:
        f.write("datetime,station,temp_c,salinity,depth_m,ta,ph_t\n")
        for i in range(n):
            ts = start + i * step
            day = (ts - start) / 86400.0
            hour = (ts % 86400) / 3600.0
            t = 27.0 + 1.5 * math.sin(2 * math.pi * day / 365.0) + 0.8 * math.sin(2 * math.pi * hour / 24.0)
            ph = 8.02 + 0.12 * math.sin(2 * math.pi * (hour - 9) / 24.0)
            stamp = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(ts))
            f.write(f"{stamp},L1,{t:.3f},35.10,2.0,2290.0,{ph:.4f}\n")
    toml_path = os.path.join(folder, "site.toml")
    src = os.path.join(ROOT, "sites", "tala-vesi-forereef.toml")
    with open(src) as fsrc:
        text = fsrc.read()
    # Reuse the demo site's settings but point its record list at the sensor file.
    head = text.split("[[records]]")[0]
    with open(toml_path, "w") as f:
        f.write(head)
        f.write('\n[[records]]\npath = "sensor.csv"\nkind = "sensor"\n')
    return toml_path


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("what", nargs="*", default=["solve", "project", "report"])
    ap.add_argument("--rows", type=int, default=1_000_000)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--sites", type=int, default=1000, help="sites of the `many` case")
    ap.add_argument("--bin", default=os.path.join(os.environ.get("CARGO_TARGET_DIR", os.path.join(ROOT, "target")), "release", "calcisite"))
    a = ap.parse_args()
    if not os.path.exists(a.bin):
        sys.exit(f"{a.bin} not found: run `cargo build --release` first (or pass --bin)")
    tmp = tempfile.mkdtemp(prefix="calcisite-scale-")
    try:
        sites = sorted(os.path.join(ROOT, "sites", f) for f in os.listdir(os.path.join(ROOT, "sites")) if f.endswith(".toml"))
        for what in a.what:
            if what == "solve":
                inp = os.path.join(tmp, "bottles.csv")
                bottle_rows(inp, a.rows)
                cmd = [a.bin, "solve", inp, "-o", os.path.join(tmp, "solved.csv")]
                label = f"solve {a.rows:,} rows"
            elif what == "check":
                cmd = [a.bin, "check", sensor_site(os.path.join(tmp, "sensor"), a.rows)]
                label = f"check, {a.rows:,}-row sensor series"
            elif what == "project":
                cmd = [a.bin, "project", sites[0], "-o", os.path.join(tmp, "p.csv")]
                label = f"project {os.path.basename(sites[0])} (default ensemble)"
            elif what == "report":
                cmd = [a.bin, "report", *sites, "-o", os.path.join(tmp, "r.pdf")]
                label = f"report, {len(sites)}-site comparison"
            elif what == "batch":
                batch = []
                for i in range(50):
                    d = os.path.join(tmp, f"site{i:02d}")
                    shutil.copytree(os.path.dirname(sites[i % len(sites)]), d, dirs_exist_ok=True, ignore=shutil.ignore_patterns("*.pdf"))
                    shutil.copytree(os.path.join(ROOT, "demo-data"), os.path.join(tmp, "demo-data"), dirs_exist_ok=True)
                    batch.append(os.path.join(d, os.path.basename(sites[i % len(sites)])))
                cmd = [a.bin, "report", *batch, "-o", os.path.join(tmp, "batch.pdf")]
                label = "report, 50-site comparison"
            elif what == "many":
                gen = os.path.join(tmp, "many")
                subprocess.run([sys.executable, os.path.join(ROOT, "benches", "make_sites.py"), gen,
                                "--count", str(a.sites)], check=True, capture_output=True)
                cmd = [a.bin, "report", "--quiet", "--site-list", os.path.join(gen, "sites.txt"),
                       "-o", os.path.join(tmp, "many.pdf"), "--ranking-out", os.path.join(tmp, "many.csv"),
                       "--each-site-pdf", os.path.join(tmp, "many-pdf")]
                label = f"report, {a.sites:,} generated sites (ranking, 10 in detail, one PDF per site)"
            else:
                sys.exit(f"unknown bench '{what}'")
            times, cpus, peak = [], [], 0.0
            for _ in range(a.repeat):
                dt, rss, code, err, cpu = run(cmd)
                if code not in (0, 3):
                    sys.exit(f"{label}: exit {code}\n{err}")
                times.append(dt)
                cpus.append(cpu)
                peak = max(peak, rss)
            # CPU time (user + sys) depends far less on other load than wall time; the load
            # average says how busy the machine was.
            print(f"{label}: median {statistics.median(times):.2f} s wall (runs: {', '.join(f'{t:.2f}' for t in times)}), "
                  f"median {statistics.median(cpus):.2f} s CPU, peak RSS {peak:.0f} MB, "
                  f"load average {os.getloadavg()[0]:.2f}")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


if __name__ == "__main__":
    main()
