#!/usr/bin/env python3
# benchtau: the fit benchmark's peer: the same job as a straightforward SciPy script.
"""Reads a two-channel timer capture (time, out, cap) with pandas, finds the
output's edges with NumPy, and fits every whole charge and discharge segment of
the capacitor node on its own with scipy.optimize.least_squares and an analytic
Jacobian:  V(t) = Vinf + A exp(-(t - t0) / tau),  t0 = the segment's start edge.

Prints key=value lines: seconds (from before the read to after the last fit),
segments, fitted, and each phase's median tau and Vinf over its segments.

Usage: python3 tests/bench/fit_peer.py CAPTURE
"""

import sys
import time

import numpy as np
import pandas as pd
from scipy.optimize import least_squares


def edges(t, out):
    """Crossings of the output through the middle of its range, timed by linear
    interpolation; returns (times, index of the first sample after, rising)."""
    lo, hi = np.percentile(out, [5, 95])
    high = out > 0.5 * (lo + hi)
    i = np.flatnonzero(high[1:] != high[:-1]) + 1  # first sample of the new level
    mid = 0.5 * (lo + hi)
    frac = (mid - out[i - 1]) / (out[i] - out[i - 1])
    return t[i - 1] + frac * (t[i] - t[i - 1]), i, high[i]


def initial_guess(x, y):
    """tau from the means of the three thirds (successive differences of an
    exponential's equal window means shrink by exp(-h / tau)), then Vinf and A by
    linear least squares at that tau."""
    m = len(x) // 3
    span = x[-1] - x[0]
    tau = span
    d1 = y[m:2 * m].mean() - y[:m].mean()
    d2 = y[2 * m:3 * m].mean() - y[m:2 * m].mean()
    if d1 * d2 > 0 and d1 / d2 > 1:
        tau = 0.5 * (x[2 * m:3 * m].mean() - x[:m].mean()) / np.log(d1 / d2)
    tau = min(max(tau, span / 50), 1e6 * span)
    e = np.exp(-x / tau)
    a = np.column_stack([np.ones_like(x), e])
    (vinf, amp), *_ = np.linalg.lstsq(a, y, rcond=None)
    return np.array([np.log(tau), vinf, amp])


def fit_segment(x, y):
    def residuals(p):
        return p[1] + p[2] * np.exp(-x * np.exp(-p[0])) - y

    def jacobian(p):
        z = x * np.exp(-p[0])
        e = np.exp(-z)
        return np.column_stack([p[2] * e * z, np.ones_like(x), e])

    r = least_squares(residuals, initial_guess(x, y), jac=jacobian, method="lm",
                      xtol=1e-12, ftol=1e-12, gtol=1e-12)
    return r.x, r.success


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__.strip().splitlines()[-1])
    start = time.perf_counter()
    frame = pd.read_csv(sys.argv[1], comment="#")
    t = frame.iloc[:, 0].to_numpy(dtype=np.float64)
    out = frame.iloc[:, 1].to_numpy(dtype=np.float64)
    cap = frame.iloc[:, 2].to_numpy(dtype=np.float64)

    t_edge, i_edge, rising = edges(t, out)
    taus = {True: [], False: []}
    vinfs = {True: [], False: []}
    segments = fitted = 0
    for k in range(len(t_edge) - 1):
        if rising[k] == rising[k + 1]:
            continue
        segments += 1
        s0, s1 = i_edge[k], i_edge[k + 1]
        # As benchtau's window rule: skip 2 % (at least 2 samples) after the start edge and
        # one before the end edge.
        first = s0 + max(2, int(np.ceil(0.02 * (s1 - s0))))
        end = s1 - 1
        if end - first < 6:
            continue
        x = t[first:end] - t_edge[k]
        y = cap[first:end]
        p, ok = fit_segment(x, y)
        if ok:
            fitted += 1
            taus[bool(rising[k])].append(np.exp(p[0]))
            vinfs[bool(rising[k])].append(p[1])
    seconds = time.perf_counter() - start

    print(f"seconds={seconds:.6f}")
    print(f"rows={len(t)}")
    print(f"segments={segments}")
    print(f"fitted={fitted}")
    for name, phase in (("charging", True), ("discharging", False)):
        print(f"{name}_tau_s={np.median(taus[phase]) if taus[phase] else float('nan'):.9g}")
        print(f"{name}_vinf_V={np.median(vinfs[phase]) if vinfs[phase] else float('nan'):.9g}")


if __name__ == "__main__":
    main()
