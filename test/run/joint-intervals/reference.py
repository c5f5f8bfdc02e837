"""Reference values of the joint fits' profile intervals (test/run/joint-intervals.test.ts), computed by hand
with general-purpose routines on the stacked problem of test/run/joint/plate.csv (a 4-parameter logistic per
sample, bottom/top/slope shared, ec50 per sample):
- the joint fit by scipy.optimize.least_squares (method 'lm', tolerances 1e-15), s² = SSR/(n − P);
- the profile of each parameter: S̃(v) = min SSR with the parameter held at v (least_squares on the others),
  τ(v) = sign(v − θ̂)·√(S̃(v) − Ŝ)/s, the ends where |τ| = t(0.975, n − P) by scipy.optimize.brentq
  (Bates & Watts 1988, Nonlinear Regression Analysis and Its Applications, §6.1);
- the profile of the ratio ec50[REF]/ec50[TEST]: S̃(v) = min SSR with ec50[REF] = v·ec50[TEST];
- Fieller's interval of the same ratio by its formula (Fieller 1954, "Some problems in interval estimation",
  J. R. Statist. Soc. B 16:175–185): the roots ρ of (a − ρb)² = t²(V_aa − 2ρV_ab + ρ²V_bb), with a, b the
  two estimates and V their Wald covariance s²(JᵀJ)⁻¹.
Regenerate: python3 test/run/joint-intervals/reference.py > test/run/joint-intervals/reference.json
"""
import csv, json, os, sys
import numpy as np
import scipy
from scipy.optimize import least_squares, brentq
from scipy.stats import t as student

here = os.path.dirname(os.path.abspath(__file__))
rows = list(csv.DictReader(open(os.path.join(here, "..", "joint", "plate.csv"))))
groups = sorted({r["sample"] for r in rows})
data = {g: (np.array([float(r["dose"]) for r in rows if r["sample"] == g]), np.array([float(r["signal"]) for r in rows if r["sample"] == g])) for g in groups}

def curve(x, bottom, top, slope, ec50):
    return bottom + (top - bottom) / (1 + (x / ec50) ** slope)

def joint(theta):
    bottom, top, slope = theta[:3]
    return np.concatenate([data[g][1] - curve(data[g][0], bottom, top, slope, theta[3 + k]) for k, g in enumerate(groups)])

tol = dict(xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=100000)
fit = least_squares(joint, np.array([0.1, 2.0, 1.0] + [1.0] * len(groups)), method="lm", **tol)
n, P = fit.fun.size, fit.x.size
ssr = float(fit.fun @ fit.fun)
dof = n - P
s = np.sqrt(ssr / dof)
cov = np.linalg.inv(fit.jac.T @ fit.jac) * s * s
se = np.sqrt(np.diag(cov))
tq = float(student.ppf(0.975, dof))

def profile_end(full_theta, center, step, direction):
    """full_theta(v, start) -> (ssr, rest): the constrained minimum; the end where |tau| = t on one side."""
    state = {"start": None}
    def tau(v):
        val, rest = full_theta(v, state["start"])
        state["start"] = rest
        return np.sign(v - center) * np.sqrt(max(0.0, val - ssr)) / s
    lo = center
    state["start"] = None
    k = 1
    while True:
        hi = center + direction * k * step
        if abs(tau(hi)) >= tq:
            break
        lo = hi
        k += 1
    a, b = sorted([lo, hi])
    return brentq(lambda v: abs(tau(v)) - tq, a, b, xtol=1e-14 * abs(center) + 1e-300, rtol=1e-14)

def held(j):
    def solve(v, start):
        others = [i for i in range(P) if i != j]
        x0 = fit.x[others] if start is None else start
        def r(phi):
            th = np.empty(P); th[others] = phi; th[j] = v
            return joint(th)
        out = least_squares(r, x0, method="lm", **tol)
        return float(out.fun @ out.fun), out.x
    return solve

names = ["bottom", "top", "slope"] + [f"ec50[{g}]" for g in groups]
profiles = {}
for j in range(P):
    f = held(j)
    profiles[names[j]] = [profile_end(f, fit.x[j], se[j], -1), profile_end(f, fit.x[j], se[j], +1)]

# ratio REF / TEST: ec50[REF] = v * ec50[TEST]
a, b = fit.x[3], fit.x[4]
ratio = a / b
grad = np.array([0, 0, 0, 1 / b, -a / b ** 2])
ratio_se = float(np.sqrt(grad @ cov @ grad))
def ratio_solve(v, start):
    others = [0, 1, 2, 4]
    x0 = fit.x[others] if start is None else start
    def r(phi):
        th = np.array([phi[0], phi[1], phi[2], v * phi[3], phi[3]])
        return joint(th)
    out = least_squares(r, x0, method="lm", **tol)
    return float(out.fun @ out.fun), out.x
ratio_profile = [profile_end(ratio_solve, ratio, ratio_se, -1), profile_end(ratio_solve, ratio, ratio_se, +1)]

# Fieller (1954): roots of rho^2 (b^2 - t^2 Vbb) - 2 rho (a b - t^2 Vab) + (a^2 - t^2 Vaa) = 0
Vaa, Vbb, Vab = cov[3, 3], cov[4, 4], cov[3, 4]
A = b * b - tq * tq * Vbb
B = a * b - tq * tq * Vab
C = a * a - tq * tq * Vaa
disc = B * B - A * C
fieller = sorted([(B - np.sqrt(disc)) / A, (B + np.sqrt(disc)) / A])

json.dump({
    "library": f"scipy {scipy.__version__}, numpy {np.__version__}",
    "names": names,
    "estimates": fit.x.tolist(),
    "se": se.tolist(),
    "ssr": ssr, "dof": dof, "t": tq,
    "profiles": profiles,
    "ratio": {"value": ratio, "se": ratio_se, "profile": ratio_profile, "fieller": fieller},
}, sys.stdout, indent=1)
print()
