/**
 * Levenberg–Marquardt for a joint least-squares problem with block-angular
 * structure: parameters θ = (θₛ, θ₁ … θ_G), shared ones θₛ (pₛ of them) that
 * every group's residuals depend on and per-group ones θ_g (p_l each) that
 * only group g's residuals depend on. The Jacobian is
 *
 *        ⎡ A₁  B₁           ⎤      Aᵍ = ∂r_g/∂θₛ  (n_g × pₛ)
 *   J =  ⎢ A₂      B₂       ⎥      B_g = ∂r_g/∂θ_g (n_g × p_l)
 *        ⎣ …           ⋱    ⎦
 *
 * and is never formed: each group is compressed by its own Householder QR of
 * [B_g A_g r_g] to a small triangle T_g ((p_l+pₛ+1) columns, at most as many
 * rows), after which the damped step min ‖Jδ + r‖² + λ‖Dδ‖² is solved by
 * eliminating each group's own unknowns (a QR of [T_g; √λ·D_g] on its first
 * p_l columns) and solving the shared unknowns from the Schur complement,
 * accumulated group by group into one (pₛ+1)-column triangle (Björck 1996,
 * *Numerical Methods for Least Squares Problems*, §6.3 "block angular
 * problems"; the same elimination is the Schur-complement step of bundle
 * adjustment, Triggs, McLauchlan, Hartley & Fitzgibbon 2000, "Bundle
 * adjustment - a modern synthesis", §6.1). Cost per iteration and memory are
 * linear in the number of groups: O(Σ n_g (p_l+pₛ)²) flops, O(G (p_l+pₛ)²) numbers.
 *
 * Damping: Marquardt's scaled form with D = the largest column norms of J seen
 * so far (Moré 1978, "The Levenberg–Marquardt algorithm: implementation and
 * theory", eq. 3.3 ff.), and the damping parameter updated from the gain
 * ratio ρ = actual / predicted reduction as Nielsen proposed (Madsen, Nielsen
 * & Tingleff 2004, *Methods for Non-Linear Least Squares Problems*, 2nd ed.,
 * Algorithm 3.16): ρ > 0 accepts and sets λ ← λ·max(1/3, 1 − (2ρ − 1)³),
 * ν ← 2; otherwise λ ← λ·ν, ν ← 2ν. Bounds: the trial point is projected on
 * the box (projected Levenberg–Marquardt, Kanzow, Yamashita & Fukushima 2004,
 * J. Comput. Appl. Math. 172:375–397); the predicted reduction is that of the
 * projected step, computed exactly from the triangles.
 *
 * Stops (each with the numbers behind it):
 * - `small_gradient`: max_j |(Jᵀr)_j| / (D_j‖r‖) ≤ gradientTolerance (default 1e-10; the cosine test of Moré 1978);
 * - `small_reduction`: actual and predicted relative reductions ≤ reductionTolerance (default 1e-10) with ρ ≤ 2;
 * - `small_step`: ‖Dδ‖ ≤ stepTolerance·(‖Dθ‖ + stepTolerance) (default 1e-10);
 * - `max_iterations` (default 1000), `stagnated` when λ exceeds 1e16·(1 + max D²) (no step reduces the cost),
 *   `non_finite` when the start is not finite, `cancelled`.
 * The covariance (blockCovariance) is exact: (JᵀJ)⁻¹ from the same block-angular triangle.
 */
import type { StopReason } from '../result';
import type { CancelToken } from './problem';
import { DEFAULT_TOLERANCE, fmt, stopReason } from './types';

/** The joint problem as the block solver sees it. */
export interface BlockProblem {
  groups: number;
  /** Shared parameters pₛ and per-group parameters p_l. */
  shared: number;
  local: number;
  /** Rows of group g. */
  rows(g: number): number;
  /**
   * Residuals of group g at (θₛ, θ_g) into r (length n_g); with `jac`, also
   * ∂r/∂θₛ into `a` and ∂r/∂θ_g into `b` (column-major, n_g rows).
   */
  evaluate(g: number, shared: Float64Array, own: Float64Array, r: Float64Array, jac: { a: Float64Array; b: Float64Array } | null): void;
  /** Box bounds of θₛ and of each θ_g (±Infinity when open). */
  sharedLower: Float64Array;
  sharedUpper: Float64Array;
  localLower: Float64Array;
  localUpper: Float64Array;
}

