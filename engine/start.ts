/**
 * Automatic starting values for free parameters declared without `= value`.
 *
 * Method (deterministic, cheap):
 * 1. Parameters with a given start are held at it. Among the others, a
 *    "linear set" L is grown greedily in declaration order: q joins L when the
 *    model stays linear in L ∪ {q} with every other parameter held
 *    (symbolic test of the compiler). The rest form the nonlinear set N.
 * 2. For any values of N, the best L solves a weighted linear least-squares
 *    problem exactly (variable projection, Golub & Pereyra 1973, SIAM J.
 *    Numer. Anal. 10:413–432): f(θ) = f(θ_L = 0) + J_L θ_L. This plays the
 *    role of a linearisation: no start is needed for linear parameters.
 * 3. N is searched on a coarse grid of candidates per parameter (below),
 *    scoring each candidate by the SSR after step 2 with L clamped to its
 *    bounds. One or two nonlinear parameters: the full product of candidates
 *    (if n·|C|^|N| ≤ 4e6 evaluations), otherwise cyclic coordinate search
 *    (3 sweeps) from the first candidate.
 * Candidates for one parameter (C ≈ 17–40 values):
 *   - both bounds finite: 16 interior points, log-spaced when 0 < lower and
 *     upper/lower ≥ 100, else evenly spaced;
 *   - one bound b finite: b ± m for magnitudes m (towards the open side);
 *   - no bounds: ±m;
 *   with magnitudes m = 10^(k/2), k = −8..8 (1e-4 … 1e4), plus the spread of
 *   each model column and its reciprocal (time constants and rates).
 * The linear solve uses the normal equations with unit column scaling and a
 * pseudo-inverse: eigenvalues ≤ 1e-12·max eigenvalue of the scaled JᵀJ are
 * treated as zero (rank decided with that relative tolerance).
 * Large data: at most MAX_START_ROWS = 5000 rows are used (every k-th row,
 * k = ⌈n/5000⌉), which is plenty for a starting point.
 * Non-finite SSR candidates are skipped; if every candidate fails, the first
 * candidate is used (1, the bound ± 1, or the lowest interior grid point).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { norm2 } from './linalg/norm';

/** What the guesser needs from a compiled model (free parameters only). */
export interface StartModel {
  value(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array): void;
  valueAndJacobian(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array, jac: Float64Array): void;
}

export interface StartParameter {
  name: string;
  initial?: number;
  lower: number;
  upper: number;
}

export interface StartInput {
  model: StartModel;
  /** Model columns (as compiled) over the n fitted rows. */
  cols: readonly Float64Array[];
  n: number;
  y: Float64Array;
  /** √wᵢ, or null when unweighted. */
  sqrtW: Float64Array | null;
  parameters: readonly StartParameter[];
  /** Symbolic test: is the model linear in these parameters with all others held constant? */
  isLinearIn: (names: readonly string[]) => boolean;
}

export interface StartGuess {
  theta: Float64Array;
  /** Names of the parameters whose start was guessed. */
  guessed: string[];
  /** Short description for the 'guessed_start' message. */
  how: string;
}

/** Relative eigenvalue cut of the scaled normal matrix in the linear solve. */
const EIGEN_CUT = 1e-12;
/** Full grid product only up to this many row evaluations (n·candidates). */
const MAX_GRID_WORK = 4e6;

/** Rows used for guessing: at most this many, every ⌈n/MAX_START_ROWS⌉-th row (deterministic thinning). */
export const MAX_START_ROWS = 5000;

function thinned(input: StartInput): StartInput {
  if (input.n <= MAX_START_ROWS) return input;
  const stride = Math.ceil(input.n / MAX_START_ROWS);
  const m = Math.ceil(input.n / stride);
  const pick = (a: Float64Array) => {
    const out = new Float64Array(m);
    for (let k = 0; k < m; k++) out[k] = a[k * stride];
    return out;
  };
  return { ...input, n: m, cols: input.cols.map(pick), y: pick(input.y), sqrtW: input.sqrtW ? pick(input.sqrtW) : null };
}

