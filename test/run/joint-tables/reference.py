"""Reference values of the joint fit over several tables (test/run/joint-tables.test.ts).

Data (invented): the fluorescence of a dye decaying after a flash, one CSV per day (day1.csv, day2.csv with
another column order, an extra column and one row flagged 1 that the spec leaves out, day3.csv); the model
signal = a * exp(-k * time_s) + c with the rate k shared by the three days and a, c per day.

Computed with a general least-squares routine: scipy.optimize.least_squares (method 'lm', tolerances 1e-15) on
the stacked residuals of the three tables, covariance s²(JᵀJ)⁻¹ from its Jacobian (s² = SSR/(n − p)); the
separate fits of each day (every parameter per day) for the shared-versus-separate F test.
Regenerate: python3 test/run/joint-tables/reference.py > test/run/joint-tables/reference.json
"""
import csv, json, os, sys
import numpy as np
import scipy
from scipy.optimize import least_squares

here = os.path.dirname(os.path.abspath(__file__))
days = ["day1", "day2", "day3"]
data = {}
for d in days:
    rows = [r for r in csv.DictReader(open(os.path.join(here, d + ".csv"))) if r.get("flag", "0") == "0"]
    data[d] = (np.array([float(r["time_s"]) for r in rows]), np.array([float(r["signal"]) for r in rows]))

def curve(t, a, k, c):
    return a * np.exp(-k * t) + c

def joint(theta):
    k = theta[0]
    return np.concatenate([data[d][1] - curve(data[d][0], theta[1 + 2 * g], k, theta[2 + 2 * g]) for g, d in enumerate(days)])

tol = dict(xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=100000)
fit = least_squares(joint, np.array([0.5] + [1.0, 0.0] * len(days)), method="lm", **tol)
n, p = fit.fun.size, fit.x.size
ssr = float(fit.fun @ fit.fun)
s2 = ssr / (n - p)
cov = np.linalg.inv(fit.jac.T @ fit.jac) * s2
separate = []
for d in days:
    t, y = data[d]
    r = least_squares(lambda th: y - curve(t, *th), np.array([1.0, 0.5, 0.0]), method="lm", **tol)
    separate.append({"table": d, "estimates": r.x.tolist(), "ssr": float(r.fun @ r.fun), "dof": int(t.size - 3)})
json.dump({
    "library": f"scipy {scipy.__version__}, numpy {np.__version__}",
    "names": ["k"] + [f"{q}[{d}]" for d in days for q in ("a", "c")],
    "estimates": fit.x.tolist(),
    "covariance": cov.tolist(),
    "ssr": ssr, "n": int(n), "dof": int(n - p),
    "separate": separate,
}, sys.stdout, indent=1)
print()
