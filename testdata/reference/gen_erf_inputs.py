#!/usr/bin/python3
"""Writes the two synthetic input profiles of the reference comparison, once.

These are synthetic INPUTS (seeded pseudo-random noise on a constant-surface
erf profile); they are not check values. The check values are what scipy
(scipy_erf.py) and R (r_nls_erf.R) compute from these inputs.

Run: /usr/bin/python3 gen_erf_inputs.py   (writes erf_fixed.csv, erf_weighted.csv)
The committed CSV files are the reference inputs; re-running with the same
numpy version reproduces them, but the committed files are authoritative.
"""
import math
import numpy as np

T = 6 * 3600.0  # hold time, s


def model(x, D, cs, c0):
    return cs + (c0 - cs) * np.array([math.erf(v / (2 * math.sqrt(D * T))) for v in x])


def write(path, header, x, y, sigma=None):
    with open(path, "w") as f:
        for line in header:
            f.write("# " + line + "\n")
        f.write("depth_m,value" + (",sigma" if sigma is not None else "") + "\n")
        for i in range(len(x)):
            row = "%.6e,%.6f" % (x[i], y[i])
            if sigma is not None:
                row += ",%.6f" % sigma[i]
            f.write(row + "\n")


def main():
    rng = np.random.default_rng(20240611)
    n = 50
    x = np.linspace(20e-6, 2.5e-3, n)  # m
    # Unweighted: carburizing-like in-diffusion, noise sd 0.012 wt%.
    D, cs, c0 = 2.5e-11, 0.85, 0.18
    y = model(x, D, cs, c0) + rng.normal(0.0, 0.012, n)
    write("erf_fixed.csv",
          ["synthetic input for the reference comparison (not a check value): seeded numpy",
           "default_rng(20240611); truth D = 2.5e-11 m2/s, Cs = 0.85, C0 = 0.18, noise sd 0.012",
           "time_s: 21600"], x, y)
    # Weighted: decarburization-like out-diffusion, sigma grows with the level.
    D, cs, c0 = 1.2e-11, 0.08, 0.62
    mu = model(x, D, cs, c0)
    sigma = np.round(0.004 + 0.02 * mu, 6)
    y = mu + rng.normal(0.0, 1.0, n) * sigma * 1.3  # noise 1.3x the stated sigma
    write("erf_weighted.csv",
          ["synthetic input for the reference comparison (not a check value): seeded numpy",
           "default_rng(20240611), drawn after erf_fixed.csv; truth D = 1.2e-11 m2/s, Cs = 0.08,",
           "C0 = 0.62; noise 1.3 x the stated sigma (so absolute and scaled covariances differ)",
           "time_s: 21600"], x, y, sigma)


if __name__ == "__main__":
    main()