export function guessStart(full: StartInput): StartGuess {
  const input = thinned(full);
  const { parameters, n } = input;
  const p = parameters.length;
  const theta = new Float64Array(p);
  const unknown: number[] = [];
  parameters.forEach((par, j) => {
    if (par.initial !== undefined) theta[j] = par.initial;
    else unknown.push(j);
  });
  if (unknown.length === 0) return { theta, guessed: [], how: '' };

  const linear: number[] = [];
  for (const j of unknown) {
    if (input.isLinearIn([...linear, j].map((k) => parameters[k].name))) linear.push(j);
  }
  const nonlinear = unknown.filter((j) => !linear.includes(j));
  const scratch = { f: new Float64Array(n), jac: new Float64Array(n * p) };
  const score = (t: Float64Array): number => {
    solveLinearSet(input, t, linear, scratch);
    return ssr(input, t, scratch.f);
  };

  let evaluated = 0;
  if (nonlinear.length === 0) {
    score(theta);
  } else {
    const cands = nonlinear.map((j) => candidates(parameters[j], input.cols));
    const work = n * cands.reduce((a, c) => a * c.length, 1);
    const best = { ssr: Infinity, values: cands.map((c) => c[0]) };
    const trial = Float64Array.from(theta);
    const tryValues = (values: number[]) => {
      nonlinear.forEach((j, k) => (trial[j] = values[k]));
      const s = score(trial);
      evaluated++;
      if (s < best.ssr) {
        best.ssr = s;
        best.values = [...values];
      }
    };
    if (nonlinear.length <= 2 && work <= MAX_GRID_WORK) {
      forEachProduct(cands, tryValues);
    } else {
      for (let sweep = 0; sweep < 3; sweep++) {
        for (let k = 0; k < nonlinear.length; k++) {
          for (const v of cands[k]) {
            const values = [...best.values];
            values[k] = v;
            tryValues(values);
          }
        }
      }
    }
    nonlinear.forEach((j, k) => (theta[j] = best.values[k]));
    score(theta);
  }
  const names = (idx: number[]) => idx.map((j) => parameters[j].name).join(', ');
  const parts: string[] = [];
  if (linear.length) parts.push(`linear least squares for ${names(linear)}`);
  if (nonlinear.length) parts.push(`grid search over ${names(nonlinear)} (${evaluated} candidates)`);
  return { theta, guessed: unknown.map((j) => parameters[j].name), how: parts.join(', ') };
}

/** Candidate values for one nonlinear parameter (see the module comment). */
export function candidates(par: StartParameter, cols: readonly Float64Array[]): number[] {
  const { lower, upper } = par;
  const lo = Number.isFinite(lower);
  const hi = Number.isFinite(upper);
  if (lo && hi) {
    const k = 16;
    const logSpaced = lower > 0 && upper / lower >= 100;
    return Array.from({ length: k }, (_, i) => {
      const u = (i + 0.5) / k;
      return logSpaced ? lower * (upper / lower) ** u : lower + (upper - lower) * u;
    });
  }
  const mags = magnitudes(cols);
  if (lo) return mags.map((m) => lower + m);
  if (hi) return mags.map((m) => upper - m);
  return [...mags, ...mags.map((m) => -m)];
}

function magnitudes(cols: readonly Float64Array[]): number[] {
  const set = new Set<number>([1]);
  for (let k = -8; k <= 8; k++) set.add(10 ** (k / 2));
  for (const c of cols) {
    let min = Infinity;
    let max = -Infinity;
    for (const v of c) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
    const spread = max - min;
    if (spread > 0 && Number.isFinite(spread)) {
      set.add(spread);
      set.add(1 / spread);
    }
  }
  // 1 first: the fallback centre when every candidate fails
  return [...set].sort((a, b) => (a === 1 ? -1 : b === 1 ? 1 : a - b));
}

