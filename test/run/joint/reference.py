"""Reference values of the joint fit test (test/run/joint.test.ts): the stacked problem of plate.csv
(a 4-parameter logistic per sample, bottom/top/slope shared, ec50 per sample) solved by
scipy.optimize.least_squares (method 'lm', tolerances 1e-15), covariance s²(JᵀJ)⁻¹ from its Jacobian,
and the separate fits of each sample for the shared-versus-separate F test.
Regenerate: python3 test/run/joint/reference.py > test/run/joint/reference.json
"""
import csv, json, os, sys
import numpy as np
import scipy
from scipy.optimize import least_squares

here = os.path.dirname(os.path.abspath(__file__))
rows = list(csv.DictReader(open(os.path.join(here, "plate.csv"))))
groups = sorted({r["sample"] for r in rows})
data = {g: (np.array([float(r["dose"]) for r in rows if r["sample"] == g]), np.array([float(r["signal"]) for r in rows if r["sample"] == g])) for g in groups}

def curve(x, bottom, top, slope, ec50):
    return bottom + (top - bottom) / (1 + (x / ec50) ** slope)

def joint(theta):
    bottom, top, slope = theta[:3]
    return np.concatenate([data[g][1] - curve(data[g][0], bottom, top, slope, theta[3 + k]) for k, g in enumerate(groups)])

tol = dict(xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=100000)
fit = least_squares(joint, np.array([0.1, 2.0, 1.0] + [1.0] * len(groups)), method="lm", **tol)
n, p = fit.fun.size, fit.x.size
ssr = float(fit.fun @ fit.fun)
s2 = ssr / (n - p)
cov = np.linalg.inv(fit.jac.T @ fit.jac) * s2
sep_ssr = 0.0
sep_dof = 0
for g in groups:
    x, y = data[g]
    r = least_squares(lambda t: y - curve(x, *t), np.array([0.1, 2.0, 1.0, 1.0]), method="lm", **tol)
    sep_ssr += float(r.fun @ r.fun)
    sep_dof += x.size - 4
json.dump({
    "library": f"scipy {scipy.__version__}, numpy {np.__version__}",
    "names": ["bottom", "top", "slope"] + [f"ec50[{g}]" for g in groups],
    "estimates": fit.x.tolist(),
    "covariance": cov.tolist(),
    "ssr": ssr, "dof": n - p,
    "separate": {"ssr": sep_ssr, "dof": sep_dof},
}, sys.stdout, indent=1)
print()
