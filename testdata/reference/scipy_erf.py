#!/usr/bin/python3
"""Reference values for the erf fit from scipy.optimize.curve_fit (MINPACK
Levenberg-Marquardt), for fit/external_test.go and fit/weights_test.go.

Model (constant surface, semi-infinite body):
    C(x) = Cs + (C0 - Cs) * erf(x / (2 sqrt(D t))),  parameters ln D, Cs, C0.

Inputs: erf_fixed.csv (unweighted) and erf_weighted.csv (sigma column), synthetic
inputs written by gen_erf_inputs.py. Output: scipy_erf.json.
Run with Debian's python3-scipy:  /usr/bin/python3 scipy_erf.py
"""
import json
import math
import platform
import sys

import numpy as np
import scipy
from scipy.optimize import curve_fit
from scipy.special import erf


def read(path):
    time_s = None
    rows = []
    with open(path) as f:
        for line in f:
            line = line.strip()
            if line.startswith("#"):
                if line[1:].strip().startswith("time_s:"):
                    time_s = float(line.split(":", 1)[1])
                continue
            if line.startswith("depth_m"):
                continue
            rows.append([float(v) for v in line.split(",")])
    a = np.array(rows)
    sigma = a[:, 2] if a.shape[1] > 2 else None
    return a[:, 0], a[:, 1], sigma, time_s


def fit(path, **kw):
    x, y, sigma, t = read(path)

    def f(x, lnD, cs, c0):
        return cs + (c0 - cs) * erf(x / (2.0 * np.sqrt(np.exp(lnD) * t)))

    if kw.pop("weighted", False):
        kw["sigma"] = sigma
    p, cov = curve_fit(f, x, y, p0=[math.log(1e-11), y[0], y[-1]],
                       ftol=1e-15, xtol=1e-15, gtol=1e-15, maxfev=100000, **kw)
    r = y - f(x, *p)
    w = 1.0 / sigma**2 if "sigma" in kw else np.ones_like(y)
    rss = float(np.sum(w * r * r))
    se = np.sqrt(np.diag(cov))
    return {
        "names": ["lnD", "Cs", "C0"],
        "params": [float(v) for v in p],
        "D": float(math.exp(p[0])),
        "stderr": [float(v) for v in se],
        "cov": [[float(v) for v in row] for row in cov],
        "rss": rss,
        "n": int(len(y)),
        "dof": int(len(y) - 3),
    }


def main():
    out = {
        "generated_by": "testdata/reference/scipy_erf.py",
        "library": "scipy.optimize.curve_fit (method lm, MINPACK), ftol=xtol=gtol=1e-15",
        "versions": {"python": platform.python_version(), "numpy": np.__version__,
                     "scipy": scipy.__version__},
        "note": "stderr and cov are on the fitted scale: ln D (dimensionless), Cs and C0 (value unit)",
        "erf_fixed": fit("erf_fixed.csv"),
        "erf_weighted_scaled": fit("erf_weighted.csv", weighted=True, absolute_sigma=False),
        "erf_weighted_absolute": fit("erf_weighted.csv", weighted=True, absolute_sigma=True),
    }
    with open("scipy_erf.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    json.dump(out["erf_fixed"]["params"], sys.stdout)
    print()


if __name__ == "__main__":
    main()
