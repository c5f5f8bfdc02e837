/**
 * Step selection of the interior reflective trust-region method
 * (`reflective.ts`), after Coleman & Li, "An interior trust region approach
 * for nonlinear minimization subject to bounds", SIAM J. Optim. 6 (1996)
 * 418-445, and the least-squares variant of Branch, Coleman & Li, "A subspace,
 * interior, and conjugate gradient method for large-scale bound-constrained
 * minimization problems", SIAM J. Sci. Comput. 21 (1999) 1-23 (§2, the
 * reflective path).
 *
 * The quadratic model of ½‖r(θ + s)‖² is the affine-scaling one of Coleman & Li:
 *     ψ(s) = gᵀs + ½‖J s‖² + ½ Σⱼ cⱼ sⱼ²,   g = Jᵀr,
 * with cⱼ = |gⱼ|/|vⱼ| for the parameters whose scaling is a bound distance
 * (`bounds.ts` colemanLiScaling), 0 otherwise; ‖J s‖ = ‖R Pᵀ s‖ from the QR
 * factor (O(p²), no pass over the data).
 *
 * Given the trust-region step s (‖D s‖ ≈ Δ):
 *  - if θ + s is strictly inside the box, it is taken ("full");
 *  - else, with α the largest fraction of s that stays feasible (the bounds
 *    met: the "hit" set), three candidates are compared on ψ and the lowest
 *    is taken:
 *      truncated: θ_b·α·s, stepped back from the bound by the factor θ_b;
 *      reflected: from the bound point θ + α s along s with the hit
 *        components' signs reversed, minimising ψ over the part of that path
 *        inside the trust region ‖D·(αs + t·s_r)‖ ≤ max(Δ, ‖Ds‖) and the box
 *        (stepped back by θ_b from the next bound; t ≥ (1 − θ_b)·t_max so
 *        that the hit parameters leave their bound). Our restriction: the
 *        bounce goes back at most as far as the step went to the bound
 *        (t ≤ α). A full-length bounce can throw a rate constant from near
 *        0 to where its exponential has died out and its Jacobian column
 *        vanishes, a flat region with a spurious stationary point: measured
 *        on the robustness suite, 2 of 1,000 exp-rise curves ended there
 *        without the restriction, none with it, and no other family changed;
 *      gradient: the minimiser of ψ along the scaled steepest-descent
 *        direction −D⁻²g inside the trust region and θ_b times the distance
 *        to the box.
 * The step-back factor θ_b ∈ (0, 1) is chosen by the driver (documented there).
 */

/** The quadratic model ψ with its factors (buffers owned by the driver). */
export interface StepModel {
  p: number;
  /** R of J·P = Q·R, p×p column-major (upper triangle read). */
  r: Float64Array;
  perm: Int32Array;
  /** g = Jᵀr. */
  g: Float64Array;
  /** Coleman–Li diagonal cⱼ. */
  c: Float64Array;
  /** Trust-region scaling Dⱼ (‖D s‖ ≤ Δ). */
  d: Float64Array;
}

export type StepKind = 'full' | 'truncated' | 'reflected' | 'gradient';

export interface StepChoice {
  kind: StepKind;
  /** ψ(step). */
  value: number;
  /** Step-back factor applied (null for a full step). */
  stepBack: number | null;
  /** Parameters whose bound the trust-region step met. */
  hits: number[];
}

/** Scratch vectors of length p for the selection (allocated once per solve). */
export class StepWork {
  readonly a: Float64Array;
  readonly b: Float64Array;
  readonly ra: Float64Array;
  readonly rb: Float64Array;
  readonly sr: Float64Array;
  readonly cand: Float64Array;
  constructor(p: number) {
    this.a = new Float64Array(p);
    this.b = new Float64Array(p);
    this.ra = new Float64Array(p);
    this.rb = new Float64Array(p);
    this.sr = new Float64Array(p);
    this.cand = new Float64Array(p);
  }
}

/** out = R Pᵀ v. */
function applyR(m: StepModel, v: Float64Array, out: Float64Array): void {
  const { p, r, perm } = m;
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let k = i; k < p; k++) s += r[i + k * p] * v[perm[k]];
    out[i] = s;
  }
}

/** ψ(s). */
export function modelValue(m: StepModel, s: Float64Array, w: StepWork): number {
  applyR(m, s, w.ra);
  let v = 0;
  for (let j = 0; j < m.p; j++) v += m.g[j] * s[j] + 0.5 * (w.ra[j] * w.ra[j] + m.c[j] * s[j] * s[j]);
  return v;
}

/** ψ(a + t·b) = ψ(a) + q1·t + ½·q2·t²: returns [q1, q2]. */
function line(m: StepModel, a: Float64Array, b: Float64Array, w: StepWork): [number, number] {
  applyR(m, a, w.ra);
  applyR(m, b, w.rb);
  let q1 = 0;
  let q2 = 0;
  for (let j = 0; j < m.p; j++) {
    q1 += m.g[j] * b[j] + w.ra[j] * w.rb[j] + m.c[j] * a[j] * b[j];
    q2 += w.rb[j] * w.rb[j] + m.c[j] * b[j] * b[j];
  }
  return [q1, q2];
}

/** Minimiser of q1·t + ½q2·t² over [lo, hi]. */
function lineMinimum(q1: number, q2: number, lo: number, hi: number): number {
  if (q2 > 0) return Math.min(hi, Math.max(lo, -q1 / q2));
  return q1 * lo + 0.5 * q2 * lo * lo <= q1 * hi + 0.5 * q2 * hi * hi ? lo : hi;
}

