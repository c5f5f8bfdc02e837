"""The general-purpose yardstick of the side-by-side benchmark cases (11-14).

What an analyst would otherwise write: read the CSV with a data-frame library
(pandas when installed, else numpy's C reader), fit with a general-purpose
least-squares routine (scipy.optimize.curve_fit for the logistic,
numpy.polyfit with its covariance for the cubic), print the parameters and
their standard errors. Not part of Leastwise; run only by `npm run bench`.

    python3 script_fit.py --csv FILE --model logistic4|cubic [--group COL]

Environment: LEASTWISE_BENCH_RUSAGE=FILE writes {"maxRssKb", "userS", "sysS"}
of this process at exit (the same figures the Node side records).
"""
import argparse
import json
import os
import resource
import sys

import numpy as np
import scipy
from scipy.optimize import curve_fit

try:
    import pandas as pd
except ImportError:  # fall back to numpy's C reader
    pd = None


def logistic4(x, bottom, top, ec50, hill):
    return bottom + (top - bottom) / (1.0 + (x / ec50) ** hill)


def read(path, group):
    if pd is not None:
        frame = pd.read_csv(path)
        return {c: frame[c].to_numpy() for c in frame.columns}
    with open(path) as f:
        names = f.readline().strip().split(",")
    if group is None:
        data = np.loadtxt(path, delimiter=",", skiprows=1)
        return {n: data[:, i] for i, n in enumerate(names)}
    gi = names.index(group)
    cols = [i for i in range(len(names)) if i != gi]
    data = np.loadtxt(path, delimiter=",", skiprows=1, usecols=cols)
    labels = np.loadtxt(path, delimiter=",", skiprows=1, usecols=[gi], dtype=str)
    out = {names[c]: data[:, k] for k, c in enumerate(cols)}
    out[group] = labels
    return out


def fit_logistic(x, y):
    p, cov = curve_fit(logistic4, x, y, p0=[0.0, 100.0, 1.0, 1.0], bounds=([-np.inf, -np.inf, 0.0, -np.inf], np.inf))
    return p, np.sqrt(np.diag(cov))


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--csv", required=True)
    ap.add_argument("--model", choices=["logistic4", "cubic"], required=True)
    ap.add_argument("--x", default="x")
    ap.add_argument("--y", default="y")
    ap.add_argument("--group")
    a = ap.parse_args()
    cols = read(a.csv, a.group)
    x = np.asarray(cols[a.x], dtype=float)
    y = np.asarray(cols[a.y], dtype=float)
    if a.group is None:
        if a.model == "cubic":
            p, cov = np.polyfit(x, y, 3, cov=True)
            se = np.sqrt(np.diag(cov))
        else:
            p, se = fit_logistic(x, y)
        for i, (v, s) in enumerate(zip(p, se)):
            print(f"p{i} {v:.10g} se {s:.4g}")
    else:
        labels = np.asarray(cols[a.group])
        order = np.argsort(labels, kind="stable")
        labels, x, y = labels[order], x[order], y[order]
        starts = np.flatnonzero(np.r_[True, labels[1:] != labels[:-1]])
        ends = np.r_[starts[1:], len(labels)]
        failed = 0
        for s, e in zip(starts, ends):
            try:
                p, se = fit_logistic(x[s:e], y[s:e])
                print(labels[s], " ".join(f"{v:.6g}" for v in p))
            except (RuntimeError, ValueError):
                failed += 1
        print(f"{len(starts)} groups, {failed} failed")
    out = os.environ.get("LEASTWISE_BENCH_RUSAGE")
    if out:
        ru = resource.getrusage(resource.RUSAGE_SELF)
        with open(out, "w") as f:
            json.dump({"maxRssKb": ru.ru_maxrss, "userS": ru.ru_utime, "sysS": ru.ru_stime}, f)


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "--versions":
        print(json.dumps({"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__, "pandas": pd.__version__ if pd is not None else None}))
    else:
        main()
