#!/usr/bin/python3
"""Times `fickfit fit TABLE --ci wald --format csv` against the plain scipy
loop (bench/scipy_loop.py) on the same generated long table, side by side.

    /usr/bin/python3 bench/compare.py [--profiles 20000] [--points 50] [--runs 5]

From the repository root. It builds fickfit and the table generator
(go build), writes the table once (internal/longtable, seed 5: 20,000
profiles x 50 points is 27.8 MB), then runs the two programs alternately,
--runs times each, and prints for each its wall time, CPU time (user+sys)
and largest resident set per run, the medians, and the ratio of the median
wall times. The machine may be shared: the load average is printed before
and after, and a run is worth quoting only when the load stayed low.
Both programs write their results to a file (fickfit with -o; the scipy
loop its own CSV), as a lab would.
"""
import argparse
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time


def run(cmd):
    """Runs cmd; returns (wall s, cpu s, max RSS MB)."""
    t0 = time.perf_counter()
    p = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, ru = os.wait4(p.pid, 0)
    wall = time.perf_counter() - t0
    err = p.stderr.read().decode(errors="replace")
    p.stderr.close()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit("%s failed (%d): %s" % (cmd[0], os.waitstatus_to_exitcode(status), err[:500]))
    return wall, ru.ru_utime + ru.ru_stime, ru.ru_maxrss / 1024


def cpu_model():
    try:
        with open("/proc/cpuinfo") as f:
            for line in f:
                if line.startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown"


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--profiles", type=int, default=20000)
    ap.add_argument("--points", type=int, default=50)
    ap.add_argument("--runs", type=int, default=5)
    a = ap.parse_args()
    here = os.path.dirname(os.path.abspath(__file__))
    root = os.path.dirname(here)
    tmp = tempfile.mkdtemp(prefix="fickfit-bench-")
    fickfit, gen = os.path.join(tmp, "fickfit"), os.path.join(tmp, "gentable")
    subprocess.run(["go", "build", "-o", fickfit, "./cmd/fickfit"], cwd=root, check=True)
    subprocess.run(["go", "build", "-o", gen, "./bench/gentable"], cwd=root, check=True)
    table = os.path.join(tmp, "long.csv")
    subprocess.run([gen, "-profiles", str(a.profiles), "-points", str(a.points), "-o", table], check=True)
    import numpy
    import scipy
    print("machine: %d cores, %s; %s; Go binary built here; Python %s, scipy %s, numpy %s" % (
        os.cpu_count(), cpu_model(), platform.platform(), platform.python_version(), scipy.__version__, numpy.__version__))
    print("table: %s, %d profiles x %d points, %.1f MB" % (table, a.profiles, a.points, os.path.getsize(table) / 1e6))
    print("load average before: %.2f %.2f %.2f" % os.getloadavg())
    cmds = {
        "fickfit": [fickfit, "fit", table, "--ci", "wald", "--format", "csv", "-o", os.path.join(tmp, "fickfit.csv")],
        "scipy": ["/usr/bin/python3", os.path.join(here, "scipy_loop.py"), table, os.path.join(tmp, "scipy.csv")],
    }
    res = {k: [] for k in cmds}
    for i in range(a.runs):
        for k, cmd in cmds.items():
            w, c, m = run(cmd)
            res[k].append((w, c, m))
            print("run %d %-8s wall %7.3f s  cpu %7.3f s  max RSS %6.1f MB  (load %.2f)" % (i + 1, k, w, c, m, os.getloadavg()[0]))
    print("load average after: %.2f %.2f %.2f" % os.getloadavg())
    med = {}
    for k, rs in res.items():
        med[k] = [statistics.median(r[j] for r in rs) for j in range(3)]
        print("median %-8s wall %7.3f s  cpu %7.3f s  max RSS %6.1f MB" % (k, *med[k]))
    print("ratio of median wall times, scipy / fickfit: %.1f" % (med["scipy"][0] / med["fickfit"][0]))
    print("ratio of median CPU times, scipy / fickfit: %.1f" % (med["scipy"][1] / med["fickfit"][1]))
    print("fickfit max RSS / table size: %.2f" % (med["fickfit"][2] * 2**20 / os.path.getsize(table)))
    subprocess.run(["rm", "-rf", tmp])


if __name__ == "__main__":
    main()
