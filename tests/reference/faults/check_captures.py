#!/usr/bin/env python3
# benchtau: the fault cases' captures and as-built designs against ngspice's own trace.
"""Checks the generator before anything is diagnosed from its output, and benchtau's measure
and predict with it:

- `benchtau measure` on each 8-bit capture finds the period, high and low times and the
  capacitor's turnarounds that ngspice's trace has (timed there on the simulator's own output,
  spice_case.trace_cycle);
- `benchtau predict` on each as-built design (the simulator's values; every case but the leaky
  ones) gives ngspice's period, high and low times and turnarounds.

ngspice (Debian package ngspice) is the reference; tolerances are reasoned beside TOLERANCE.
"""
import argparse
import sys

import benchtau_run
from benchtau_run import pct

# measure, against ngspice: the scope samples each phase 80 to 800 times at 8 bits with half a
# code of noise, and measure times each edge where quadratics on the capacitor's samples meet,
# to a small fraction of a sample (README "How it measures"); over seven or more cycles the
# mean period is good to a few hundredths of a percent, a phase to about 0.1 % (seen below
# 0.05 % and 0.2 %). The turnarounds come from those fits on samples one code apart: within
# 1.5 codes. predict, against ngspice: the same model on both sides (the behavioural timer's
# figures in the design, its 50 mV switch saturation in the netlist); ngspice places each
# flip within half a step, 1/4000 of the shorter phase (tests/reference/spice/README.md), so
# 0.1 % on times and 4 mV on turnarounds; a model 1 % off fails all of these.
TOLERANCE = {
    "measure_period_pct": 0.15,
    "measure_phase_pct": 0.5,
    "measure_turnaround_codes": 1.5,
    "predict_time_pct": 0.1,
    "predict_turnaround_V": 0.004,
}


def check_measure(case, result, problems):
    m = result["json"]
    if result["exit"] != 0 or m is None:
        problems.append(f"measure exited {result['exit']}: {result['stderr'].strip()}")
        return None
    s, truth = m["summary"], case["ngspice"]
    lsb_V = case["scales"]["cap"]["lsb_V"]
    got = {
        "period": pct(s["period_s"]["mean"], truth["period_s"]),
        "high": pct(s["high_s"]["mean"], truth["high_s"]),
        "low": pct(s["low_s"]["mean"], truth["low_s"]),
        "max": (s["cap_max_V"]["mean"] - truth["cap_max_V"]) / lsb_V,
        "min": (s["cap_min_V"]["mean"] - truth["cap_min_V"]) / lsb_V,
    }
    if s["cycles"] < 6:
        problems.append(f"measure found {s['cycles']} steady cycles, not 6 or more")
    if abs(got["period"]) > TOLERANCE["measure_period_pct"]:
        problems.append(f"measured period {got['period']:+.3f} % from ngspice's")
    for k in ("high", "low"):
        if abs(got[k]) > TOLERANCE["measure_phase_pct"]:
            problems.append(f"measured {k} time {got[k]:+.3f} % from ngspice's")
    for k in ("max", "min"):
        if abs(got[k]) > TOLERANCE["measure_turnaround_codes"]:
            problems.append(f"measured cap {k} {got[k]:+.2f} codes from ngspice's")
    return got


def check_predict(case, result, problems):
    if result is None:
        return None
    p = result["json"]
    if result["exit"] not in (0, 1) or p is None or not p.get("oscillates"):
        problems.append(f"predict exited {result['exit']}: {result['stderr'].strip()}")
        return None
    n, truth = p["nominal"], case["ngspice"]
    got = {
        "period": pct(n["period_s"], truth["period_s"]),
        "high": pct(n["high_s"], truth["high_s"]),
        "low": pct(n["low_s"], truth["low_s"]),
        "max": n["cap_max_V"] - truth["cap_max_V"],
        "min": n["cap_min_V"] - truth["cap_min_V"],
    }
    for k in ("period", "high", "low"):
        if abs(got[k]) > TOLERANCE["predict_time_pct"]:
            problems.append(f"predicted {k} {got[k]:+.3f} % from ngspice's")
    for k in ("max", "min"):
        if abs(got[k]) > TOLERANCE["predict_turnaround_V"]:
            problems.append(f"predicted cap {k} {1e3 * got[k]:+.1f} mV from ngspice's")
    return got


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--work", required=True)
    ap.add_argument("--benchtau", required=True)
    args = ap.parse_args()
    cases = benchtau_run.load_cases(args.work)
    measured = benchtau_run.run_all(args.benchtau,
                                    [["measure", c["capture"], "--json"] for c in cases])
    with_design = [c for c in cases if c["as_built"]]
    predicted = dict(zip(
        (c["label"] for c in with_design),
        benchtau_run.run_all(args.benchtau, [
            ["predict", "--design", c["as_built"], "--draws", "0", "--json"]
            for c in with_design])))
    print(f"{'case':40} {'ngspice period':>14} | measure: {'period':>7} {'high':>7} {'low':>7}"
          f" {'max':>6} {'min':>6} (codes) | predict: {'period':>7} {'high':>7} {'low':>7}"
          f" {'max':>6} {'min':>6} (mV)")
    failed = 0
    for case, m_result in zip(cases, measured):
        problems = []
        m = check_measure(case, m_result, problems)
        p = check_predict(case, predicted.get(case["label"]), problems)
        ms = (f"{m['period']:+6.3f}% {m['high']:+6.3f}% {m['low']:+6.3f}% {m['max']:+6.2f} "
              f"{m['min']:+6.2f}" if m else f"{'-':>43}")
        ps = (f"{p['period']:+6.3f}% {p['high']:+6.3f}% {p['low']:+6.3f}% "
              f"{1e3 * p['max']:+6.1f} {1e3 * p['min']:+6.1f}" if p else f"{'-':>43}")
        print(f"{case['label']:40} {case['ngspice']['period_s']:14.6g} | {ms:>50} | {ps}")
        for text in problems:
            print(f"    FAIL {text}")
        failed += bool(problems)
    print(f"{len(cases) - failed} passed, {failed} failed")
    sys.exit(1 if failed else 0)


if __name__ == "__main__":
    main()
