/**
 * Statistics of a linear fit against NIST StRD certified values. The least-
 * squares solution itself comes from ml-matrix (general-purpose library), so
 * these tests check the statistics modules, not a solver.
 */
import { Matrix, QrDecomposition, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { bandsAt, factorCovariance } from '../../engine/stats/bands';
import { tCritical } from '../../engine/stats/distributions';
import { goodnessOfFit } from '../../engine/stats/goodness';
import { influence, leverages } from '../../engine/stats/influence';
import { parameterIntervals, scaleCovariance } from '../../engine/stats/intervals';
import { readLinear, strdAvailable, strdDir } from '../strd/read-strd';
import { requireInCi } from '../fixtures/required';

const available = requireInCi('NIST StRD data', strdAvailable(), `STRD_DIR=${strdDir()}`);

function design(x: number[], degree: number): Matrix {
  return new Matrix(x.map((v) => Array.from({ length: degree + 1 }, (_, k) => v ** k)));
}

function fitLinear(name: string, degree: number) {
  const d = readLinear(name);
  const X = design(d.x, degree);
  const Y = Matrix.columnVector(d.y);
  const beta = new QrDecomposition(X).solve(Y).getColumn(0);
  const fitted = X.mmul(Matrix.columnVector(beta)).getColumn(0);
  const residuals = d.y.map((y, i) => y - fitted[i]);
  const unscaled = inverse(X.transpose().mmul(X)); // (XᵀX)⁻¹, ml-matrix
  const n = d.y.length;
  const p = degree + 1;
  const jac = new Float64Array(n * p); // column-major n×p
  for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) jac[j * n + i] = X.get(i, j);
  return { d, X, beta, residuals, unscaled: Float64Array.from(unscaled.to1DArray()), n, p, jac };
}

for (const [name, degree] of [['Norris', 1], ['Pontius', 2]] as const) {
  describe.runIf(available)(`stats on NIST StRD ${name} (linear, degree ${degree})`, () => {
    it('SSR, residual SD and R² match the certified values', () => {
      const f = fitLinear(name, degree);
      const g = goodnessOfFit({ residuals: f.residuals, y: f.d.y, weights: null, p: f.p, sigmaAbsolute: false, condition: NaN });
      // NIST StRD certified values (read from the .dat file)
      expect(g.dof).toBe(f.d.residualDof);
      expect(g.ssr / f.d.residualSs).toBeCloseTo(1, 7);
      expect(g.rmse / f.d.residualSd).toBeCloseTo(1, 7);
      expect(g.r2).toBeCloseTo(f.d.rSquared, 10);
    });

    it('standard errors match the certified values; intervals use t(dof)', () => {
      const f = fitLinear(name, degree);
      const g = goodnessOfFit({ residuals: f.residuals, y: f.d.y, weights: null, p: f.p, sigmaAbsolute: false, condition: NaN });
      const cov = scaleCovariance(f.unscaled, g.rmse ** 2);
      const ci = parameterIntervals(f.beta, cov, 0.95, g.dof);
      ci.forEach((c, j) => {
        // NIST StRD certified estimate and standard deviation of estimate
        expect(f.beta[j] / f.d.estimates[j]).toBeCloseTo(1, 7);
        expect(c.stderr / f.d.stderrs[j]).toBeCloseTo(1, 6);
        expect(c.upper - c.lower).toBeCloseTo(2 * tCritical(0.95, g.dof) * c.stderr, 10);
      });
    });

    it('leverages and confidence half-widths at the data points equal t·s·√hᵢ (ml-matrix hat matrix)', () => {
      const f = fitLinear(name, degree);
      const g = goodnessOfFit({ residuals: f.residuals, y: f.d.y, weights: null, p: f.p, sigmaAbsolute: false, condition: NaN });
      // general-purpose library computation: H = X (XᵀX)⁻¹ Xᵀ with ml-matrix (via the pseudo-inverse-free QR: H = Q Qᵀ)
      const Q = new QrDecomposition(f.X).orthogonalMatrix.subMatrix(0, f.n - 1, 0, f.p - 1);
      const hat = Q.mmul(Q.transpose());
      const h = leverages(f.jac, f.n, f.p, f.unscaled);
      const cov = scaleCovariance(f.unscaled, g.rmse ** 2);
      const t = tCritical(0.95, g.dof);
      const xs = Float64Array.from(f.d.x);
      const bands = bandsAt(
        xs,
        () => ({ f: Float64Array.from(f.d.y.map((y, i) => y - f.residuals[i])), gradient: f.jac }),
        factorCovariance(cov, f.p),
        t,
        (v) => new Float64Array(v.length).fill(g.rmse),
      );
      for (let i = 0; i < f.n; i++) {
        expect(h[i]).toBeCloseTo(hat.get(i, i), 8);
        expect(bands.confidence[i] / (t * g.rmse * Math.sqrt(hat.get(i, i)))).toBeCloseTo(1, 6);
        expect(bands.prediction[i] / (t * g.rmse * Math.sqrt(1 + hat.get(i, i)))).toBeCloseTo(1, 6);
      }
      // leverages sum to p (trace of the hat matrix)
      expect(h.reduce((a, b) => a + b, 0)).toBeCloseTo(f.p, 6);
    });

    it("Cook's distances agree with the leave-one-out parameter change (ml-matrix refits)", () => {
      const f = fitLinear(name, degree);
      const g = goodnessOfFit({ residuals: f.residuals, y: f.d.y, weights: null, p: f.p, sigmaAbsolute: false, condition: NaN });
      const h = leverages(f.jac, f.n, f.p, f.unscaled);
      const inf = influence(f.residuals, h, g.rmse, f.p);
      // Cook (1977): Dᵢ = (β̂₍ᵢ₎ − β̂)ᵀ XᵀX (β̂₍ᵢ₎ − β̂) / (p s²), checked for the first 3 points
      const xtx = f.X.transpose().mmul(f.X);
      for (const i of [0, 1, 2]) {
        const keep = f.d.y.map((_, k) => k).filter((k) => k !== i);
        const Xi = new Matrix(keep.map((k) => f.X.getRow(k)));
        const bi = new QrDecomposition(Xi).solve(Matrix.columnVector(keep.map((k) => f.d.y[k]))).getColumn(0);
        const diff = Matrix.columnVector(bi.map((b, j) => b - f.beta[j]));
        const cook = diff.transpose().mmul(xtx).mmul(diff).get(0, 0) / (f.p * g.rmse ** 2);
        expect(inf.cooksDistance[i] / cook).toBeCloseTo(1, 4);
        expect(inf.studentized[i]).toBeCloseTo(f.residuals[i] / (g.rmse * Math.sqrt(1 - h[i])), 10);
      }
    });
  });
}
