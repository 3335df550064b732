#!/usr/bin/env python3
# benchtau: fit benchmark: the whole fit of a capture, benchtau against a SciPy script.
"""Times the whole fit of a two-channel timer capture, from the file to the
segment fits, by benchtau and by a straightforward SciPy script (fit_peer.py),
best of several runs each on 1 and 10 million rows, and prints one table.

Usage: python3 tests/bench/fit_bench.py --build build
The captures are generated once and kept in <build>/bench-data/. Both sides are
timed as whole processes from outside (so benchtau's start-up counts); the
peer's figure is the time inside its script from before the read to after the
last fit, which leaves its interpreter start and imports out in its favour.
"""

import argparse
import math
import os
import subprocess
import sys
import time

from warm_memory import warm_memory

HERE = os.path.dirname(os.path.abspath(__file__))
DESIGN = os.path.join(HERE, "fit_bench_design.toml")

# The invented board of the captures (fit_bench_design.toml says the same): a two-resistor
# astable on 9 V, R1 1 k, R2 6.8 k, C1 100 n, sampled at 1 MS/s (about 1000 samples a cycle).
SUPPLY_V = 9.0
R1_OHM, R2_OHM, C1_F = 1.0e3, 6.8e3, 100e-9
RATE_HZ = 1e6
STEP_V = 0.04  # 8 bits over 10.24 V
STAGES = ("read_s", "map_s", "measure_s", "fit_s", "total_s")
TARGETS = {1_000_000: 10.0, 10_000_000: 20.0}


def generate(path, rows):
    """Writes the capture: time, the output pin and the capacitor node, each with
    Gaussian noise and rounded to 8-bit steps, as a scope's export would be."""
    import numpy as np

    tau_charge_s = (R1_OHM + R2_OHM) * C1_F  # charge through R1 + R2 toward the supply
    tau_discharge_s = R2_OHM * C1_F  # discharge through R2 toward ground
    t_high_s = math.log(2) * tau_charge_s  # between 1/3 and 2/3 of the supply
    t_low_s = math.log(2) * tau_discharge_s
    period_s = t_high_s + t_low_s
    rng = np.random.default_rng(20261202)
    tmp = path + ".part"
    chunk = 1_000_000
    with open(tmp, "w") as f:
        f.write("# Invented capture for the benchtau fit benchmark: a 1 kHz test-tone astable\n")
        f.write("time [s],out [V],cap [V]\n")
        for start in range(0, rows, chunk):
            n = min(chunk, rows - start)
            t = (start + np.arange(n)) / RATE_HZ
            phase = np.mod(t + 0.3 * period_s, period_s)
            high = phase < t_high_s
            lo, hi = SUPPLY_V / 3, 2 * SUPPLY_V / 3
            charge = SUPPLY_V - (SUPPLY_V - lo) * np.exp(-phase / tau_charge_s)
            discharge = hi * np.exp(-(phase - t_high_s) / tau_discharge_s)
            cap = np.where(high, charge, discharge) + rng.normal(0, 0.02, n)
            out = np.where(high, SUPPLY_V - 1.7, 0.1) + rng.normal(0, 0.02, n)
            cap = np.clip(np.round(cap / STEP_V), 0, 255) * STEP_V
            out = np.clip(np.round(out / STEP_V), 0, 255) * STEP_V
            lines = ["%.6f,%.2f,%.2f\n" % row for row in zip(t.tolist(), out.tolist(), cap.tolist())]
            f.write("".join(lines))
    os.replace(tmp, path)


# Peak RSS from wait4 counts what a child was forked with: a child of this
# script (NumPy and pandas loaded) would start near 300 MB. So each command runs
# under a small fresh interpreter that forks it and reports the child's own
# figures; its floor is that interpreter's size, about 10 MB.
LAUNCHER = """
import os, sys, time
start = time.perf_counter()
pid = os.fork()
if pid == 0:
    os.execv(sys.argv[2], sys.argv[2:])
_, status, usage = os.wait4(pid, 0)
wall = time.perf_counter() - start
with open(sys.argv[1], "w") as f:
    f.write(f"{os.waitstatus_to_exitcode(status)} {wall} {usage.ru_utime + usage.ru_stime} "
            f"{usage.ru_maxrss}")
"""


def timed(cmd):
    """Runs cmd to the end: its key=value output, wall time, CPU time and peak RSS (from
    wait4 in the launcher, so each run's own figures)."""
    import tempfile

    with tempfile.TemporaryFile("w+") as out, tempfile.TemporaryFile("w+") as err, \
            tempfile.NamedTemporaryFile("r") as figures:
        proc = subprocess.run([sys.executable, "-c", LAUNCHER, figures.name] + cmd, stdout=out,
                              stderr=err, text=True)
        out.seek(0)
        err.seek(0)
        text = out.read()
        code, wall, cpu, maxrss_kib = figures.read().split()
        if proc.returncode != 0 or int(code) != 0:
            sys.exit(f"fit_bench: {' '.join(cmd)} failed ({code}):\n{err.read()}")
    values = {}
    for line in text.splitlines():
        key, sep, value = line.partition("=")
        if sep:
            values[key.strip()] = value.strip()
    return {"wall": float(wall), "values": values, "cpu": float(cpu),
            "maxrss": int(maxrss_kib) * 1024}  # KiB on Linux