function forEachProduct(lists: number[][], visit: (values: number[]) => void): void {
  const idx = lists.map(() => 0);
  for (;;) {
    visit(idx.map((i, k) => lists[k][i]));
    let k = lists.length - 1;
    while (k >= 0 && ++idx[k] === lists[k].length) idx[k--] = 0;
    if (k < 0) return;
  }
}

/** Sets theta[L] to the weighted least-squares solution with the other entries held, clamped to bounds. */
function solveLinearSet(input: StartInput, theta: Float64Array, linear: number[], scratch: { f: Float64Array; jac: Float64Array }): void {
  if (linear.length === 0) return;
  const { n, y, sqrtW, model, cols, parameters } = input;
  for (const j of linear) theta[j] = 0;
  model.valueAndJacobian(theta, cols, n, scratch.f, scratch.jac);
  const { f, jac } = scratch;
  const q = linear.length;
  // Weighted columns √wᵢ·∂f/∂θⱼ and residual √wᵢ·(yᵢ − fᵢ), each column scaled to unit norm.
  const cj: Float64Array[] = linear.map((j) => {
    const c = jac.subarray(j * n, (j + 1) * n).slice();
    if (sqrtW) for (let i = 0; i < n; i++) c[i] *= sqrtW[i];
    return c;
  });
  const rw = new Float64Array(n);
  for (let i = 0; i < n; i++) rw[i] = (sqrtW ? sqrtW[i] : 1) * (y[i] - f[i]);
  // norms safe from under- and overflow (linalg/norm.ts; the same value as √Σc² where that is in range)
  const norms = cj.map((c) => {
    const s = norm2(c, 0, n);
    return s > 0 && Number.isFinite(s) ? s : 1;
  });
  const normal = (unit: boolean) => {
    // unit: columns divided by their norms before the products (for columns near 1e±300, whose products leave the range)
    const cols = unit ? cj.map((c, a) => c.map((v) => v / norms[a])) : cj;
    const A = new Matrix(q, q);
    const b = new Float64Array(q);
    for (let a = 0; a < q; a++) {
      const ca = cols[a];
      let rhs = 0;
      for (let i = 0; i < n; i++) rhs += ca[i] * rw[i];
      b[a] = unit ? rhs : rhs / norms[a];
      for (let c = 0; c <= a; c++) {
        const cc = cols[c];
        let s = 0;
        for (let i = 0; i < n; i++) s += ca[i] * cc[i];
        const v = unit ? s : s / (norms[a] * norms[c]);
        A.set(a, c, v);
        A.set(c, a, v);
      }
    }
    return { A, b };
  };
  const finite = (m: { A: Matrix; b: Float64Array }) => m.b.every(Number.isFinite) && m.A.to1DArray().every(Number.isFinite);
  let system = normal(false);
  if (!finite(system)) system = normal(true);
  if (!finite(system)) return;
  const { A, b } = system;
  const eig = new EigenvalueDecomposition(A, { assumeSymmetric: true });
  const values = eig.realEigenvalues;
  const vectors = eig.eigenvectorMatrix;
  const cut = EIGEN_CUT * Math.max(...values.map(Math.abs));
  for (let a = 0; a < q; a++) {
    let s = 0;
    for (let k = 0; k < q; k++) {
      if (values[k] <= cut) continue;
      let proj = 0;
      for (let c = 0; c < q; c++) proj += vectors.get(c, k) * b[c];
      s += (vectors.get(a, k) * proj) / values[k];
    }
    const j = linear[a];
    theta[j] = Math.min(parameters[j].upper, Math.max(parameters[j].lower, s / norms[a]));
  }
}

function ssr(input: StartInput, theta: Float64Array, f: Float64Array): number {
  const { n, y, sqrtW, model, cols } = input;
  model.value(theta, cols, n, f);
  let s = 0;
  for (let i = 0; i < n; i++) s += ((sqrtW ? sqrtW[i] : 1) * (y[i] - f[i])) ** 2;
  return Number.isFinite(s) ? s : Infinity;
}
