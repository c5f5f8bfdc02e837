"""
Reference minima of the robustness suite (test/robustness), computed once
with a general-purpose library: scipy.optimize.least_squares, method 'trf'
(trust-region reflective), the same bounds as the spec, x_scale='jac',
ftol = xtol = gtol = 1e-12, 3-point finite-difference Jacobian, from several
starts per curve: the spec's start values, the true parameters the data were
generated from, and 4 random starts around the truth (log-normal factor
exp(N(0, 0.5)) for a parameter that is positive, else ±50 % of its size plus
N(0, 1)), each moved inside the bounds. The reference minimum is the lowest
sum of squares over the runs that stopped with a convergence status.

  npx esbuild test/robustness/export.ts --bundle --platform=node --log-level=error | node > /tmp/curves.jsonl
  python3 test/robustness/reference.py /tmp/curves.jsonl > test/robustness/reference.json

Output (the fixture read by the tests and the benchmark): the library
versions, and per family the exact sum of all its y values (a fingerprint the
tests compare with their own curves), the reference SSR of every curve (10
significant digits) and the best parameters of the first SUBSET curves. Python is not
needed at test time.
"""
import json
import math
import sys

import numpy as np
import scipy
from scipy.optimize import least_squares

SUBSET = 60
R_GAS = 8.314462618

MODELS = {
    "logistic4": lambda t, x: t[0] + (t[1] - t[0]) / (1 + (x / t[2]) ** t[3]),
    "exp-decay": lambda t, x: t[0] * np.exp(-t[1] * x) + t[2],
    "exp-rise": lambda t, x: t[0] * (1 - np.exp(-t[1] * x)) + t[2],
    "michaelis-menten": lambda t, x: t[0] * x / (t[1] + x),
    "gaussian": lambda t, x: t[0] + t[1] * np.exp(-((x - t[2]) ** 2) / (2 * t[3] ** 2)),
    "power": lambda t, x: t[0] * x ** t[1],
    "stretched": lambda t, x: t[0] * np.exp(-((x / t[1]) ** t[2])) + t[3],
    "arrhenius": lambda t, x: t[0] * np.exp(-t[1] / (R_GAS * x)),
}


def model_for(family):
    return MODELS["logistic4" if family.startswith("logistic4") else family]


def inside(v, lo, hi):
    """v moved strictly inside [lo, hi] (by 1e-10 of the scale at a bound)."""
    eps = 1e-10 * max(1.0, abs(v))
    if np.isfinite(lo) and v <= lo:
        v = lo + max(eps, 1e-10 * max(1.0, abs(lo)))
    if np.isfinite(hi) and v >= hi:
        v = hi - max(eps, 1e-10 * max(1.0, abs(hi)))
    return v


def main(path):
    rng = np.random.default_rng(20261203)
    out = {}
    with open(path) as fh:
        for line in fh:
            c = json.loads(line)
            f = model_for(c["family"])
            x = np.array(c["x"], dtype=float)
            y = np.array(c["y"], dtype=float)
            truth = np.array(c["truth"], dtype=float)
            with np.errstate(all="ignore"):
                check = f(truth, x)
            if not np.allclose(check, np.array(c["yTruth"]), rtol=1e-12, atol=0):
                raise SystemExit(f"model of {c['family']} differs from the spec's at curve {c['index']}")
            lo = np.array([-np.inf if p["lower"] is None else p["lower"] for p in c["params"]])
            hi = np.array([np.inf if p["upper"] is None else p["upper"] for p in c["params"]])
            starts = [np.array([p["start"] for p in c["params"]], dtype=float), truth.copy()]
            for _ in range(4):
                s = np.where(truth > 0, truth * np.exp(rng.normal(0, 0.5, truth.size)),
                             truth + 0.5 * np.abs(truth) * rng.uniform(-1, 1, truth.size) + rng.normal(0, 1, truth.size))
                starts.append(s)
            best = None
            for s in starts:
                s = np.array([inside(v, l, h) for v, l, h in zip(s, lo, hi)])

                def res(t):
                    with np.errstate(all="ignore"):
                        r = f(t, x) - y
                    return np.where(np.isfinite(r), r, 1e150)

                try:
                    fit = least_squares(res, s, bounds=(lo, hi), method="trf", x_scale="jac", jac="3-point",
                                        ftol=1e-12, xtol=1e-12, gtol=1e-12, max_nfev=4000)
                except ValueError:
                    continue
                if fit.status <= 0:
                    continue
                ssr = float(np.sum(res(fit.x) ** 2))
                if np.isfinite(ssr) and (best is None or ssr < best[0]):
                    best = (ssr, fit.x)
            fam = out.setdefault(c["family"], {"ySum": 0.0, "ys": [], "ssr": [], "params": []})
            fam["ys"].extend(c["y"])
            fam["ssr"].append(float(f"{best[0]:.10g}") if best else None)
            if len(fam["params"]) < SUBSET:
                fam["params"].append([float(f"{v:.8g}") for v in best[1]] if best else None)
    for fam in out.values():
        # fingerprint of the data: the tests check it against their own curves (same generator, same order)
        fam["ySum"] = float(f"{math.fsum(fam.pop('ys')):.15g}")
    doc = {
        "source": f"scipy {scipy.__version__} (numpy {np.__version__}), scipy.optimize.least_squares method='trf', "
                  "same bounds, x_scale='jac', ftol=xtol=gtol=1e-12, jac='3-point', best of 6 starts "
                  "(spec start, truth, 4 random around the truth); see test/robustness/reference.py",
        "families": out,
    }
    lines = ['{', f' "source": {json.dumps(doc["source"])},', ' "families": {']
    fams = list(out.items())
    for k, (name, fam) in enumerate(fams):
        lines.append(f'  {json.dumps(name)}: {{')
        lines.append(f'   "ySum": {json.dumps(fam["ySum"])},')
        lines.append(f'   "ssr": {json.dumps(fam["ssr"], separators=(",", ":"))},')
        lines.append(f'   "params": {json.dumps(fam["params"], separators=(",", ":"))}')
        lines.append('  }' + (',' if k < len(fams) - 1 else ''))
    lines.append(' }')
    lines.append('}')
    print("\n".join(lines))


if __name__ == "__main__":
    main(sys.argv[1])
