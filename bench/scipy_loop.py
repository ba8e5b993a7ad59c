#!/usr/bin/python3
"""The plain scipy loop fickfit's throughput is compared with (bench/compare.py).

It does the job of `fickfit fit FILE --ci wald --format csv` on a long table
written by `go run ./bench/gentable`: read the file (csv module), group the
rows by specimen, and fit each profile with scipy.optimize.curve_fit (MINPACK
Levenberg-Marquardt) to the constant-surface erf model
C(x) = Cs + (C0 - Cs) erf(x / (2 sqrt(D t))), parameters ln D, Cs, C0;
then write D with its Wald interval (Student t, from pcov) per profile.
Starting values as fickfit takes them: Cs and C0 from the shallowest and
deepest points, sqrt(Dt) from the depth where the profile is half-way.

Usage: /usr/bin/python3 bench/scipy_loop.py TABLE.csv OUT.csv
Tested with Debian's python3-scipy 1.10.1 (numpy 1.24).
"""
import csv
import math
import sys

import numpy as np
from scipy.optimize import curve_fit
from scipy.special import erf
from scipy.stats import t as student_t

ERF_HALF = 0.4769362762044699  # erf(u) = 1/2


def profiles(path):
    """Yields (id, T_K, t_s, depth_m, value) per specimen, rows grouped."""
    with open(path, newline="") as f:
        rd = csv.reader(f)
        head = next(rd)
        i_id, i_T, i_t = head.index("specimen"), head.index("temperature_C"), head.index("time_h")
        i_x, i_y = head.index("depth_um"), head.index("C_wt%")
        cur, xs, ys, T, t = None, [], [], 0.0, 0.0
        for row in rd:
            if row[i_id] != cur:
                if cur is not None:
                    yield cur, T, t, np.array(xs), np.array(ys)
                cur, xs, ys = row[i_id], [], []
                T, t = float(row[i_T]) + 273.15, float(row[i_t]) * 3600.0
            xs.append(float(row[i_x]) * 1e-6)
            ys.append(float(row[i_y]))
        if cur is not None:
            yield cur, T, t, np.array(xs), np.array(ys)


def start(x, y, t):
    m = min(max(len(y) // 6, 1), 5)
    cs, c0 = y[:m].mean(), y[-m:].mean()
    mid = (cs + c0) / 2
    sign = 1.0 if c0 >= cs else -1.0
    xh = x[-1]
    for i in range(1, len(x)):
        a, b = sign * (y[i - 1] - mid), sign * (y[i] - mid)
        if a < 0 <= b:
            xh = x[i - 1] + a / (a - b) * (x[i] - x[i - 1])
            break
    sdt = xh / (2 * ERF_HALF)
    return [math.log(sdt * sdt / t), cs, c0]


def main():
    src, dst = sys.argv[1], sys.argv[2]
    tq = {}
    with open(dst, "w", newline="") as out:
        w = csv.writer(out)
        w.writerow(["id", "temperature_K", "time_s", "D_m2_s", "D_ci_lo", "D_ci_hi", "Cs", "C0", "rss"])
        for pid, T, t, x, y in profiles(src):
            def f(x, lnD, cs, c0):
                return cs + (c0 - cs) * erf(x / (2.0 * np.sqrt(np.exp(lnD) * t)))
            try:
                p, cov = curve_fit(f, x, y, p0=start(x, y, t))
            except RuntimeError as e:
                w.writerow([pid, T, t, "", "", "", "", "", str(e)])
                continue
            dof = len(x) - 3
            if dof not in tq:
                tq[dof] = student_t.ppf(0.975, dof)
            se = math.sqrt(cov[0][0])
            r = y - f(x, *p)
            w.writerow([pid, T, t, math.exp(p[0]), math.exp(p[0] - tq[dof] * se), math.exp(p[0] + tq[dof] * se),
                        p[1], p[2], float(r @ r)])


if __name__ == "__main__":
    main()
