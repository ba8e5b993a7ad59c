#!/usr/bin/python3
"""Reference optima for the random battery (fit/battery_test.go), computed
independently with scipy.optimize.least_squares, multi-start.

Inputs: battery_inputs.csv (synthetic, written by gen_battery_inputs.py).
Output: battery_scipy.json with the library versions.

Each profile is fitted in the same parametrisation as fickfit (ln D, and
ln beta / ln M for the masstransfer and thin-film models) but with this
script's own model code (scipy.special erf/erfc/erfcx; the slab by its
Fourier series, odd terms until exp(-k^2 pi^2 Dt/L^2) < 1e-18, at most
2000), analytic Jacobians, MINPACK Levenberg-Marquardt (method="lm",
x_scale="jac", ftol = xtol = gtol = 1e-15).
Starts: a grid over the nonlinear parameters (diffusion length 2 sqrt(Dt),
and h sqrt(Dt), x0 or the interface position), the levels at each node by
linear least squares (separable least squares); least_squares runs from the
12 best nodes and the 4 nodes spread over the grid, and the least residual
sum is kept. Nothing from fickfit is used.

Each reference point is also classified: "interior" when it is an
identified optimum inside the model (condition number of the Jacobian with
unit columns below 1e6, i.e. of J^T J below 1e12, and every level within ten
data ranges of the data), "runoff" otherwise: MINPACK then stopped on a
valley that runs off towards a limit of the model (beta -> 0 with Cp -> inf,
C0 -> -inf late in a slab uptake), where no finite optimum exists.

Run with Debian's python3-scipy:  /usr/bin/python3 scipy_battery.py
"""
import csv
import json
import math
import platform
import sys

import numpy as np
import scipy
from scipy.optimize import least_squares
from scipy.special import erf, erfc, erfcx

SQPI = math.sqrt(math.pi)


def erfcx_deriv(a):
    """d erfcx/da = 2a erfcx(a) - 2/sqrt(pi), by its asymptotic series for
    large a, where the direct form cancels (A&S 7.1.23)."""
    a = np.asarray(a, dtype=float)
    out = 2 * a * erfcx(a) - 2 / SQPI
    big = a > 20
    if np.any(big):
        z = 1 / (2 * a[big] ** 2)
        term = np.ones_like(z)
        s = np.zeros_like(z)
        for m in range(1, 12):
            term = term * (-(2 * m - 1) * z)
            s += term
        out[big] = 2 / SQPI * s
    return out


# Each model: f(p, x, aux) -> values, jac(p, x, aux) -> n x k, basis(l, extra, x, aux)
# -> shape g for the separable start (y = a + b g) and a mapping back.

def erf_f(p, x, aux):
    t, free_x0 = aux["t"], aux["free_x0"]
    lnD, cs, c0 = p[:3]
    x0 = p[3] if free_x0 else 0.0
    s = 2 * math.sqrt(math.exp(lnD) * t)
    u = (x - x0) / s
    return cs + (c0 - cs) * erf(u)


def erf_j(p, x, aux):
    t, free_x0 = aux["t"], aux["free_x0"]
    lnD, cs, c0 = p[:3]
    x0 = p[3] if free_x0 else 0.0
    s = 2 * math.sqrt(math.exp(lnD) * t)
    u = (x - x0) / s
    g = (c0 - cs) * 2 / SQPI * np.exp(-u * u)
    cols = [-0.5 * u * g, 1 - erf(u), erf(u)]
    if free_x0:
        cols.append(-g / s)
    return np.column_stack(cols)


def mt_shape(u, a):
    eu = np.exp(-u * u)
    ex = erfcx(a)
    g = erfc(u) - eu * ex
    gu = -2 / SQPI * eu + 2 * u * eu * ex
    ga = -eu * erfcx_deriv(a)
    return g, gu, ga


def mt_f(p, x, aux):
    t = aux["t"]
    lnD, lnb, cp, c0 = p
    D, b = math.exp(lnD), math.exp(lnb)
    sq = math.sqrt(D * t)
    u = x / (2 * sq)
    g, _, _ = mt_shape(u, u + b * t / sq)
    return c0 + (cp - c0) * g


def mt_j(p, x, aux):
    t = aux["t"]
    lnD, lnb, cp, c0 = p
    D, b = math.exp(lnD), math.exp(lnb)
    sq = math.sqrt(D * t)
    hs = b * t / sq
    u = x / (2 * sq)
    a = u + hs
    g, gu, ga = mt_shape(u, a)
    dc = cp - c0
    return np.column_stack([dc * (gu * (-u / 2) + ga * (-a / 2)), dc * ga * hs, g, 1 - g])


