# benchtau: ngspice's trace as a cheap 8-bit scope would record it, written as a CSV capture.
"""Resampling, quantising and writing one capture.

The technician sets the scope's sample interval to a 1-2-5 step that gives at least the board's
samples a period, and each channel's volts per division to the 1-2-5 step that fits the
channel's largest value inside nine divisions above a trace parked one division up from the
bottom of the screen. The converter has 8 bits over ten divisions (common practice for a
bench scope, from memory) and its input a little Gaussian noise, half a code RMS, drawn from
the case's seed. The scope's first sample falls at a random point of its interval.
"""
import math

import numpy as np

BITS = 8
DIVISIONS = 10  # the converter's span, in divisions
NOISE_CODES = 0.5  # RMS noise at the converter's input, in codes


def step_125_at_most(x):
    """The largest 1-2-5 step (1, 2, 5 times a power of ten) not above x."""
    e = math.floor(math.log10(x))
    for m in (5.0, 2.0, 1.0):
        if m * 10.0**e <= x * (1.0 + 1e-12):
            return m * 10.0**e
    return 5.0 * 10.0 ** (e - 1)


def step_125_at_least(x):
    """The smallest 1-2-5 step not below x."""
    e = math.floor(math.log10(x))
    for m in (1.0, 2.0, 5.0, 10.0):
        if m * 10.0**e >= x * (1.0 - 1e-12):
            return m * 10.0**e
    return 10.0 ** (e + 1)


def channel_scale(peak_V):
    """(bottom of the converter's span, volts a code) for a channel whose largest value is
    peak_V: the trace parked one division up, its peak inside the nine above."""
    volts_per_div = step_125_at_least(1.05 * peak_V / (DIVISIONS - 1))
    return -volts_per_div, DIVISIONS * volts_per_div / 2**BITS


def quantise(x_V, bottom_V, lsb_V, rng):
    codes = np.round((x_V - bottom_V) / lsb_V + rng.normal(0.0, NOISE_CODES, x_V.shape))
    return bottom_V + lsb_V * np.clip(codes, 0, 2**BITS - 1)


def record(trace, names, start_s, length_s, samples_per_period, period_s, seed):
    """The scope's record of the trace's columns: returns (times from the first sample,
    {name: volts}, {name: (bottom_V, lsb_V)}, sample interval)."""
    t = trace[0]
    dt = step_125_at_most(period_s / samples_per_period)
    rng = np.random.default_rng(seed)
    t0 = start_s + rng.uniform(0.0, dt)
    n = int(length_s / dt)
    grid = t0 + dt * np.arange(n)
    channels, scales = {}, {}
    for name, x in zip(names, trace[1:]):
        if name is None:
            continue
        fine = np.interp(grid, t, x)
        bottom_V, lsb_V = channel_scale(float(np.max(fine)))
        channels[name] = quantise(fine, bottom_V, lsb_V, rng)
        scales[name] = (bottom_V, lsb_V)
    return dt * np.arange(n), channels, scales, dt


def write_csv(path, times_s, channels):
    """A scope's export: a time column and one column a channel, headed with their units."""
    names = list(channels)
    with open(path, "w") as f:
        f.write(",".join(["time (s)"] + [f"{n} (V)" for n in names]) + "\n")
        cols = [channels[n] for n in names]
        for i, t in enumerate(times_s):
            f.write(f"{t:.9g}," + ",".join(f"{c[i]:.6g}" for c in cols) + "\n")