/** Largest α ≥ 0 with x + α·s in the box (Infinity when s never meets a bound); the indices attaining it go to `hits`. */
export function feasibleFraction(x: Float64Array, s: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined, hits?: number[]): number {
  let alpha = Infinity;
  const ratio = (j: number): number => {
    if (s[j] > 0 && upper) return (upper[j] - x[j]) / s[j];
    if (s[j] < 0 && lower) return (lower[j] - x[j]) / s[j];
    return Infinity;
  };
  for (let j = 0; j < x.length; j++) alpha = Math.min(alpha, Math.max(0, ratio(j)));
  if (hits) {
    hits.length = 0;
    for (let j = 0; j < x.length; j++) if (Math.max(0, ratio(j)) <= alpha) hits.push(j);
  }
  return alpha;
}

export function strictlyInside(x: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined): boolean {
  for (let j = 0; j < x.length; j++) {
    if (lower && !(x[j] > lower[j])) return false;
    if (upper && !(x[j] < upper[j])) return false;
  }
  return true;
}

/** Largest t ≥ 0 with ‖D·(a + t·b)‖ ≤ radius (0 when even t = 0 is outside). */
function radiusFraction(d: Float64Array, a: Float64Array, b: Float64Array, radius: number): number {
  let qa = 0;
  let qb = 0;
  let qc = 0;
  for (let j = 0; j < d.length; j++) {
    const da = d[j] * a[j];
    const db = d[j] * b[j];
    qa += db * db;
    qb += da * db;
    qc += da * da;
  }
  qc -= radius * radius;
  if (qa === 0) return qc <= 0 ? Infinity : 0;
  const disc = qb * qb - qa * qc;
  if (disc < 0) return 0;
  return Math.max(0, (-qb + Math.sqrt(disc)) / qa);
}

/**
 * Chooses the step from x for the trust-region step `s` (overwritten with
 * the chosen step). `radius` is Δ, `stepBack` θ_b.
 */
export function selectStep(
  m: StepModel, w: StepWork, x: Float64Array, s: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined,
  radius: number, stepBack: number,
): StepChoice {
  const p = m.p;
  const { a, b, sr, cand } = w;
  for (let j = 0; j < p; j++) a[j] = x[j] + s[j];
  if (strictlyInside(a, lower, upper)) return { kind: 'full', value: modelValue(m, s, w), stepBack: null, hits: [] };

  const hits: number[] = [];
  const alpha = feasibleFraction(x, s, lower, upper, hits);
  const hit = new Uint8Array(p);
  for (const j of hits) hit[j] = 1;

  // truncated
  let best: StepKind = 'truncated';
  for (let j = 0; j < p; j++) cand[j] = stepBack * alpha * s[j];
  let bestValue = modelValue(m, cand, w);
  b.set(cand);

  // reflected: from the bound point along s with the hit components reversed
  let sNorm = 0;
  for (let j = 0; j < p; j++) {
    a[j] = alpha * s[j];
    sr[j] = hit[j] ? -s[j] : s[j];
    sNorm += (m.d[j] * s[j]) ** 2;
  }
  const xb = cand;
  for (let j = 0; j < p; j++) xb[j] = x[j] + a[j];
  for (const j of hits) xb[j] = s[j] > 0 ? upper![j] : lower![j];
  let beta = feasibleFraction(xb, sr, lower, upper);
  // the bounce travels at most as far back as the step went to the bound (t·|s_j| ≤ α·|s_j| for a hit j)
  if (hits.length > 0) beta = Math.min(beta, alpha);
  const tRadius = radiusFraction(m.d, a, sr, Math.max(radius, Math.sqrt(sNorm)));
  const tMax = Math.min(beta, tRadius);
  if (tMax > 0 && Number.isFinite(tMax)) {
    const hi = beta <= tRadius ? stepBack * beta : tRadius;
    const lo = (1 - stepBack) * tMax;
    const [q1, q2] = line(m, a, sr, w);
    const t = lineMinimum(q1, q2, lo, hi);
    for (let j = 0; j < p; j++) cand[j] = a[j] + t * sr[j];
    const v = modelValue(m, cand, w);
    if (v < bestValue) {
      bestValue = v;
      best = 'reflected';
      b.set(cand);
    }
  }

  // scaled steepest descent −D⁻²g, normalised to ‖D·u‖ = 1
  let gn = 0;
  for (let j = 0; j < p; j++) gn += (m.g[j] / m.d[j]) ** 2;
  gn = Math.sqrt(gn);
  if (gn > 0 && Number.isFinite(gn)) {
    for (let j = 0; j < p; j++) sr[j] = -m.g[j] / (m.d[j] * m.d[j]) / gn;
    const toBox = feasibleFraction(x, sr, lower, upper);
    const hi = Math.min(radius, stepBack * toBox);
    a.fill(0);
    const [q1, q2] = line(m, a, sr, w);
    const t = lineMinimum(q1, q2, 0, hi);
    for (let j = 0; j < p; j++) cand[j] = t * sr[j];
    const v = modelValue(m, cand, w);
    if (v < bestValue) {
      bestValue = v;
      best = 'gradient';
      b.set(cand);
    }
  }
  s.set(b);
  return { kind: best, value: bestValue, stepBack, hits };
}
