#!/usr/bin/env python3
# benchtau: benchtau fit's diagnosis of every fault case against the fault put into ngspice.
"""Runs `benchtau fit CAPTURE --design DESIGN --json` on every case simulate_cases.py wrote
and checks the diagnosis against what went into the simulator:

- a healthy board (every part within its tolerance) passes, with exit code 0;
- on at least 95 % of the faulty boards the verdict is "fail" and the first suspect is the
  fault put in: the timing capacitor "value-low" when it lost capacitance, "<cap>-leakage"
  "leakage" for a resistance across it, the drifted resistor "value-high", and
  "control-pin-load" "unexpected-load" for a load on the control pin;
- where the fit claims to know the faulty value to 1 % (one sigma, so that 3 % is three of
  them) or better, the fitted value is within 3 % of the simulator's. A suspect that says less
  is shown but not held to 3 %; its error in sigmas is shown beside it.

The fault, its seeded value and every other part's drawn value are in cases.json; the values
are ngspice's inputs (the independent reference), never benchtau's output.
"""
import argparse
import json
import math
import os
import sys

import benchtau_run

NAMED_FIRST_SHARE = 0.95  # the issue's requirement
VALUE_PCT = 3.0  # the issue's requirement on an identifiable faulty value
IDENTIFIABLE_SIGMA_PCT = 1.0  # a third of VALUE_PCT: the fit knows the value well enough
SKIPPED = 77  # benchtau has no fit command to check
EXIT = {"pass": 0, "fail": 1, "no-oscillation": 1, "inconclusive": 3}


def _num(x):
    return float(x) if isinstance(x, (int, float)) else math.nan


def judge(case, result):
    """One row of the table: what was expected, what fit said, and what is wrong with it."""
    d = result["json"]
    row = {"label": case["label"], "expected": case["expected"], "problems": [],
           "verdict": None, "first": None, "healthy_p": math.nan, "value": None}
    if d is None:
        row["problems"].append(f"no JSON (exit {result['exit']}): {result['stderr'].strip()}")
        return row
    row["verdict"] = d.get("verdict")
    row["healthy_p"] = _num(d.get("healthy_probability"))
    suspects = d.get("suspects") or []
    row["first"] = suspects[0] if suspects else None
    if EXIT.get(row["verdict"]) != result["exit"]:
        row["problems"].append(f"exit code {result['exit']} for verdict {row['verdict']}")
    exp = case["expected"]
    if exp is None:
        if row["verdict"] != "pass":
            row["problems"].append(f"healthy board: verdict {row['verdict']}, not pass")
        return row
    first = row["first"]
    named = (row["verdict"] == "fail" and first is not None and first.get("ref") == exp["ref"]
             and first.get("kind") == exp["kind"])
    row["named_first"] = named
    if not named:
        rank = next((i + 1 for i, s in enumerate(suspects)
                     if s.get("ref") == exp["ref"] and s.get("kind") == exp["kind"]), None)
        row["problems"].append(
            f"misranked: verdict {row['verdict']}, expected {exp['ref']} {exp['kind']} at rank "
            f"{rank if rank else 'none'}")
        return row
    fitted, sigma, true = _num(first.get("fitted")), _num(first.get("sigma")), exp["true_value"]
    err_pct = 100.0 * (fitted / true - 1.0)
    sigma_pct = 100.0 * sigma / fitted if fitted else math.nan
    # A missing sigma claims nothing either way: such a value is held to 3 % as well.
    identifiable = not (sigma_pct > IDENTIFIABLE_SIGMA_PCT)
    row["value"] = {"fitted": fitted, "sigma": sigma, "true": true, "err_pct": err_pct,
                    "sigma_pct": sigma_pct, "identifiable": identifiable,
                    "z": (fitted - true) / sigma if sigma > 0 else math.nan}
    if not math.isfinite(err_pct) or (identifiable and abs(err_pct) > VALUE_PCT):
        row["problems"].append(f"fitted {fitted:.5g} against {true:.5g} put in: "
                               f"{err_pct:+.2f} % (sigma {sigma_pct:.2f} %)")
    return row


