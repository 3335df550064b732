#!/usr/bin/env python3
# benchtau: simulates every fault case in ngspice and writes its capture, designs and manifest.
"""Writes, under --work, one folder a case: the netlist and ngspice's log (spice/), the scope
capture (capture.csv), the drawn design (design.toml) and, where the fault fits a design file,
the as-built design (as-built.toml); and cases.json, which the checks read. Two ngspice runs
at a time (the machine's budget is two cores).

ngspice (Debian package ngspice) is the independent simulator; the timer in it is the team's
behavioural model, tests/reference/spice/timer_behavioural.lib.
"""
import argparse
import concurrent.futures
import json
import math
import os
import shutil
import sys
import time

import design_file
import fault_cases
import scope_capture
import spice_case

HERE = os.path.dirname(os.path.abspath(__file__))
MODEL_LIB = os.path.join(HERE, "..", "spice", "timer_behavioural.lib")


def simulate(case, work):
    folder = os.path.join(work, case.label)
    shutil.rmtree(folder, ignore_errors=True)
    os.makedirs(folder)
    p = spice_case.plan(case)
    started = time.monotonic()
    (t, out, cap, ctl), truth, step_s = spice_case.run_oscillating(
        case, p, os.path.join(folder, "spice"), MODEL_LIB)
    spice_s = time.monotonic() - started
    start_s = p["skip_s"]
    names = ("out", "cap", "ctl" if case.board.probe_ctl else None)
    # The scope is set for the period the technician sees, not for the nominal one.
    times, channels, scales, dt = scope_capture.record(
        (t, out, cap, ctl), names, start_s, p["record_s"], case.board.samples_per_period,
        truth["period_s"], case.seed)
    capture = os.path.join(folder, "capture.csv")
    scope_capture.write_csv(capture, times, channels)
    design = os.path.join(folder, "design.toml")
    design_file.write(design, case)
    as_built = os.path.join(folder, "as-built.toml")
    has_as_built = design_file.write(as_built, case, as_built=True)
    if not os.environ.get("BENCHTAU_KEEP_SPICE"):
        os.remove(os.path.join(folder, "spice", "trace.txt"))
    return {
        "label": case.label, "board": case.board.name, "circuit": case.board.circuit,
        "fault": case.fault, "supply_V": case.board.supply_V, "seed": case.seed,
        "values": case.values,
        "leak_ohm": case.leak_ohm if math.isfinite(case.leak_ohm) else None,
        "control_load_ohm":
            case.control_load_ohm if math.isfinite(case.control_load_ohm) else None,
        "nominal": {p.ref: p.value for p in case.board.parts},
        "expected": {"ref": case.expected_ref, "kind": case.expected_kind,
                     "true_value": case.true_value if case.expected_ref else None,
                     "unit": case.unit} if case.expected_ref else None,
        "capture": capture, "design": design,
        "as_built": as_built if has_as_built else None,
        "ngspice": truth, "plan_period_s": p["period_s"], "sim_step_s": step_s,
        "sample_interval_s": dt, "samples": int(len(times)),
        "scales": {n: {"bottom_V": s[0], "lsb_V": s[1]} for n, s in scales.items()},
        "spice_seconds": spice_s,
    }


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--work", required=True, help="scratch folder (under the build tree)")
    ap.add_argument("--only", default="", help="simulate only cases whose label holds this")
    ap.add_argument("--jobs", type=int, default=2)
    args = ap.parse_args()
    if shutil.which("ngspice") is None:
        sys.exit("ngspice is not on PATH; it is a required test dependency (Debian package "
                 "ngspice, see scripts/install-deps)")
    os.makedirs(args.work, exist_ok=True)
    cases = [c for c in fault_cases.all_cases() if args.only in c.label]
    with concurrent.futures.ThreadPoolExecutor(max_workers=args.jobs) as pool:
        futures = [pool.submit(simulate, c, args.work) for c in cases]
    failed = [(c.label, f.exception()) for c, f in zip(cases, futures) if f.exception()]
    for label, e in failed:
        print(f"{label}: {type(e).__name__}: {e}", file=sys.stderr)
    if failed:
        sys.exit(f"{len(failed)} of {len(cases)} cases could not be simulated")
    results = [f.result() for f in futures]
    with open(os.path.join(args.work, "cases.json"), "w") as f:
        json.dump(results, f, indent=1)
    print(f"{'case':44} {'period':>11} {'plan':>8} {'samples':>8} {'a period':>8} "
          f"{'cap LSB':>8} {'ngspice':>8}")
    for r in results:
        print(f"{r['label']:44} {r['ngspice']['period_s']:11.5g} "
              f"{100 * (r['plan_period_s'] / r['ngspice']['period_s'] - 1):+7.1f}% "
              f"{r['samples']:8d} {r['ngspice']['period_s'] / r['sample_interval_s']:8.0f} "
              f"{1e3 * r['scales']['cap']['lsb_V']:6.1f}mV {r['spice_seconds']:7.1f}s")
    print(f"{len(results)} cases written to {os.path.join(args.work, 'cases.json')}")


if __name__ == "__main__":
    main()
