# benchtau: running the benchtau program on the fault cases, two at a time, and reading its JSON.
"""One helper for both checks: runs benchtau with arguments, returns its exit code, its JSON
(None when standard output is not JSON) and its standard error."""
import concurrent.futures
import json
import os
import subprocess
import sys

TIMEOUT_S = 300  # one command on one capture; the machine may be shared and busy


def run(program, args):
    try:
        p = subprocess.run([program] + args, capture_output=True, text=True, timeout=TIMEOUT_S,
                           stdin=subprocess.DEVNULL)
    except subprocess.TimeoutExpired:
        return {"exit": None, "json": None, "stderr": f"timed out after {TIMEOUT_S} s",
                "stdout": ""}
    try:
        data = json.loads(p.stdout)
    except json.JSONDecodeError:
        data = None
    return {"exit": p.returncode, "json": data, "stderr": p.stderr, "stdout": p.stdout}


def run_all(program, arg_lists, jobs=2):
    with concurrent.futures.ThreadPoolExecutor(max_workers=jobs) as pool:
        return list(pool.map(lambda a: run(program, a), arg_lists))


def load_cases(work):
    path = os.path.join(work, "cases.json")
    if not os.path.exists(path):
        sys.exit(f"{path} is missing: the simulate step (test 'faults: simulate') did not run")
    with open(path) as f:
        return json.load(f)


def pct(got, want):
    return 100.0 * (got / want - 1.0)
