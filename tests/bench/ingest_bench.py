#!/usr/bin/env python3
# benchtau: ingest benchmark: benchtau against wc -l (the floor) and pandas (a peer).
"""Times reading a large astable capture with benchtau_ingest_bench, `wc -l`
and pandas.read_csv + NumPy, best of several runs each, and prints one table.

Usage: python3 tests/bench/ingest_bench.py --build build
The capture (10 million rows of time, out, cap) is generated once and kept in
<build>/bench-data/.
"""

import argparse
import math
import os
import subprocess
import sys
import time

from warm_memory import warm_memory


def generate(path, rows):
    """Writes an invented two-resistor astable capture: the output pin and the
    capacitor node of a timer at about 1 kHz, sampled at 1 MS/s, with noise."""
    import numpy as np

    rate_Hz = 1e6
    vcc_V = 9.0
    r1, r2, c = 1.0e3, 6.8e3, 100e-9
    t_high_s = math.log(2) * (r1 + r2) * c  # charge through R1 + R2
    t_low_s = math.log(2) * r2 * c  # discharge through R2
    period_s = t_high_s + t_low_s
    rng = np.random.default_rng(555)
    tmp = path + ".part"
    chunk = 1_000_000
    with open(tmp, "w") as f:
        f.write("# Invented capture for the benchtau ingest benchmark\n")
        f.write("time [s],out [V],cap [V]\n")
        for start in range(0, rows, chunk):
            n = min(chunk, rows - start)
            t = (start + np.arange(n)) / rate_Hz
            phase = np.mod(t, period_s)
            high = phase < t_high_s
            lo, hi = vcc_V / 3, 2 * vcc_V / 3
            charge = vcc_V - (vcc_V - lo) * np.exp(-phase / ((r1 + r2) * c))
            discharge = hi * np.exp(-(phase - t_high_s) / (r2 * c))
            cap = np.where(high, charge, discharge) + rng.normal(0, 0.004, n)
            out = np.where(high, vcc_V - 1.7, 0.1) + rng.normal(0, 0.01, n)
            lines = ["%.6f,%.6g,%.6g\n" % row for row in zip(t.tolist(), out.tolist(), cap.tolist())]
            f.write("".join(lines))
    os.replace(tmp, path)


def best_of(runs, fn):
    results = [fn() for _ in range(runs)]
    return min(results, key=lambda r: r["seconds"])


def run_benchtau(program, path, threads):
    out = subprocess.run([program, path, "--threads", str(threads)], check=True,
                         capture_output=True, text=True).stdout
    values = {}
    for line in out.splitlines():
        key, _, value = line.partition("=")
        values[key] = value
    for key in ("bytes", "rows", "columns", "peak_rss_bytes", "decoded_bytes", "edges"):
        if key in values:
            values[key] = int(values[key])
    for key in ("seconds", "cpu_seconds", "edge_seconds", "edge_samples_per_s"):
        if key in values:
            values[key] = float(values[key])
    return values


def run_wc(path):
    start = time.perf_counter()
    subprocess.run(["wc", "-l", path], check=True, capture_output=True)
    return {"seconds": time.perf_counter() - start}


def run_pandas(path):
    import numpy as np
    import pandas as pd

    cpu = time.process_time()
    start = time.perf_counter()
    frame = pd.read_csv(path, comment="#")
    arrays = [np.ascontiguousarray(frame[c].to_numpy(dtype=np.float64)) for c in frame.columns]
    seconds = time.perf_counter() - start
    return {"seconds": seconds, "cpu_seconds": time.process_time() - cpu, "rows": len(arrays[0])}


def mb(n):
    return n / 1e6


def ensure_numpy():
    """Runs the script again under Debian's python3 when the one on PATH lacks
    NumPy or pandas (a private interpreter can shadow it)."""
    try:
        import numpy  # noqa: F401
        import pandas  # noqa: F401
        return
    except ImportError:
        pass
    system = "/usr/bin/python3"
    if os.path.realpath(sys.executable) != os.path.realpath(system) and os.access(system, os.X_OK):
        os.execv(system, [system] + sys.argv)


