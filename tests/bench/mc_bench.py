#!/usr/bin/env python3
# benchtau: Monte Carlo benchmark: benchtau's spread of each circuit kind against vectorised NumPy.
"""Times benchtau's whole Monte Carlo (draws, mean and std, and the 0.1 to 99.9
percentiles of all seven outputs) for one invented circuit of each kind, with
one and two threads, and the same Monte Carlo of the classic two-resistor
astable written as vectorised NumPy over its closed form
(t_high = ln 2 (R1 + R2) C, t_low = ln 2 R2 C), percentiles included. Then the
like-for-like pair with the period's statistics alone: NumPy working out the
period only, and benchtau's same draws with only the period kept and summarised. Best
of several runs each; one table.

Usage: python3 tests/bench/mc_bench.py --program build/tests/bench/benchtau_mc_bench
"""

import argparse
import math
import subprocess
import time

KINDS = ["two-resistor", "two-resistor-control-load", "output-resistor", "diode-steered",
         "monostable"]
PERCENTILES = [0.1, 1, 5, 50, 95, 99, 99.9]


def run_benchtau(program, kind, draws, threads, repeats, statistics="all"):
    out = subprocess.run([program, kind, str(draws), str(threads), str(repeats), statistics],
                         check=True, capture_output=True, text=True).stdout
    values = dict(line.split("=", 1) for line in out.splitlines())
    return float(values["draws_per_s"]), float(values["mean"])


def numpy_classic(draws, seed, period_only=False):
    """The same Monte Carlo as benchtau's for R1 4k7 1 %, R2 22k 1 %, C 100n 5 %
    (tolerance at 3 sigma, truncated there), over the textbook closed form:
    all seven outputs, or (period_only) the period's statistics alone."""
    import numpy as np

    rng = np.random.default_rng(seed)

    def part(nominal, tolerance):
        z = rng.standard_normal(draws)
        bad = np.abs(z) > 3.0
        while bad.any():
            z[bad] = rng.standard_normal(int(bad.sum()))
            bad = np.abs(z) > 3.0
        return nominal * (1.0 + tolerance * z / 3.0)

    r1, r2, c = part(4.7e3, 0.01), part(22e3, 0.01), part(100e-9, 0.05)
    if period_only:
        period = math.log(2.0) * (r1 + 2.0 * r2) * c
        return period.mean(), period.std(), np.percentile(period, PERCENTILES)
    high = math.log(2.0) * (r1 + r2) * c
    low = math.log(2.0) * r2 * c
    period = high + low
    outputs = [high, low, period, 1.0 / period, high / period,
               np.full(draws, 6.0), np.full(draws, 3.0)]
    stats = [(x.mean(), x.std(), np.percentile(x, PERCENTILES)) for x in outputs]
    return stats[2][0]


def best_numpy(draws, repeats, period_only=False):
    best = math.inf
    mean = 0.0
    for i in range(repeats):
        start = time.perf_counter()
        result = numpy_classic(draws, 1 + i, period_only)
        best = min(best, time.perf_counter() - start)
        mean = result[0] if period_only else result
    return draws / best, mean


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--program", required=True)
    ap.add_argument("--draws", type=int, default=1_000_000)
    ap.add_argument("--repeats", type=int, default=5)
    a = ap.parse_args()

    np_rate, np_mean = best_numpy(a.draws, a.repeats)
    np_period_rate, _ = best_numpy(a.draws, a.repeats, period_only=True)
    rows = []
    for kind in KINDS:
        one, mean = run_benchtau(a.program, kind, a.draws, 1, a.repeats)
        two, _ = run_benchtau(a.program, kind, a.draws, 2, a.repeats)
        rows.append((kind, one, two, mean))

    print(f"Monte Carlo, {a.draws} draws, best of {a.repeats}; draws per second, all seven "
          "outputs (mean, std and seven percentiles of each)")
    print(f"{'circuit':<27} {'1 thread':>10} {'2 threads':>10} {'NumPy':>10} "
          f"{'2 threads / NumPy':>18}")
    for kind, one, two, _ in rows:
        numpy_cell = f"{np_rate / 1e6:8.1f} M" if kind == "two-resistor" else f"{'-':>10}"
        print(f"{kind:<27} {one / 1e6:8.1f} M {two / 1e6:8.1f} M {numpy_cell} "
              f"{two / np_rate:17.1f}x")
    period_one, _ = run_benchtau(a.program, "two-resistor", a.draws, 1, a.repeats, "period")
    period_two, _ = run_benchtau(a.program, "two-resistor", a.draws, 2, a.repeats, "period")
    print(f"{'two-resistor, period alone':<27} {period_one / 1e6:8.1f} M {period_two / 1e6:8.1f} M "
          f"{np_period_rate / 1e6:8.1f} M {period_two / np_period_rate:17.1f}x")
    print(f"NumPy is the classic astable's closed form, vectorised (mean period "
          f"{np_mean * 1e3:.4f} ms; benchtau's {rows[0][3] * 1e3:.4f} ms has the chip's typical "
          f"figures). The last row has the period's statistics alone on both sides;\nbenchtau "
          f"works out all seven outputs of each draw there and keeps the period only.")


if __name__ == "__main__":
    main()