def tf_f(p, x, aux):
    t = aux["t"]
    lnD, lnM, c0 = p
    dt = math.exp(lnD) * t
    return c0 + math.exp(lnM) / math.sqrt(math.pi * dt) * np.exp(-x * x / (4 * dt))


def tf_j(p, x, aux):
    t = aux["t"]
    lnD, lnM, c0 = p
    dt = math.exp(lnD) * t
    q = x * x / (4 * dt)
    G = math.exp(lnM) / math.sqrt(math.pi * dt) * np.exp(-q)
    return np.column_stack([G * (q - 0.5), G, np.ones_like(x)])


def cp_f(p, x, aux):
    t = aux["t"]
    lnD, cl, cr, xm = p
    v = (x - xm) / (2 * math.sqrt(math.exp(lnD) * t))
    return cl * erfc(v) / 2 + cr * erfc(-v) / 2


def cp_j(p, x, aux):
    t = aux["t"]
    lnD, cl, cr, xm = p
    s = 2 * math.sqrt(math.exp(lnD) * t)
    v = (x - xm) / s
    gv = (cr - cl) / SQPI * np.exp(-v * v)
    return np.column_stack([-gv * v / 2, erfc(v) / 2, erfc(-v) / 2, -gv / s])


def slab_theta(x, leff, tau):
    # Odd k up to where exp(-k^2 pi^2 tau) < 1e-18 (at most 2000 terms).
    kmax = math.sqrt(42 / (math.pi ** 2 * max(tau, 1e-300)))
    terms = int(min(2000, kmax / 2 + 2))
    KS = 2 * np.arange(terms) + 1.0
    arg = np.outer(x / leff, KS) * math.pi
    e = np.exp(-(KS * math.pi) ** 2 * tau)
    th = 1 - 4 / math.pi * (np.sin(arg) / KS * e).sum(axis=1)
    dth = 4 * math.pi * tau * (np.sin(arg) * KS * e).sum(axis=1)
    return th, dth


def slab_leff(aux):
    return aux["thick"] * (2 if aux["faces"] == 1 else 1)


def sl_f(p, x, aux):
    lnD, cs, c0 = p
    leff = slab_leff(aux)
    th, _ = slab_theta(x, leff, math.exp(lnD) * aux["t"] / leff ** 2)
    return c0 + (cs - c0) * th


def sl_j(p, x, aux):
    lnD, cs, c0 = p
    leff = slab_leff(aux)
    th, dth = slab_theta(x, leff, math.exp(lnD) * aux["t"] / leff ** 2)
    return np.column_stack([(cs - c0) * dth, th, 1 - th])


def linear_levels(g, y):
    A = np.column_stack([np.ones_like(g), g])
    if not np.all(np.isfinite(g)) or np.ptp(g) < 1e-12:
        return None
    sol, *_ = np.linalg.lstsq(A, y, rcond=None)
    r = y - A @ sol
    return sol[0], sol[1], float(r @ r)


def starts(model, x, y, aux):
    """Grid nodes: (rss, p0) with the levels from linear least squares."""
    t = aux["t"]
    span = float(np.max(np.abs(x))) if model != "couple" else float(np.ptp(x))
    out = []
    lengths = np.exp(np.linspace(math.log(span / 100), math.log(10 * span), 40))
    if model == "erf":
        x0s = [0.0] if not aux["free_x0"] else list(np.linspace(-0.6, 0.1, 8) * span)
        for l in lengths:
            for x0 in x0s:
                r = linear_levels(erf((x - x0) / l), y)
                if r:
                    a, b, rss = r  # y = a + b erf: Cs = a, C0 = a + b
                    p = [math.log(l * l / (4 * t)), a, a + b] + ([x0] if aux["free_x0"] else [])
                    out.append((rss, p))
    elif model == "masstransfer":
        for l in lengths:
            for hs in [0.1, 0.3, 1, 3, 10, 30]:
                u = x / l
                g, _, _ = mt_shape(u, u + hs)
                r = linear_levels(g, y)
                if r:
                    a, b, rss = r  # y = C0 + (Cp - C0) g
                    D = l * l / (4 * t)
                    out.append((rss, [math.log(D), math.log(hs * math.sqrt(D / t)), a + b, a]))
    elif model == "thinfilm":
        for l in lengths:
            g = 2 / (SQPI * l) * np.exp(-(x / l) ** 2)
            r = linear_levels(g, y)
            if r and r[1] > 0:
                a, b, rss = r
                out.append((rss, [math.log(l * l / (4 * t)), math.log(b), a]))
    elif model == "couple":
        for l in np.exp(np.linspace(math.log(span / 200), math.log(2 * span), 40)):
            for xm in np.linspace(x.min(), x.max(), 15)[1:-1]:
                r = linear_levels(erfc(-(x - xm) / l) / 2, y)
                if r:
                    a, b, rss = r
                    out.append((rss, [math.log(l * l / (4 * t)), a, a + b, xm]))
    elif model == "slab":
        leff = slab_leff(aux)
        for l in np.exp(np.linspace(math.log(span / 100), math.log(4 * leff), 40)):
            th, _ = slab_theta(x, leff, l * l / (4 * leff * leff))
            r = linear_levels(th, y)
            if r:
                a, b, rss = r
                out.append((rss, [math.log(l * l / (4 * t)), a + b, a]))
    out.sort(key=lambda v: v[0])
    pick = out[:12]
    if len(out) > 12:
        for i in np.linspace(12, len(out) - 1, 4).astype(int):
            pick.append(out[i])
    return [np.array(p, dtype=float) for _, p in pick]


