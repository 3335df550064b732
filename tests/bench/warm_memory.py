"""Touches a few GiB of memory in a short-lived child before a benchmark.

On a virtual machine the first touch of memory the host has not yet backed
costs far more than on bare metal (here 0.4 to 0.6 GB/s for fresh pages
against 8 to 10 GB/s once backed), so a program that faults in a few hundred
megabytes of fresh pages is timed partly on the host's memory. Touching
memory once and freeing it, as `cat` warms the page cache for the file,
leaves both sides of a comparison the same already-backed pages to fault in.
"""

import subprocess
import sys


def warm_memory(gib):
    """Returns whether the memory was touched (a machine short of it skips the step)."""
    if gib <= 0:
        return False
    # bytes multiplication writes every page; the child's exit frees them all.
    done = subprocess.run([sys.executable, "-c", f"b = b'1' * ({int(gib * 1024)} << 20)"],
                          stderr=subprocess.DEVNULL)
    if done.returncode != 0:
        print(f"  (could not touch {gib:g} GiB of memory first; timing without that step)")
    return done.returncode == 0
