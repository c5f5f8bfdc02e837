"""Reference values of the group-derived test (test/run/group-derived.test.ts): derived quantities reading
named groups of a per-group fit, on the invented plate of test/run/joint/plate.csv (a 4-parameter logistic
per sample; REF and TEST).

- joint: bottom/top/slope shared, ec50 per sample, the stacked problem solved by
  scipy.optimize.least_squares (method 'lm', tolerances 1e-15), covariance C = s²(JᵀJ)⁻¹ from its Jacobian;
  rel = ec50[REF] / ec50[TEST] and mix = top·ec50[REF] − ec50[TEST] with the delta-method variance gᵀCg,
  g the exact gradient (written out below), C the whole stacked covariance (cross-group terms included);
- separate: each sample fitted alone (4 parameters), rel with the two samples independent
  (var = g_REF² C_REF[ec50,ec50] + g_TEST² C_TEST[ec50,ec50]), and diff_in = ec50[TEST] − top[TEST]
  within the one group TEST (gᵀ C_TEST g, TEST's own covariance).
Regenerate: python3 test/run/group-derived/reference.py > test/run/group-derived/reference.json
"""
import csv, json, os, sys
import numpy as np
import scipy
from scipy.optimize import least_squares

here = os.path.dirname(os.path.abspath(__file__))
rows = list(csv.DictReader(open(os.path.join(here, "..", "joint", "plate.csv"))))
groups = sorted({r["sample"] for r in rows})
assert groups == ["REF", "TEST"]
data = {g: (np.array([float(r["dose"]) for r in rows if r["sample"] == g]), np.array([float(r["signal"]) for r in rows if r["sample"] == g])) for g in groups}

def curve(x, bottom, top, slope, ec50):
    return bottom + (top - bottom) / (1 + (x / ec50) ** slope)

def joint(theta):
    bottom, top, slope = theta[:3]
    return np.concatenate([data[g][1] - curve(data[g][0], bottom, top, slope, theta[3 + k]) for k, g in enumerate(groups)])

tol = dict(xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=100000)
fit = least_squares(joint, np.array([0.1, 2.0, 1.0, 1.0, 1.0]), method="lm", **tol)
n, p = fit.fun.size, fit.x.size
s2 = float(fit.fun @ fit.fun) / (n - p)
C = np.linalg.inv(fit.jac.T @ fit.jac) * s2
b, t, sl, a_ref, a_test = fit.x
rel = a_ref / a_test
g_rel = np.array([0, 0, 0, 1 / a_test, -a_ref / a_test**2])
mix = t * a_ref - a_test
g_mix = np.array([0, a_ref, 0, t, -1])

sep = {}
for g in groups:
    x, y = data[g]
    r = least_squares(lambda th: y - curve(x, *th), np.array([0.1, 2.0, 1.0, 1.0]), method="lm", **tol)
    s2g = float(r.fun @ r.fun) / (x.size - 4)
    sep[g] = (r.x, np.linalg.inv(r.jac.T @ r.jac) * s2g, x.size - 4)
(xr, Cr, _), (xt, Ct, dof_t) = sep["REF"], sep["TEST"]
rel_sep = xr[3] / xt[3]
var_sep = (1 / xt[3]) ** 2 * Cr[3, 3] + (xr[3] / xt[3] ** 2) ** 2 * Ct[3, 3]
g_in = np.array([0, -1, 0, 1])
diff_in = xt[3] - xt[1]

json.dump({
    "library": f"scipy {scipy.__version__}, numpy {np.__version__}",
    "joint": {
        "dof": n - p,
        "rel": rel, "rel_se": float(np.sqrt(g_rel @ C @ g_rel)),
        "rel_se_without_cross": float(np.sqrt(g_rel[3] ** 2 * C[3, 3] + g_rel[4] ** 2 * C[4, 4])),
        "mix": mix, "mix_se": float(np.sqrt(g_mix @ C @ g_mix)),
    },
    "separate": {
        "rel": rel_sep, "rel_se": float(np.sqrt(var_sep)),
        "diff_in_test": diff_in, "diff_in_test_se": float(np.sqrt(g_in @ Ct @ g_in)), "test_dof": dof_t,
    },
}, sys.stdout, indent=1)
print()
