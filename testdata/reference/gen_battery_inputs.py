#!/usr/bin/python3
"""Writes the seeded random battery of profiles for fit/battery_test.go, once.

These are synthetic INPUTS (seeded pseudo-random truth and noise on the
closed-form models); they are not check values. The check values are the
optima scipy computes from them (scipy_battery.py -> scipy_battery.json).

600 profiles, 100 per case: erf (x0 fixed at 0), erf with x0 free,
masstransfer, thinfilm, couple, slab (one or two faces). Each profile's
values are written on one of four scales, drawn at random: fraction
(0-1.2), percent (x100), ppm (x1e4) or a hardness-like scale (a*y + b with
a = 400-700, b = 200-350). Lengths are in metres; D spans the carburizing
(mm) to interdiffusion (um) scales.

Run: /usr/bin/python3 gen_battery_inputs.py   (writes battery_inputs.csv)
The committed CSV is authoritative; re-running with the same numpy version
reproduces it.
"""
import math

import numpy as np
from scipy.special import erf, erfc, erfcx

N_PER_CASE = 100
CASES = ["erf", "erf-x0", "masstransfer", "thinfilm", "couple", "slab"]
SCALES = ["fraction", "percent", "ppm", "HV"]


def loguniform(rng, lo, hi):
    return math.exp(rng.uniform(math.log(lo), math.log(hi)))


def levels(rng):
    """Surface and deep levels in 'fraction' units: in- or out-diffusion."""
    if rng.uniform() < 2 / 3:
        return rng.uniform(0.6, 1.2), rng.uniform(0.05, 0.3)
    return rng.uniform(0.02, 0.12), rng.uniform(0.4, 0.9)


def slab_theta(x, L, tau, terms=400):
    k = 2 * np.arange(terms) + 1
    s = np.sin(np.outer(x / L, k) * math.pi) / k * np.exp(-(k * math.pi) ** 2 * tau)
    return 1 - 4 / math.pi * s.sum(axis=1)


def draw(rng, case):
    n = int(rng.integers(18, 61))
    t = loguniform(rng, 0.5, 20) * 3600
    thick, faces, free_x0 = 0.0, 0, 0
    if case in ("erf", "erf-x0", "masstransfer", "thinfilm"):
        D = loguniform(rng, 1e-13, 1e-10)
    elif case == "couple":
        D = loguniform(rng, 1e-16, 1e-13)
    else:
        D = loguniform(rng, 1e-12, 1e-10)
    L = 2 * math.sqrt(D * t)  # diffusion length
    if case in ("erf", "erf-x0"):
        cs, c0 = levels(rng)
        x0 = 0.0
        if case == "erf-x0":
            free_x0 = 1
            x0 = -rng.uniform(0.05, 0.3) * L  # material removed before the first point
        x = np.linspace(rng.uniform(0, 0.1) * L, rng.uniform(1.8, 3.5) * L, n)
        y = cs + (c0 - cs) * erf((x - x0) / L)
        step = abs(cs - c0)
    elif case == "masstransfer":
        cp, c0 = levels(rng)
        hs = loguniform(rng, 0.5, 5)
        x = np.linspace(0, rng.uniform(2, 3.5) * L, n)
        u = x / L
        y = c0 + (cp - c0) * (erfc(u) - np.exp(-u * u) * erfcx(u + hs))
        step = abs(cp - c0)
    elif case == "thinfilm":
        c0 = rng.uniform(0.01, 0.3)
        amp = rng.uniform(0.3, 1.5)  # peak height above C0
        M = amp * math.sqrt(math.pi * D * t)
        x = np.linspace(0, rng.uniform(2.5, 4) * L, n)
        y = c0 + M / math.sqrt(math.pi * D * t) * np.exp(-x * x / (4 * D * t))
        step = amp
    elif case == "couple":
        cl, cr = rng.uniform(0.02, 0.4), rng.uniform(0.5, 0.98)
        if rng.uniform() < 0.5:
            cl, cr = cr, cl
        if rng.uniform() < 0.5:
            xm = rng.uniform(-0.3, 0.3) * L
            x = np.linspace(-3 * L, 3 * L, n)
        else:  # a microprobe scan on an all-positive axis
            xm = rng.uniform(2.5, 3.5) * L
            x = np.linspace(0, 6 * L, n)
        v = (x - xm) / L
        y = cl * erfc(v) / 2 + cr * erfc(-v) / 2
        step = abs(cr - cl)
    else:  # slab
        faces = int(rng.integers(1, 3))
        tau = rng.uniform(0.006, 0.04)  # Dt/L_eff^2, first and later modes resolved
        leff = math.sqrt(D * t / tau)
        thick = leff / 2 if faces == 1 else leff
        cs, c0 = levels(rng)
        x = np.linspace(0, thick, n)
        y = c0 + (cs - c0) * slab_theta(x, leff, tau)
        step = abs(cs - c0)
    noise = rng.uniform(0.004, 0.025) * step
    y = y + rng.normal(0, noise, n)
    scale = SCALES[int(rng.integers(0, 4))]
    if scale == "percent":
        y = 100 * y
    elif scale == "ppm":
        y = 1e4 * y
    elif scale == "HV":
        y = rng.uniform(400, 700) * y + rng.uniform(200, 350)
    return dict(n=n, t=t, thick=thick, faces=faces, free_x0=free_x0, x=x, y=y, scale=scale)


def main():
    rng = np.random.default_rng(20261102)
    with open("battery_inputs.csv", "w") as f:
        f.write("# Seeded random battery for fit/battery_test.go (synthetic inputs, not check values).\n")
        f.write("# Written by gen_battery_inputs.py, numpy %s; default_rng(20261102).\n" % np.__version__)
        f.write("id,model,free_x0,scale,time_s,thickness_m,faces,depth_m,value\n")
        k = 0
        for case in CASES:
            for _ in range(N_PER_CASE):
                p = draw(rng, case)
                model = "erf" if case == "erf-x0" else case
                pid = "b%03d-%s" % (k, case)
                for i in range(p["n"]):
                    f.write("%s,%s,%d,%s,%.10g,%.10g,%d,%.10g,%.12g\n" % (
                        pid, model, p["free_x0"], p["scale"], p["t"], p["thick"], p["faces"], p["x"][i], p["y"][i]))
                k += 1


if __name__ == "__main__":
    main()