MODELS = {"erf": (erf_f, erf_j), "masstransfer": (mt_f, mt_j), "thinfilm": (tf_f, tf_j),
          "couple": (cp_f, cp_j), "slab": (sl_f, sl_j)}
NAMES = {"erf": ["lnD", "Cs", "C0"], "masstransfer": ["lnD", "lnbeta", "Cp", "C0"],
         "thinfilm": ["lnD", "lnM", "C0"], "couple": ["lnD", "CL", "CR", "xm"], "slab": ["lnD", "Cs", "C0"]}


def fit_one(model, x, y, aux):
    f, j = MODELS[model]
    best = None
    nfev = 0
    ok = 0
    for p0 in starts(model, x, y, aux):
        try:
            with np.errstate(all="ignore"):
                res = least_squares(lambda p: f(p, x, aux) - y, p0, jac=lambda p: j(p, x, aux), method="lm",
                                    x_scale="jac", ftol=1e-15, xtol=1e-15, gtol=1e-15, max_nfev=20000)
        except (ValueError, FloatingPointError, OverflowError, ZeroDivisionError):
            continue
        nfev += res.nfev
        r = f(res.x, x, aux) - y
        rss = float(r @ r)
        if not math.isfinite(rss):
            continue
        ok += 1
        if best is None or rss < best[0]:
            best = (rss, res.x.copy(), int(res.status))
    return best, nfev, ok


LEVELS = {"erf": [1, 2], "masstransfer": [2, 3], "thinfilm": [2], "couple": [1, 2], "slab": [1, 2]}


def classify(model, p, x, y, aux):
    J = MODELS[model][1](p, x, aux)
    norms = np.sqrt((J * J).sum(axis=0))
    cond = float(np.linalg.cond(J / np.where(norms > 0, norms, 1))) if np.all(norms > 0) else math.inf
    rng = float(np.ptp(y))
    inside = all(y.min() - 10 * rng <= p[i] <= y.max() + 10 * rng for i in LEVELS[model])
    return cond, ("interior" if cond < 1e6 and inside else "runoff")


def main():
    profiles = {}
    order = []
    with open("battery_inputs.csv") as fh:
        rows = csv.DictReader(line for line in fh if not line.startswith("#"))
        for row in rows:
            pid = row["id"]
            if pid not in profiles:
                order.append(pid)
                profiles[pid] = dict(model=row["model"], t=float(row["time_s"]), thick=float(row["thickness_m"]),
                                     faces=int(row["faces"]), free_x0=int(row["free_x0"]), scale=row["scale"],
                                     x=[], y=[])
            profiles[pid]["x"].append(float(row["depth_m"]))
            profiles[pid]["y"].append(float(row["value"]))
    fits = {}
    for pid in order:
        pr = profiles[pid]
        x, y = np.array(pr["x"]), np.array(pr["y"])
        best, nfev, ok = fit_one(pr["model"], x, y, pr)
        names = NAMES[pr["model"]] + (["x0"] if pr["free_x0"] else [])
        cond, kind = classify(pr["model"], best[1], x, y, pr)
        fits[pid] = {"model": pr["model"], "free_x0": bool(pr["free_x0"]), "scale": pr["scale"],
                     "names": names, "params": [float(v) for v in best[1]], "D": math.exp(best[1][0]),
                     "rss": best[0], "minpack_status": best[2], "starts_converged": ok, "nfev": nfev,
                     "cond": cond, "kind": kind}
        print(pid, fits[pid]["D"], best[0], file=sys.stderr)
    out = {
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "method": "scipy.optimize.least_squares(method='lm', x_scale='jac', ftol=xtol=gtol=1e-15), analytic "
                  "Jacobians, multi-start from a separable-least-squares grid (16 starts); least RSS kept",
        "inputs": "battery_inputs.csv",
        "fits": fits,
    }
    with open("battery_scipy.json", "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
