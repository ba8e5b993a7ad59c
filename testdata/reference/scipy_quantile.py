#!/usr/bin/python3
"""Reference values for the bootstrap percentile rule of fit/matano (quantile,
Hyndman & Fan type 6: the p(n + 1)-th order statistic, interpolated) from
scipy.stats.mstats.mquantiles with alphap = betap = 0, which is that type.
Output: scipy_quantile.json. Run with Debian's python3-scipy:
    /usr/bin/python3 scipy_quantile.py
"""
import json
import platform

import numpy as np
import scipy
from scipy.stats.mstats import mquantiles

cases = []
for data, probs in [
    (list(range(1, 120)), [0.025, 0.975, 0.5, 0.0125, 0.3]),
    ([1.0, 2.0, 3.0, 4.0], [0.5, 0.1, 0.95, 0.4]),
    ([0.3, -1.2, 4.4, 2.0, 2.0, 7.5, 0.0], [0.05, 0.25, 0.5, 0.9]),
]:
    q = mquantiles(np.array(data, dtype=float), prob=probs, alphap=0, betap=0)
    cases.append({"data": data, "p": probs, "quantile": [float(v) for v in q]})

out = {
    "source": "scipy.stats.mstats.mquantiles(alphap=0, betap=0)",
    "versions": {"python": platform.python_version(), "scipy": scipy.__version__, "numpy": np.__version__},
    "cases": cases,
}
with open("scipy_quantile.json", "w") as f:
    json.dump(out, f)
    f.write("\n")
