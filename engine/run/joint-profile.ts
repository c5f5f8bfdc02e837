/**
 * Profile-likelihood intervals on a joint fit (engine/run/joint.ts): of a
 * shared parameter, of one group's own parameter, and of a quantity computed
 * from several groups (a ratio of two groups' EC50s, the relative potency).
 * The statistic is the one of single fits (Bates & Watts 1988, §6.1;
 * engine/run/profile.ts): S̃(v) = min S(x) subject to q(x) = v over the whole
 * joint vector x = (θₛ, θ₁ … θ_G), τ(v) = sign(v − q̂)·√(S̃(v) − Ŝ)/s with the
 * joint fit's pooled s and the interval { v : |τ(v)| ≤ t(n − P, 1 − α/2) },
 * P = pₛ + G·p_l. The end search is profile.ts's `profileCurve`.
 *
 * The constraint is met by elimination, as for a derived quantity of one fit
 * (Venzon & Moolgavkar 1988; engine/run/derived-profile.ts): the entry x_k
 * that q depends on most (largest |∂q/∂x_k·se_k|) is solved from q(x) = v by
 * damped Newton, and the Jacobian columns of the others become
 * J_i − J_k·q_i/q_k (implicit function theorem). A parameter held at v is
 * the case q(x) = x_k.
 *
 * Keeping the block structure (no dense n × P matrix): every constrained fit
 * is solved by the block Levenberg–Marquardt of engine/solve/block-lm.ts. The
 * own parameters of the groups q reads (the "touched" groups) couple with the
 * eliminated entry, so they are moved into the shared block; the touched
 * groups keep p_l placeholder unknowns u, each with one extra residual row
 * u − û (û: the estimate, inside the bounds) whose Jacobian column is a unit
 * vector orthogonal to every other column. Started at û, u stays at û exactly
 * (its residual and its coupling are zero, so every step leaves it), and adds
 * nothing to S. The untouched groups keep their own block.
 *
 * Cost (documented in LANGUAGE.md): every constrained fit is a joint fit with
 * pₛ − [k shared] + |touched|·p_l − [k own] columns in the shared block, so
 * O(Σ n_g (pₛ + |touched|·p_l + p_l)²) per iteration, linear in the number of
 * groups, from a warm start (the nearest profile point). A group's own
 * parameter cannot be profiled on its group's rows alone: holding it moves the
 * shared parameters, which moves every other group's own estimates, so its
 * exact profile refits all groups (a profile on the group alone, with the
 * others held, would give a narrower interval than the data support). Profiling
 * every parameter costs (pₛ + G·p_l) such profiles: quadratic in G, hence the
 * work bound of `profile auto` (engine/run/joint-intervals.ts).
 */
import type { LeastSquaresProblem, SolveOptions, SolveOutcome } from '../solve';
import { solveBlockLM, type BlockProblem, type BlockSolveOptions } from '../solve/block-lm';
import { jointIntervalText } from '../messages';
import { profileCurve, type ParameterProfile } from './profile';
import type { JointSolved } from './joint';
import { NEWTON_MAX, NEWTON_XTOL } from './derived-profile';

/**
 * A quantity of a joint fit as a function of the joint vector x: index j < pₛ is
 * shared parameter j (JointSetup.sharedIdx order), pₛ + g·p_l + m the m-th own
 * parameter (JointSetup.localIdx order) of group g (JointSetup.data order).
 */
export interface JointQuantity {
  /** The entries of x the quantity reads (distinct). */
  reads: readonly number[];
  /** Its value and its gradient over `reads` (same order). */
  at(x: Float64Array): { value: number; grad: Float64Array };
  /** The quantity is the parameter x_reads[0] itself: its interval stops at the parameter's bounds. */
  held?: boolean;
}

/** The parameter x_k itself. */
export function heldEntry(k: number): JointQuantity {
  return { reads: [k], held: true, at: (x) => ({ value: x[k], grad: Float64Array.of(1) }) };
}

/** The joint estimate as one vector (module layout). */
export function jointVector(solved: JointSolved): Float64Array {
  const { outcome } = solved;
  const x = new Float64Array(outcome.shared.length + outcome.local.length);
  x.set(outcome.shared);
  x.set(outcome.local, outcome.shared.length);
  return x;
}

/** Standard errors of every entry of x from the joint covariance s²(JᵀJ)⁻¹ (NaN where not determined). */
export function jointStandardErrors(solved: JointSolved, s2: number): Float64Array {
  const ps = solved.setup.sharedIdx.length;
  const pl = solved.setup.localIdx.length;
  const q = ps + pl;
  const G = solved.setup.data.length;
  const se = new Float64Array(ps + G * pl).fill(NaN);
  for (let j = 0; j < ps; j++) se[j] = Math.sqrt(s2 * solved.cov.shared[j * ps + j]);
  for (let g = 0; g < G; g++) {
    const c = solved.cov.groups[g];
    for (let m = 0; m < pl; m++) se[ps + g * pl + m] = c.determined ? Math.sqrt(s2 * c.cov[(ps + m) * q + ps + m]) : NaN;
  }
  return se;
}