def _line(row):
    exp = row["expected"]
    want = f"{exp['ref']} {exp['kind']}" if exp else "pass"
    first = row["first"]
    got = f"{first.get('ref')} {first.get('kind')}" if first else "-"
    p = _num(first.get("probability")) if first else math.nan
    v = row["value"]
    value = (f"{v['fitted']:11.5g} {v['sigma_pct']:5.2f}% {v['true']:11.5g} {v['err_pct']:+6.2f}%"
             f" {v['z']:+6.1f}{'' if v['identifiable'] else ' (not held)'}"
             if v else "")
    mark = "FAIL" if row["problems"] else "ok"
    return (f"{mark:4} {row['label']:40} {want:32} {str(row['verdict']):12} {got:32} "
            f"{p:5.3f} {row['healthy_p']:5.3f} {value}")


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--work", required=True)
    ap.add_argument("--benchtau", required=True)
    ap.add_argument("--show-json", type=int, default=3, help="failures whose JSON is printed")
    args = ap.parse_args()
    cases = benchtau_run.load_cases(args.work)
    probe = benchtau_run.run(args.benchtau, ["fit", "--help"])
    if probe["exit"] != 0 or "--design" not in probe["stdout"]:
        # CTest reports this exit code as a skip (SKIP_RETURN_CODE in CMakeLists.txt).
        print(f"{args.benchtau} has no fit command yet (its fit --help names no --design)")
        sys.exit(SKIPPED)
    results = benchtau_run.run_all(
        args.benchtau, [["fit", c["capture"], "--design", c["design"], "--json"] for c in cases])
    rows = [judge(c, r) for c, r in zip(cases, results)]
    with open(os.path.join(args.work, "fit-results.json"), "w") as f:
        json.dump([{"label": c["label"], "exit": r["exit"], "json": r["json"],
                    "stderr": r["stderr"]} for c, r in zip(cases, results)], f, indent=1)
    print(f"{'':4} {'case':40} {'expected first':32} {'verdict':12} {'named first':32} "
          f"{'p':>5} {'p ok':>5} {'fitted':>11} {'sigma':>6} {'true':>11} {'error':>7} "
          f"{'z':>6}")
    for row in rows:
        print(_line(row))
        for text in row["problems"]:
            print(f"       {text}")
    healthy = [r for r in rows if r["expected"] is None]
    faulty = [r for r in rows if r["expected"] is not None]
    healthy_ok = sum(not r["problems"] for r in healthy)
    named = sum(bool(r.get("named_first")) for r in faulty)
    values = [r for r in faulty if r["value"] and r["value"]["identifiable"]]
    values_ok = sum(abs(r["value"]["err_pct"]) <= VALUE_PCT for r in values)
    share = named / len(faulty) if faulty else 0.0
    print(f"healthy boards passed: {healthy_ok} of {len(healthy)}")
    print(f"faulty boards with the fault named first: {named} of {len(faulty)} "
          f"({100 * share:.1f} %, at least {100 * NAMED_FIRST_SHARE:.0f} % needed)")
    print(f"identifiable faulty values within {VALUE_PCT:g} %: {values_ok} of {len(values)} "
          f"({sum(1 for r in faulty if r['value'] and not r['value']['identifiable'])} more "
          "named first with a sigma over 1 %)")
    failures = [(c, r) for c, r, row in zip(cases, results, rows) if row["problems"]]
    for c, r in failures[:args.show_json]:
        print(f"--- {c['label']}: JSON of benchtau fit (exit {r['exit']})")
        print(json.dumps(r["json"], indent=1) if r["json"] else r["stderr"])
    ok = healthy_ok == len(healthy) and share >= NAMED_FIRST_SHARE and values_ok == len(values)
    print(f"{len(rows) - len(failures)} passed, {len(failures)} failed")
    sys.exit(0 if ok else 1)


if __name__ == "__main__":
    main()