export interface BlockSolveOptions {
  maxIterations?: number;
  reductionTolerance?: number;
  stepTolerance?: number;
  gradientTolerance?: number;
  cancel?: CancelToken;
}

export interface BlockOutcome {
  shared: Float64Array;
  /** θ_g of each group, concatenated (group g at g·p_l). */
  local: Float64Array;
  /** ½‖r‖² at the solution. */
  cost: number;
  stop: StopReason;
  iterations: number;
  evaluations: number;
  /** Each group's triangle T_g at the solution (w×k column-major, k = p_l + pₛ + 1; the last column is Qᵀr), for blockCovariance. */
  triangles: { t: Float64Array; w: number }[];
  /** The column norms of J at the solution (shared, then each group's own), for the rank test. */
  columnNorms: { shared: Float64Array; local: Float64Array };
}

/** Largest λ relative to 1 + max D² before the solver gives up: no step of any length reduces the cost. */
const LAMBDA_LIMIT = 1e16;
/** Starting damping λ₀ relative to the scaling D² (Madsen, Nielsen & Tingleff 2004 suggest τ = 1e-3 when the start is believed good; ours come from separate fits). */
const LAMBDA_START = 1e-3;

/** Gauss–Newton steps tried after a converged stop (see `polish`). */
const POLISH_STEPS = 3;

/** Householder QR in place of the m×k column-major `a` on its first `cols` columns (applied to all k); returns nothing, `a` holds R on top. */
export function householder(a: Float64Array, m: number, k: number, cols: number): void {
  for (let j = 0; j < Math.min(cols, m); j++) {
    const o = j * m;
    // plain sum of squares: the entries are Jacobian and residual values of data in ordinary ranges (a fit whose
    // squares would overflow is rescaled by the run layer's response scale before it reaches a solver)
    let ss = 0;
    for (let i = j; i < m; i++) ss += a[o + i] * a[o + i];
    const norm = Math.sqrt(ss);
    if (norm === 0) continue;
    const alpha = a[o + j] > 0 ? -norm : norm;
    // v = x − αe₁, stored in place; H = I − 2vvᵀ/(vᵀv)
    a[o + j] -= alpha;
    let vv = 0;
    for (let i = j; i < m; i++) vv += a[o + i] * a[o + i];
    for (let c = j + 1; c < k; c++) {
      const oc = c * m;
      let s = 0;
      for (let i = j; i < m; i++) s += a[o + i] * a[oc + i];
      const f = (2 * s) / vv;
      for (let i = j; i < m; i++) a[oc + i] -= f * a[o + i];
    }
    a[o + j] = alpha;
    for (let i = j + 1; i < m; i++) a[o + i] = 0;
  }
}

/** Per-group workspace: the compressed triangle and the elimination of the group's own unknowns. */
interface GroupWork {
  n: number;
  r: Float64Array;
  a: Float64Array;
  b: Float64Array;
  /** T_g: w×k column-major, w = min(n_g, k) rows kept, k = p_l + pₛ + 1. */
  t: Float64Array;
  w: number;
  /** ½‖r_g‖². */
  cost: number;
  /** Scratch: [B_g A_g r_g] for its QR (max(n_g, k) × k), and the elimination [T_g; √λ·D_g] ((w + p_l) × k). */
  full: Float64Array;
  elim: Float64Array;
}