export interface JointProfileContext {
  /** s: √(SSR/dof) of the joint fit, or 1 with absolute sigma. */
  scale: number;
  critical: number;
  options: BlockSolveOptions;
}

export interface JointProfileOutput {
  profile: ParameterProfile;
  /** The entry of x solved from the constraint. */
  eliminated: number;
}

/** The profile interval of q (module comment); null when q reads no entry with a standard error. */
export function profileJointQuantity(solved: JointSolved, q: JointQuantity, center: number, se: number, seX: Float64Array, ctx: JointProfileContext): JointProfileOutput | null {
  const { setup } = solved;
  const ps = setup.sharedIdx.length;
  const pl = setup.localIdx.length;
  const G = setup.data.length;
  const xHat = jointVector(solved);
  const g0 = q.at(xHat);
  let kPos = -1;
  let best = 0;
  q.reads.forEach((o, i) => {
    const w = Math.abs(g0.grad[i] * seX[o]);
    if (Number.isFinite(w) && w > best) {
      best = w;
      kPos = i;
    }
  });
  if (kPos < 0) return null;
  const k = q.reads[kPos];
  const groupOf = (o: number) => (o < ps ? -1 : Math.floor((o - ps) / pl));
  const touched = new Set<number>();
  for (const o of q.reads) if (groupOf(o) >= 0) touched.add(groupOf(o));
  const outer: number[] = [];
  for (let j = 0; j < ps; j++) if (j !== k) outer.push(j);
  for (const g of [...touched].sort((a, b) => a - b)) for (let m = 0; m < pl; m++) if (ps + g * pl + m !== k) outer.push(ps + g * pl + m);
  const readPos = new Map(q.reads.map((o, i) => [o, i]));
  const boundOf = (o: number, b: Float64Array) => (o < ps ? b[setup.sharedIdx[o]] : b[setup.localIdx[(o - ps) % pl]]);
  const kLower = boundOf(k, setup.lower);
  const kUpper = boundOf(k, setup.upper);
  const seK = Number.isFinite(seX[k]) ? seX[k] : Math.abs(xHat[k]);

  // the working vector, the eliminated entry solved for the last outer values (cached: every group reads the same)
  const x = new Float64Array(xHat);
  const at = { v: center };
  let lastK = xHat[k];
  let cached: { sh: Float64Array; v: number; ok: boolean } | null = null;
  /** ∂x_k/∂(outer i) at the last solution. */
  const dk = new Float64Array(outer.length);
  let why: string | undefined;
  const solveK = (): boolean => {
    let xk = lastK;
    x[k] = xk;
    let cur = q.at(x);
    let f = cur.value - at.v;
    for (let it = 0; it < NEWTON_MAX; it++) {
      const d = cur.grad[kPos];
      if (!Number.isFinite(f) || !Number.isFinite(d) || d === 0) break;
      let step = f / d;
      let nx = xk - step;
      x[k] = nx;
      let nxt = q.at(x);
      for (let tries = 0; !(Math.abs(nxt.value - at.v) <= Math.abs(f)) && tries < 30; tries++) {
        step /= 2;
        nx = xk - step;
        x[k] = nx;
        nxt = q.at(x);
      }
      xk = nx;
      cur = nxt;
      f = cur.value - at.v;
      if (Math.abs(step) <= NEWTON_XTOL * (Math.abs(xk) + seK)) {
        if (xk < kLower || xk > kUpper) {
          why = jointIntervalText.outsideBounds;
          return false;
        }
        const dK = cur.grad[kPos];
        if (!Number.isFinite(cur.value) || !cur.grad.every(Number.isFinite) || dK === 0) break;
        lastK = xk;
        outer.forEach((o, i) => {
          const pos = readPos.get(o);
          dk[i] = pos === undefined ? 0 : -cur.grad[pos] / dK;
        });
        return true;
      }
    }
    why = jointIntervalText.notSolvable;
    return false;
  };
  const place = (sh: Float64Array): boolean => {
    if (cached && cached.v === at.v && cached.sh.every((v, i) => v === sh[i])) return cached.ok;
    for (let i = 0; i < outer.length; i++) x[outer[i]] = sh[i];
    const ok = solveK();
    cached = { sh: Float64Array.from(sh), v: at.v, ok };
    return ok;
  };

  const p = setup.free.length;
  const theta = new Float64Array(p);
  const jacs = setup.problems.map((pr) => new Float64Array(pr.n * p));
  const extra = (g: number) => (touched.has(g) ? pl : 0);
  /** The column of group g's Jacobian (free order) that entry o is, or −1 when o does not enter group g. */
  const columnOf = (o: number, g: number) => (o < ps ? setup.sharedIdx[o] : groupOf(o) === g ? setup.localIdx[(o - ps) % pl] : -1);
  const kOuter = outer.map((o) => o);
  const problem: BlockProblem = {
    groups: G,
    shared: outer.length,
    local: pl,
    rows: (g) => setup.data[g].n + extra(g),
    evaluate(g, sh, own, r, jac) {
      const n = setup.data[g].n;
      const rows = n + extra(g);
      if (!place(sh)) {
        r.fill(NaN);
        if (jac) {
          jac.a.fill(NaN);
          jac.b.fill(NaN);
        }
        return;
      }
      const mine = touched.has(g);
      for (let m = 0; m < ps; m++) theta[setup.sharedIdx[m]] = x[m];
      for (let m = 0; m < pl; m++) theta[setup.localIdx[m]] = mine ? x[ps + g * pl + m] : own[m];
      const rn = r.subarray(0, n);
      const pr = setup.problems[g];
      if (mine) for (let m = 0; m < pl; m++) r[n + m] = own[m] - xHat[ps + g * pl + m];
      if (!jac) {
        pr.residuals(theta, rn);
        return;
      }
      const J = jacs[g];
      pr.residualsAndJacobian!(theta, rn, J);
      jac.a.fill(0);
      jac.b.fill(0);
      const kc = columnOf(k, g);
      kOuter.forEach((o, i) => {
        const c = columnOf(o, g);
        const off = i * rows;
        if (c >= 0) for (let row = 0; row < n; row++) jac.a[off + row] = J[c * n + row];
        if (kc >= 0 && dk[i] !== 0) for (let row = 0; row < n; row++) jac.a[off + row] += J[kc * n + row] * dk[i];
      });
      for (let m = 0; m < pl; m++) {
        if (mine) jac.b[m * rows + n + m] = 1;
        else for (let row = 0; row < n; row++) jac.b[m * rows + row] = J[setup.localIdx[m] * n + row];
      }
    },
    sharedLower: Float64Array.from(outer, (o) => boundOf(o, setup.lower)),
    sharedUpper: Float64Array.from(outer, (o) => boundOf(o, setup.upper)),
    localLower: Float64Array.from(setup.localIdx, (j) => setup.lower[j]),
    localUpper: Float64Array.from(setup.localIdx, (j) => setup.upper[j]),
  };
  const so = outer.length;
  let totalRows = 0;
  for (let g = 0; g < G; g++) totalRows += problem.rows(g);
  const allResiduals = (phi: Float64Array, out: Float64Array) => {
    const sh = phi.subarray(0, so);
    let off = 0;
    for (let g = 0; g < G; g++) {
      const rows = problem.rows(g);
      problem.evaluate(g, sh, phi.subarray(so + g * pl, so + (g + 1) * pl), out.subarray(off, off + rows), null);
      off += rows;
    }
  };
  const reduced: LeastSquaresProblem = {
    n: totalRows,
    p: so + G * pl,
    residuals: allResiduals,
    jacobian: () => {
      // programmer error: this problem is only solved by solveBlockLM (below), never column by column
      throw new Error('joint profile: the block problem has no dense Jacobian');
    },
  };
  const solve = (_pr: LeastSquaresProblem, phi0: Float64Array, options: SolveOptions): SolveOutcome => {
    const out = solveBlockLM(problem, phi0.slice(0, so), phi0.slice(so), options);
    const phi = new Float64Array(so + G * pl);
    phi.set(out.shared);
    phi.set(out.local, so);
    const residuals = new Float64Array(totalRows);
    allResiduals(phi, residuals);
    return { theta: phi, residuals, jacobian: new Float64Array(0), cost: out.cost, stop: out.stop, iterations: out.iterations, evaluations: out.evaluations, jacobianEvaluations: out.iterations };
  };
  const rest0 = new Float64Array(so + G * pl);
  outer.forEach((o, i) => (rest0[i] = xHat[o]));
  rest0.set(xHat.subarray(ps), so);
  const profile = profileCurve(
    {
      reduced,
      at,
      rest0,
      center,
      se,
      lower: q.held ? kLower : -Infinity,
      upper: q.held ? kUpper : Infinity,
      why: () => {
        const w = why;
        why = undefined;
        return w;
      },
    },
    { scale: ctx.scale, critical: ctx.critical, solve, options: ctx.options },
    solved.ssr,
  );
  return { profile, eliminated: k };
}