def best_of(runs, fn, key):
    results = [fn() for _ in range(runs)]
    return min(results, key=key)


def ensure_numpy():
    """Runs the script again under Debian's python3 when the one on PATH lacks
    NumPy, pandas or SciPy (a private interpreter can shadow it)."""
    try:
        import numpy  # noqa: F401
        import pandas  # noqa: F401
        import scipy  # noqa: F401
        return
    except ImportError:
        pass
    system = "/usr/bin/python3"
    if os.path.realpath(sys.executable) != os.path.realpath(system) and os.access(system, os.X_OK):
        os.execv(system, [system] + sys.argv)


def has_fit_command(benchtau):
    if not benchtau or not os.access(benchtau, os.X_OK):
        return False
    r = subprocess.run([benchtau, "fit", "--help"], capture_output=True, text=True)
    return r.returncode == 0


def main():
    ensure_numpy()
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--build", default="build", help="build directory (default: build)")
    parser.add_argument("--program", help="benchtau_fit_pipeline_bench (default: in the build)")
    parser.add_argument("--benchtau", help="the benchtau program (default: in the build)")
    parser.add_argument("--rows", type=int, nargs="+", default=[1_000_000, 10_000_000])
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--warm-gib", type=float, default=3.0,
                        help="GiB of memory touched once before the runs (0: none)")
    args = parser.parse_args()

    program = args.program or os.path.join(args.build, "tests", "bench",
                                           "benchtau_fit_pipeline_bench")
    if not os.access(program, os.X_OK):
        sys.exit(f"fit_bench: {program} is not built; run `cmake --build {args.build} --target "
                 "benchtau_fit_pipeline_bench` first")
    benchtau = args.benchtau or os.path.join(args.build, "src", "cli", "benchtau")
    command = has_fit_command(benchtau)
    data_dir = os.path.join(args.build, "bench-data")
    os.makedirs(data_dir, exist_ok=True)
    peer = [sys.executable, os.path.join(HERE, "fit_peer.py")]

    table = []
    warmed = False
    for rows in args.rows:
        path = os.path.join(data_dir, f"fit_astable_{rows}.csv")
        if not os.path.exists(path):
            print(f"generating {path} ...", flush=True)
            generate(path, rows)
        size = os.path.getsize(path)
        subprocess.run(["cat", path], check=True, stdout=subprocess.DEVNULL)  # warm the cache
        warmed = warm_memory(args.warm_gib)  # and memory the host has backed
        pr = best_of(args.runs, lambda: timed(peer + [path]), lambda r: float(r["values"]["seconds"]))
        sides = [("pipeline", [program, path])]
        if command:
            sides.append(("benchtau fit", [benchtau, "fit", path, "--design", DESIGN]))
        peer_s = float(pr["values"]["seconds"])
        target = TARGETS.get(rows, float("nan"))
        for name, cmd in sides:
            bt = best_of(args.runs, lambda: timed(cmd), lambda r: r["wall"])
            table.append((f"{rows:,}", f"{size / 1e6:.0f}", f"{peer_s:.2f}", name, f"{bt['wall']:.3f}",
                          f"{peer_s / bt['wall']:.1f}x", f"{target:.0f}x", f"{bt['cpu']:.3f}",
                          f"{bt['maxrss'] / 1e6:.0f}"))
            if name == "pipeline":
                v = bt["values"]
                for phase in ("charging", "discharging"):
                    mine = float(v.get(f"{phase}_tau_s", "nan"))
                    theirs = float(pr["values"][f"{phase}_tau_s"])
                    print(f"  {rows:,} rows, {phase} tau: benchtau {mine * 1e3:.5f} ms (joint), "
                          f"peer {theirs * 1e3:.5f} ms (median of {pr['values']['fitted']} "
                          f"segment fits)")
                    if not abs(mine / theirs - 1.0) < 1e-2:
                        sys.exit("fit_bench: benchtau and the peer disagree on tau by over 1 %")
                print(f"  stages (s): " + ", ".join(
                    f"{k[:-2]} {float(v[k]):.3f}" for k in STAGES if k in v))

    header = ("rows", "MB", "peer (s)", "benchtau side", "benchtau (s)", "ratio", "target",
              "CPU (s)", "peak RSS (MB)")
    widths = [max(len(r[i]) for r in table + [header]) for i in range(len(header))]
    print()
    for r in [header] + table:
        print("  ".join(c.ljust(widths[i]) if i == 3 else c.rjust(widths[i])
                        for i, c in enumerate(r)))
    print()
    print(f"best of {args.runs}; peer: pandas.read_csv, NumPy edges, scipy.optimize.least_squares "
          "per segment (analytic Jacobian); benchtau timed as a whole process")
    if not command:
        print("(`benchtau fit` not found in this build: the pipeline program stands for it)")
    if warmed:
        print(f"memory warmed first: {args.warm_gib:g} GiB touched once and freed "
              "(tests/bench/warm_memory.py says why)")
    load = os.getloadavg()[0]
    if load > (os.cpu_count() or 1):
        print(f"note: load average {load:.1f} on {os.cpu_count()} cores while timing; wall-clock "
              "figures are shared with other work")


if __name__ == "__main__":
    main()
