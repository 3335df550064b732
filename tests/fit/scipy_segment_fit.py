#!/usr/bin/python3
"""benchtau: an independent reference fit of exponential segments with SciPy.

Reads the samples the C++ test wrote and fits, with scipy.optimize.least_squares,

    y = Vinf + A_k exp(-x / tau)      (x: seconds since segment k's start edge)

with ln(tau) and Vinf shared by every segment in the file and one amplitude A_k per segment
(one segment in the file is the single-segment fit). Residuals are divided by the given
sigma before the loss, as in the C++ fit. Prints one "name value" line per result, values
with 17 significant digits.

The file: '#' comments, then "sigma_V S", "huber A" (A = 0: plain least squares), then one
"segment x_s y_V" line per sample. Usage: scipy_segment_fit.py FILE
"""
import sys

import numpy as np
from scipy.optimize import least_squares


def read(path):
    sigma = huber = None
    rows = []
    with open(path) as f:
        for line in f:
            line = line.strip()
            if not line or line.startswith("#"):
                continue
            parts = line.split()
            if parts[0] == "sigma_V":
                sigma = float(parts[1])
            elif parts[0] == "huber":
                huber = float(parts[1])
            else:
                rows.append((int(parts[0]), float(parts[1]), float(parts[2])))
    data = np.array(rows)
    return sigma, huber, data[:, 0].astype(int), data[:, 1], data[:, 2]


def start(seg, x, y, n):
    # Our own start, independent of the C++ one: tau = the mean segment length, then Vinf
    # and every A_k by linear least squares at that tau.
    tau = np.mean([x[seg == k].max() - x[seg == k].min() for k in range(n)])
    e = np.exp(-x / tau)
    m = np.zeros((len(x), 1 + n))
    m[:, 0] = 1.0
    m[np.arange(len(x)), 1 + seg] = e
    coef, *_ = np.linalg.lstsq(m, y, rcond=None)
    return np.concatenate(([np.log(tau)], coef))


def main(path):
    sigma, huber, seg, x, y = read(path)
    n = seg.max() + 1
    rows = np.arange(len(x))

    def model(p):
        e = np.exp(-x * np.exp(-p[0]))
        return e, p[1] + p[2 + seg] * e

    def residuals(p):
        return (model(p)[1] - y) / sigma

    def jacobian(p):
        e, _ = model(p)
        j = np.zeros((len(x), 2 + n))
        j[:, 0] = p[2 + seg] * e * x * np.exp(-p[0]) / sigma  # d/d ln(tau)
        j[:, 1] = 1.0 / sigma
        j[rows, 2 + seg] = e / sigma
        return j

    # SciPy's loss='huber' is rho(z) = z for z <= 1, 2 sqrt(z) - 1 otherwise, applied as
    # f_scale^2 rho(f^2 / f_scale^2) to each residual (the least_squares docstring, Debian
    # python3-scipy 1.10.1). Ceres's HuberLoss(a) is a^2 rho(s / a^2) with the same rho
    # (ceres/loss_function.h, libceres-dev 2.1). So on residuals already divided by sigma,
    # f_scale = a is the same loss: 2 a |f| - a^2 beyond a, f^2 within. Both minimise half
    # the sum of it, and both apply it per residual (the C++ cost does so inside the block).
    loss = dict(loss="huber", f_scale=huber) if huber > 0 else dict(loss="linear")
    fit = least_squares(residuals, start(seg, x, y, n), jac=jacobian, method="trf",
                        xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=10000, **loss)
    print(f"status {fit.status}")
    print(f"nfev {fit.nfev}")
    print(f"tau_s {np.exp(fit.x[0]):.17g}")
    print(f"vinf_V {fit.x[1]:.17g}")
    for k in range(n):
        print(f"amp_V {fit.x[2 + k]:.17g}")
    print(f"cost {fit.cost:.17g}")
    return 0 if fit.status > 0 else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1]))