export function solveBlockLM(problem: BlockProblem, shared0: Float64Array, local0: Float64Array, options: BlockSolveOptions = {}): BlockOutcome {
  const G = problem.groups;
  const ps = problem.shared;
  const pl = problem.local;
  const k = pl + ps + 1;
  const maxIt = options.maxIterations ?? 1000;
  const ftol = options.reductionTolerance ?? DEFAULT_TOLERANCE;
  const xtol = options.stepTolerance ?? DEFAULT_TOLERANCE;
  const gtol = options.gradientTolerance ?? DEFAULT_TOLERANCE;
  const work: GroupWork[] = [];
  for (let g = 0; g < G; g++) {
    const n = problem.rows(g);
    const w = Math.min(n, k);
    work.push({ n, r: new Float64Array(n), a: new Float64Array(n * ps), b: new Float64Array(n * pl), t: new Float64Array(Math.max(n, k) * k), w, cost: 0, full: new Float64Array(Math.max(n, k) * k), elim: new Float64Array((w + pl) * k) });
  }
  let shared = Float64Array.from(shared0);
  let local = Float64Array.from(local0);
  const own = (l: Float64Array, g: number) => l.subarray(g * pl, (g + 1) * pl);
  let evaluations = 0;

  /** Residuals (and Jacobian) of every group at (s, l); the total cost, NaN when not finite. */
  const evaluate = (s: Float64Array, l: Float64Array, jac: boolean): number => {
    evaluations++;
    let cost = 0;
    for (let g = 0; g < G; g++) {
      const wk = work[g];
      problem.evaluate(g, s, own(l, g), wk.r, jac ? { a: wk.a, b: wk.b } : null);
      let c = 0;
      for (let i = 0; i < wk.n; i++) c += wk.r[i] * wk.r[i];
      wk.cost = 0.5 * c;
      cost += wk.cost;
    }
    return Number.isFinite(cost) ? cost : NaN;
  };
  // Column scaling D (shared columns, then each group's own), the largest norms seen (Moré 1978).
  const dS = new Float64Array(ps);
  const dL = new Float64Array(G * pl);
  const grad = { s: new Float64Array(ps), l: new Float64Array(G * pl) };

  /** Compress each group to T_g and update D and the gradient Jᵀr. */
  const compress = () => {
    grad.s.fill(0);
    for (let g = 0; g < G; g++) {
      const wk = work[g];
      const n = wk.n;
      const m = Math.max(n, k);
      const full = wk.full;
      full.fill(0);
      for (let j = 0; j < pl; j++) full.set(wk.b.subarray(j * n, (j + 1) * n), j * m);
      for (let j = 0; j < ps; j++) full.set(wk.a.subarray(j * n, (j + 1) * n), (pl + j) * m);
      full.set(wk.r, (k - 1) * m);
      for (let j = 0; j < k - 1; j++) {
        let s2 = 0;
        for (let i = 0; i < n; i++) s2 += full[j * m + i] * full[j * m + i];
        const s = Math.sqrt(s2);
        if (j < pl) dL[g * pl + j] = Math.max(dL[g * pl + j], s);
        else dS[j - pl] = Math.max(dS[j - pl], s);
      }
      householder(full, m, k, k - 1);
      // keep the top w rows of each column: T_g (w×k)
      const w = wk.w;
      for (let j = 0; j < k; j++) for (let i = 0; i < w; i++) wk.t[j * w + i] = full[j * m + i];
      // Jᵀr = Rᵀ(Qᵀr)_top
      for (let j = 0; j < k - 1; j++) {
        let s = 0;
        for (let i = 0; i <= Math.min(j, w - 1); i++) s += wk.t[j * w + i] * wk.t[(k - 1) * w + i];
        if (j < pl) grad.l[g * pl + j] = s;
        else grad.s[j - pl] += s;
      }
    }
  };

  /** ½‖T_g [δ_g; δₛ; 1]‖² summed: the linearised cost of the step, less the part of ½‖r‖² outside the triangles. */
  const modelCost = (ds: Float64Array, dl: Float64Array): number => {
    let total = 0;
    for (let g = 0; g < G; g++) {
      const wk = work[g];
      const w = wk.w;
      for (let i = 0; i < w; i++) {
        let v = wk.t[(k - 1) * w + i];
        for (let j = 0; j < pl; j++) v += wk.t[j * w + i] * dl[g * pl + j];
        for (let j = 0; j < ps; j++) v += wk.t[(pl + j) * w + i] * ds[j];
        total += v * v;
      }
    }
    return 0.5 * total;
  };

  const acc = new Float64Array((ps + 1) * (ps + 1));
  let stack = new Float64Array(0);
  const stackBuffer = (size: number) => {
    if (stack.length < size) stack = new Float64Array(size);
    else stack.fill(0, 0, size);
    return stack;
  };
  const dampedStep = (lambda: number): { ds: Float64Array; dl: Float64Array } | null => {
    const sq = Math.sqrt(lambda);
    // accumulator U: (ps+1)×(ps+1) triangle of the shared part, rows added group by group
    const kk = ps + 1;
    // the accumulated shared triangle (at most kk rows) and the stack it is reduced from, reused across groups
    let accRows = 0;
    const elim: { m: number; e: Float64Array }[] = [];
    for (let g = 0; g < G; g++) {
      const wk = work[g];
      const w = wk.w;
      const m = w + pl;
      const e = wk.elim;
      e.fill(0);
      for (let j = 0; j < k; j++) for (let i = 0; i < w; i++) e[j * m + i] = wk.t[j * w + i];
      for (let j = 0; j < pl; j++) e[j * m + w + j] = sq * dL[g * pl + j];
      householder(e, m, k, pl);
      elim.push({ m, e });
      // rows pl..m-1, columns pl..k-1 go to the shared reduction
      const rowsHere = m - pl;
      const stackRows = accRows + rowsHere;
      const st = stackBuffer(stackRows * kk);
      for (let j = 0; j < kk; j++) {
        for (let i = 0; i < accRows; i++) st[j * stackRows + i] = acc[j * accRows + i];
        for (let i = 0; i < rowsHere; i++) st[j * stackRows + accRows + i] = e[(pl + j) * m + pl + i];
      }
      householder(st, stackRows, kk, kk);
      const keep = Math.min(stackRows, kk);
      for (let j = 0; j < kk; j++) for (let i = 0; i < keep; i++) acc[j * keep + i] = st[j * stackRows + i];
      accRows = keep;
    }
    // damping rows of the shared unknowns, then the final triangle
    const rowsAll = accRows + ps;
    const fin = new Float64Array(rowsAll * kk);
    for (let j = 0; j < kk; j++) for (let i = 0; i < accRows; i++) fin[j * rowsAll + i] = acc[j * accRows + i];
    for (let j = 0; j < ps; j++) fin[j * rowsAll + accRows + j] = sq * dS[j];
    householder(fin, rowsAll, kk, ps);
    // R_ss δₛ = −c_s
    const ds = new Float64Array(ps);
    for (let j = ps - 1; j >= 0; j--) {
      let v = -fin[ps * rowsAll + j];
      for (let c = j + 1; c < ps; c++) v -= fin[c * rowsAll + j] * ds[c];
      const d = fin[j * rowsAll + j];
      if (d === 0 || !Number.isFinite(d)) return null;
      ds[j] = v / d;
    }
    // R_g δ_g = −c_g − S_g δₛ
    const dl = new Float64Array(G * pl);
    for (let g = 0; g < G; g++) {
      const { m, e } = elim[g];
      for (let j = pl - 1; j >= 0; j--) {
        let v = -e[(k - 1) * m + j];
        for (let c = 0; c < ps; c++) v -= e[(pl + c) * m + j] * ds[c];
        for (let c = j + 1; c < pl; c++) v -= e[c * m + j] * dl[g * pl + c];
        const d = e[j * m + j];
        if (d === 0 || !Number.isFinite(d)) return null;
        dl[g * pl + j] = v / d;
      }
    }
    return { ds, dl };
  };

  const trialS = new Float64Array(ps);
  const trialL = new Float64Array(G * pl);
  /**
   * After a converged stop: up to POLISH_STEPS Gauss–Newton steps (λ = 0), each kept only when it lowers
   * the cost, so the estimates sit at the minimum to rounding rather than at the tolerance (the stop tests
   * on relative reduction leave a scaled gradient of about √ftol).
   */
  const polish = (c0: number): number => {
    let c = c0;
    for (let k = 0; k < POLISH_STEPS; k++) {
      const step = dampedStep(0);
      if (!step) break;
      for (let j = 0; j < ps; j++) trialS[j] = Math.min(problem.sharedUpper[j], Math.max(problem.sharedLower[j], shared[j] + step.ds[j]));
      for (let q = 0; q < G * pl; q++) trialL[q] = Math.min(problem.localUpper[q % pl], Math.max(problem.localLower[q % pl], local[q] + step.dl[q]));
      const tc = evaluate(trialS, trialL, false);
      if (!(tc < c)) break;
      shared = Float64Array.from(trialS);
      local = Float64Array.from(trialL);
      c = evaluate(shared, local, true);
      compress();
    }
    evaluate(shared, local, true);
    compress();
    return c;
  };
  const finish = (stop: StopReason, iterations: number, c: number): BlockOutcome => {
    const cost = stop.converged ? polish(c) : c;
    return {
    shared, local, cost, stop, iterations, evaluations,
    triangles: work.map((wk) => ({ t: wk.t.slice(0, wk.w * k), w: wk.w })),
    columnNorms: { shared: dS, local: dL },
    };
  };

  let cost = evaluate(shared, local, true);
  if (!Number.isFinite(cost)) return finish(stopReason('non_finite', 'the residuals or the Jacobian are not finite at the starting values'), 0, cost);
  compress();
  let maxD2 = 0;
  for (const v of dS) maxD2 = Math.max(maxD2, v * v);
  for (const v of dL) maxD2 = Math.max(maxD2, v * v);
  let lambda = LAMBDA_START;
  let nu = 2;
  for (let it = 1; it <= maxIt; it++) {
    if (options.cancel?.cancelled) return finish(stopReason('cancelled', 'cancelled'), it - 1, cost);
    // gradient test (cosine of the angle between r and each scaled column)
    const rnorm = Math.sqrt(2 * cost);
    let gmax = 0;
    for (let j = 0; j < ps; j++) if (dS[j] > 0) gmax = Math.max(gmax, Math.abs(grad.s[j]) / (dS[j] * rnorm));
    for (let j = 0; j < G * pl; j++) if (dL[j] > 0) gmax = Math.max(gmax, Math.abs(grad.l[j]) / (dL[j] * rnorm));
    if (rnorm === 0 || gmax <= gtol) return finish(stopReason('small_gradient', `scaled gradient ${fmt(gmax)} <= gtol ${fmt(gtol)}`), it - 1, cost);
    let accepted = false;
    while (!accepted) {
      if (options.cancel?.cancelled) return finish(stopReason('cancelled', 'cancelled'), it - 1, cost);
      if (lambda > LAMBDA_LIMIT * (1 + maxD2)) {
        return finish(stopReason('stagnated', `no step reduces the sum of squares (damping ${fmt(lambda)} > ${fmt(LAMBDA_LIMIT * (1 + maxD2))})`), it - 1, cost);
      }
      const step = dampedStep(lambda);
      if (!step) {
        lambda *= nu;
        nu *= 2;
        continue;
      }
      // projected trial point and the step actually taken
      let dnorm = 0;
      let xnorm = 0;
      for (let j = 0; j < ps; j++) {
        trialS[j] = Math.min(problem.sharedUpper[j], Math.max(problem.sharedLower[j], shared[j] + step.ds[j]));
        step.ds[j] = trialS[j] - shared[j];
        dnorm = Math.hypot(dnorm, dS[j] * step.ds[j]);
        xnorm = Math.hypot(xnorm, dS[j] * shared[j]);
      }
      for (let g = 0; g < G; g++) {
        for (let j = 0; j < pl; j++) {
          const q = g * pl + j;
          trialL[q] = Math.min(problem.localUpper[j], Math.max(problem.localLower[j], local[q] + step.dl[q]));
          step.dl[q] = trialL[q] - local[q];
          dnorm = Math.hypot(dnorm, dL[q] * step.dl[q]);
          xnorm = Math.hypot(xnorm, dL[q] * local[q]);
        }
      }
      const predicted = modelCost(new Float64Array(ps), new Float64Array(G * pl)) - modelCost(step.ds, step.dl);
      const trialCost = evaluate(trialS, trialL, false);
      const actual = Number.isFinite(trialCost) ? cost - trialCost : -Infinity;
      const rho = predicted > 0 ? actual / predicted : -1;
      if (rho > 0) {
        accepted = true;
        const before = cost;
        shared = Float64Array.from(trialS);
        local = Float64Array.from(trialL);
        cost = evaluate(shared, local, true);
        compress();
        lambda *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
        nu = 2;
        const relActual = actual / before;
        const relPredicted = predicted / before;
        if (relActual <= ftol && relPredicted <= ftol && rho <= 2) {
          return finish(stopReason('small_reduction', `relative reduction ${fmt(relActual)} <= ftol ${fmt(ftol)}`), it, cost);
        }
        if (dnorm <= xtol * (xnorm + xtol)) return finish(stopReason('small_step', `relative step ${fmt(dnorm / (xnorm + xtol))} <= xtol ${fmt(xtol)}`), it, cost);
      } else {
        // restore the residuals of the current point (the trial overwrote them)
        if (dnorm <= xtol * (xnorm + xtol)) {
          evaluate(shared, local, true);
          compress();
          return finish(stopReason('small_step', `relative step ${fmt(dnorm / (xnorm + xtol))} <= xtol ${fmt(xtol)}`), it, cost);
        }
        lambda *= nu;
        nu *= 2;
      }
    }
    if (!accepted) break;
  }
  evaluate(shared, local, true);
  compress();
  return finish(stopReason('max_iterations', `iteration limit ${maxIt} reached`), maxIt, cost);
}