def main():
    ensure_numpy()
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--build", default="build", help="build directory (default: build)")
    parser.add_argument("--program", help="benchtau_ingest_bench (default: in the build directory)")
    parser.add_argument("--rows", type=int, default=10_000_000)
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--warm-gib", type=float, default=3.0,
                        help="GiB of memory touched once before the runs (0: none)")
    parser.add_argument("--threads", type=int, default=0, help="0: one per core")
    args = parser.parse_args()

    program = args.program or os.path.join(args.build, "tests", "bench", "benchtau_ingest_bench")
    if not os.access(program, os.X_OK):
        sys.exit(f"ingest_bench: {program} is not built; run `cmake --build {args.build} --target "
                 "benchtau_ingest_bench` first")
    data_dir = os.path.join(args.build, "bench-data")
    os.makedirs(data_dir, exist_ok=True)
    path = os.path.join(data_dir, f"astable_{args.rows}.csv")
    if not os.path.exists(path):
        print(f"generating {path} ...", flush=True)
        generate(path, args.rows)
    size = os.path.getsize(path)
    print(f"capture: {path}")
    print(f"  {args.rows:,} rows x 3 columns, {mb(size):.1f} MB ({size:,} bytes)")

    subprocess.run(["cat", path], check=True, stdout=subprocess.DEVNULL)  # warm the page cache
    warmed = warm_memory(args.warm_gib)  # and memory the host has backed
    bt = best_of(args.runs, lambda: run_benchtau(program, path, args.threads))
    wc = best_of(args.runs, lambda: run_wc(path))
    try:
        pd = best_of(args.runs, lambda: run_pandas(path))
    except ImportError as e:
        pd = None
        print(f"  pandas not available ({e}); its column is left empty")

    if bt["rows"] != args.rows:
        sys.exit(f"ingest_bench: benchtau read {bt['rows']} rows, expected {args.rows}")
    if pd is not None and pd["rows"] != args.rows:
        sys.exit(f"ingest_bench: pandas read {pd['rows']} rows, expected {args.rows}")

    bt_mbs = mb(size) / bt["seconds"]
    wc_mbs = mb(size) / wc["seconds"]
    pd_mbs = mb(size) / pd["seconds"] if pd else float("nan")
    rss_ratio = bt["peak_rss_bytes"] / bt["decoded_bytes"]
    rows = [
        ("ingest MB/s", f"{bt_mbs:.0f}", f"{wc_mbs:.0f}", f"{pd_mbs:.0f}"),
        ("ingest rows/s", f"{args.rows / bt['seconds'] / 1e6:.1f} M", "-",
         f"{args.rows / pd['seconds'] / 1e6:.1f} M" if pd else "-"),
        ("best time of %d" % args.runs, f"{bt['seconds']:.3f} s", f"{wc['seconds']:.3f} s",
         f"{pd['seconds']:.3f} s" if pd else "-"),
        ("CPU time (user+sys)", f"{bt['cpu_seconds']:.3f} s", "-",
         f"{pd['cpu_seconds']:.3f} s" if pd else "-"),
        ("peak RSS", f"{mb(bt['peak_rss_bytes']):.0f} MB", "-", "-"),
        ("  / decoded samples", f"{rss_ratio:.2f}x of {mb(bt['decoded_bytes']):.0f} MB", "-", "-"),
        ("edge extraction", f"{bt.get('edge_samples_per_s', float('nan')) / 1e6:.0f} M samples/s", "-", "-"),
        ("benchtau / peer", "1", f"{bt_mbs / wc_mbs:.2f}x", f"{bt_mbs / pd_mbs:.1f}x" if pd else "-"),
    ]
    header = ("", "benchtau", "wc -l (floor)", "pandas.read_csv + NumPy")
    widths = [max(len(r[i]) for r in rows + [header]) for i in range(4)]
    print()
    for r in [header] + rows:
        print("  ".join(cell.ljust(widths[i]) if i == 0 else cell.rjust(widths[i]) for i, cell in enumerate(r)))
    print()
    print(f"threads: {args.threads or os.cpu_count()}; edges found: {bt.get('edges', '-')} "
          f"on channel {bt.get('edge_channel', '-')}")
    if pd:
        print(f"CPU time per byte, pandas / benchtau: {pd['cpu_seconds'] / bt['cpu_seconds']:.1f}x")
    if warmed:
        print(f"memory warmed first: {args.warm_gib:g} GiB touched once and freed "
              "(tests/bench/warm_memory.py says why)")
    load = os.getloadavg()[0]
    if load > (os.cpu_count() or 1):
        print(f"note: load average {load:.1f} on {os.cpu_count()} cores while timing; wall-clock "
              "figures are shared with other work")


if __name__ == "__main__":
    main()
