#!/usr/bin/python3
"""Reference values for the regression diagnostics of an Arrhenius line
(arrhenius/influence.go) and for its prediction interval, computed by
definition with numpy linear algebra: leave-one-out refits, not the closed
forms the Go code uses. For arrhenius/crosscheck_test.go.

Weighted straight line y = b0 + b1*x (x = 1/(R T), y = ln D, weights w):
  leverage      h_i = diag(W^1/2 X (X'WX)^-1 X' W^1/2)
  studentized   t_i = (y_i - yhat_(i)(x_i)) / (s_(i) sqrt(1/w_i + x_i'(X_(i)'W_(i)X_(i))^-1 x_i))
                with yhat_(i), s_(i) from the fit without point i (what R's rstudent gives)
  Cook's D      D_i = (b - b_(i))' X'WX (b - b_(i)) / (p s^2)   (R's cooks.distance)
  outlier p     min(1, 2 n P(t_{n-3} > |t_i|))                  (scipy.stats.t)
  prediction    ln D(T) +- k sqrt(c (1/w_new + x'(X'WX)^-1 x)), 1/w_new = mean(1/w),
                with fickfit's Birge rule: c = s^2 and k = t_{n-2} when s^2 > 1,
                else c = 1 (stated errors kept) and k the normal quantile

The inputs are synthetic (seeded numpy default_rng(140014)): three lots'
worth of coupons at four temperatures, scatter 1.2 x the stated error, and
one coupon whose 927 degC was entered as 927 K. They are not check values;
the check values are this script's outputs. Output: influence.json.
Run with Debian's python3-scipy:  /usr/bin/python3 influence.py
"""
import json
import platform
import sys

import numpy as np
import scipy
from scipy import stats

R = 8.314462618


def inputs():
    rng = np.random.default_rng(140014)
    T, y, w, ids = [], [], [], []
    lnD0, Q = np.log(2.3e-5), 148e3
    for tc in (880.0, 910.0, 940.0, 970.0):
        for rep in range(3):
            Tk = tc + 273.15
            se = 0.04 + 0.02 * rng.random()
            T.append(Tk)
            y.append(lnD0 - Q / (R * Tk) + 1.2 * se * rng.standard_normal())
            w.append(1 / se**2)
            ids.append("C%d-%d" % (int(tc), rep + 1))
    # the slip: 927 degC measured, 927 K written
    se = 0.05
    y.append(lnD0 - Q / (R * (927 + 273.15)) + se * rng.standard_normal())
    T.append(927.0)
    w.append(1 / se**2)
    ids.append("C927-slip")
    return ids, np.array(T), np.array(y), np.array(w)


def wls(X, y, w):
    W = np.diag(w)
    A = X.T @ W @ X
    b = np.linalg.solve(A, X.T @ W @ y)
    e = np.sqrt(w) * (y - X @ b)
    return b, A, e


def main():
    ids, T, y, w = inputs()
    n, p = len(T), 2
    x = 1 / (R * T)
    X = np.column_stack([np.ones(n), x])
    b, A, e = wls(X, y, w)
    s2 = e @ e / (n - p)
    Ainv = np.linalg.inv(A)
    h = np.array([w[i] * X[i] @ Ainv @ X[i] for i in range(n)])
    t, cook = [], []
    for i in range(n):
        keep = np.arange(n) != i
        bi, Ai, ei = wls(X[keep], y[keep], w[keep])
        si2 = ei @ ei / (n - 1 - p)
        pred = X[i] @ bi
        t.append((y[i] - pred) / np.sqrt(si2 * (1 / w[i] + X[i] @ np.linalg.inv(Ai) @ X[i])))
        d = b - bi
        cook.append(d @ A @ d / (p * s2))
    t = np.array(t)
    outp = np.minimum(1, 2 * n * stats.t.sf(np.abs(t), n - p - 1))

    # Prediction interval for a single new point at 925 degC, from the fit
    # without the slipped point (the line a careful user keeps).
    keep = np.array([i != "C927-slip" for i in ids])
    bk, Ak, ek = wls(X[keep], y[keep], w[keep])
    nk = int(keep.sum())
    s2k = ek @ ek / (nk - p)
    x0 = np.array([1, 1 / (R * 1198.15)])
    mean = x0 @ bk
    c = s2k if s2k > 1 else 1.0
    k = stats.t.ppf(0.975, nk - p) if s2k > 1 else stats.norm.ppf(0.975)
    var_mean = c * x0 @ np.linalg.inv(Ak) @ x0
    var_new = c * np.mean(1 / w[keep])
    out = {
        "source": "numpy/scipy by definition (leave-one-out refits); see influence.py",
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "R_J_per_mol_K": R,
        "points": [{"id": ids[i], "temperature_K": float(T[i]), "lnD": float(y[i]), "weight": float(w[i]),
                    "leverage": float(h[i]), "studentized": float(t[i]), "cooks_distance": float(cook[i]),
                    "outlier_p_bonferroni": float(outp[i])} for i in range(n)],
        "prediction_without_slip": {"temperature_K": 1198.15, "lnD": float(mean),
                                    "birge_ratio_squared": float(s2k),
                                    "ci_mean": [float(np.exp(mean - k * np.sqrt(var_mean))), float(np.exp(mean + k * np.sqrt(var_mean)))],
                                    "prediction_interval": [float(np.exp(mean - k * np.sqrt(var_mean + var_new))),
                                                            float(np.exp(mean + k * np.sqrt(var_mean + var_new)))]},
    }
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


main()
