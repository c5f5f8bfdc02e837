/**
 * Intervals from bootstrap refits (engine/run/bootstrap.ts), for the
 * parameters of a fit and for derived quantities evaluated at each refit.
 *
 * Percentile interval (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, §13.3): [Q(α/2), Q(1 − α/2)] of the successful replicates,
 * α = 1 − level, with Q the sample quantile by linear interpolation between
 * order statistics (Hyndman & Fan 1996, definition 7; engine/groups/quantile.ts).
 *
 * BCa interval (E&T §14.3): [Q(α₁), Q(α₂)] with
 *   α₁ = Φ(z₀ + (z₀ + z_{α/2}) / (1 − a(z₀ + z_{α/2}))),
 *   α₂ = Φ(z₀ + (z₀ + z_{1−α/2}) / (1 − a(z₀ + z_{1−α/2})))   (eq. 14.10),
 * bias correction z₀ = Φ⁻¹(#{θ*_b < θ̂}/B) (eq. 14.14; replicates equal to θ̂
 * count one half, a common practice for discrete ties), and acceleration from
 * the leave-one-out estimates θ₍ᵢ₎ with mean θ₍·₎:
 *   a = Σ(θ₍·₎ − θ₍ᵢ₎)³ / (6·[Σ(θ₍·₎ − θ₍ᵢ₎)²]^{3/2})   (eq. 14.15).
 * z₀ is infinite when every replicate lies on one side of θ̂; BCa is then not
 * given (the percentile interval still is).
 *
 * Failed refits: the intervals are withheld when more refits failed than
 * B·(1 − level)/2, the number of replicates beyond one end: a refit fails most
 * often for a sample far from the data (a tail), so that many failures could
 * be a whole tail and the interval would be too short without showing it.
 * Fewer failures are left out and counted in the note.
 */
import { normalCdf, normalQuantile } from '../stats/distributions';
import type { BootstrapInterval, BootstrapSummary, FitWarning } from '../result';
import { bootstrapText, warningText } from '../messages';
import type { BootstrapChunk, BootstrapJob } from './bootstrap';

/** Quantile q of sorted values, Hyndman & Fan (1996) definition 7 (as engine/groups/quantile.ts, which engine/run may not import). */
function quantileSorted(sorted: Float64Array, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Rows above which no leave-one-out refits are run for BCa: n refits more than the B replicates (measured cost: test/bench). */
export const BCA_MAX_ROWS = 5000;

/** Fewer replicates than this beyond each end earn a note that the ends are uncertain (E&T §19.3 suggest B ≥ 1000 at 90–95 %: about 25–50 per tail). */
export const FEW_IN_TAIL = 25;

/** The refits of a job, joined from its chunks in index order. */
export interface BootstrapDraws {
  p: number;
  replicates: number;
  /** B×p, row b the estimates of replicate b (NaN: failed). */
  theta: Float64Array;
  /** n×p leave-one-out estimates (NaN: failed), or null without the jackknife. */
  jack: Float64Array | null;
  failures: (string | null)[];
}

export function joinChunks(job: Pick<BootstrapJob, 'replicates' | 'jackknife' | 'data' | 'theta'>, chunks: readonly BootstrapChunk[]): BootstrapDraws {
  const p = job.theta.length;
  const total = job.replicates + (job.jackknife ? job.data.n : 0);
  const all = new Float64Array(total * p).fill(NaN);
  const failures: (string | null)[] = new Array<string | null>(total).fill(bootstrapText.cancelled);
  for (const c of chunks) {
    all.set(c.theta, c.from * p);
    for (let k = 0; k < c.failures.length; k++) failures[c.from + k] = c.failures[k];
  }
  return {
    p,
    replicates: job.replicates,
    theta: all.subarray(0, job.replicates * p),
    jack: job.jackknife ? all.subarray(job.replicates * p) : null,
    failures,
  };
}

/** Percentile and BCa intervals of one quantity: `values` per replicate (NaN: left out), `jack` per left-out row or null. */
export function bootstrapInterval(values: Float64Array, jack: Float64Array | null, estimate: number, level: number): BootstrapInterval | null {
  const finite = Float64Array.from(Array.from(values).filter(Number.isFinite)).sort();
  const b = finite.length;
  if (b < 2) return null;
  const alpha = 1 - level;
  const lower = quantileSorted(finite, alpha / 2);
  const upper = quantileSorted(finite, 1 - alpha / 2);
  let mean = 0;
  for (const v of finite) mean += v;
  mean /= b;
  let ss = 0;
  for (const v of finite) ss += (v - mean) ** 2;
  const stderr = Math.sqrt(ss / (b - 1));
  let bcaLower: number | null = null;
  let bcaUpper: number | null = null;
  let z0: number | null = null;
  let acceleration: number | null = null;
  if (jack && Number.isFinite(estimate)) {
    let below = 0;
    for (const v of finite) below += v < estimate ? 1 : v === estimate ? 0.5 : 0;
    const z = normalQuantile(below / b);
    const a = accelerationOf(jack);
    if (Number.isFinite(z) && a !== null) {
      const at = (zq: number) => normalCdf(z + (z + zq) / (1 - a * (z + zq)));
      const a1 = at(normalQuantile(alpha / 2));
      const a2 = at(normalQuantile(1 - alpha / 2));
      if (Number.isFinite(a1) && Number.isFinite(a2)) {
        bcaLower = quantileSorted(finite, a1);
        bcaUpper = quantileSorted(finite, a2);
        z0 = z;
        acceleration = a;
      }
    }
  }
  return { lower, upper, bcaLower, bcaUpper, stderr, z0, acceleration };
}

/** E&T eq. 14.15 from the leave-one-out values; null when one is missing or they do not vary. */
function accelerationOf(jack: Float64Array): number | null {
  const n = jack.length;
  if (n < 2 || !jack.every(Number.isFinite)) return null;
  let mean = 0;
  for (const v of jack) mean += v;
  mean /= n;
  let s2 = 0;
  let s3 = 0;
  for (const v of jack) {
    const d = mean - v;
    s2 += d * d;
    s3 += d * d * d;
  }
  if (!(s2 > 0)) return null;
  const a = s3 / (6 * Math.pow(s2, 1.5));
  return Number.isFinite(a) ? a : null;
}

/** The column of quantity j of an r×p row-major block. */
export function column(block: Float64Array, p: number, j: number): Float64Array {
  const rows = block.length / p;
  const out = new Float64Array(rows);
  for (let r = 0; r < rows; r++) out[r] = block[r * p + j];
  return out;
}

export interface FitBootstrap {
  summary: BootstrapSummary;
  /** Per free parameter (declaration order), null when withheld. */
  intervals: (BootstrapInterval | null)[];
  warnings: FitWarning[];
}

/** The summary and the parameter intervals of a fit's bootstrap. `bcaNote` says why the job ran no jackknife, when it did not. */
export function summarizeBootstrap(job: Pick<BootstrapJob, 'resample' | 'seed' | 'theta'>, draws: BootstrapDraws, level: number, bcaNote: string | null): FitBootstrap {
  const { p, replicates } = draws;
  const counts = new Map<string, number>();
  let failed = 0;
  for (let b = 0; b < replicates; b++) {
    const f = draws.failures[b];
    if (f === null) continue;
    failed++;
    counts.set(f, (counts.get(f) ?? 0) + 1);
  }
  const failures = [...counts].map(([reason, count]) => ({ reason, count })).sort((x, y) => y.count - x.count);
  let jackFailed = 0;
  if (draws.jack) for (let i = replicates; i < draws.failures.length; i++) if (draws.failures[i] !== null) jackFailed++;
  const allowed = Math.floor((replicates * (1 - level)) / 2);
  const base = {
    resample: job.resample,
    replicates,
    seed: job.seed,
    level,
    failed,
    failures,
    jackknife: draws.jack ? draws.jack.length / p : 0,
    jackknifeFailed: jackFailed,
  };
  if (failed > allowed) {
    return {
      summary: { ...base, status: 'withheld', note: bootstrapText.withheld(failed, replicates, allowed), bca: false, bcaNote: '' },
      intervals: new Array(p).fill(null),
      warnings: [{ code: 'bootstrap_failures', message: warningText.bootstrap_failures(failed, replicates, allowed) }],
    };
  }
  const jackUsable = draws.jack !== null && jackFailed === 0;
  const intervals = Array.from({ length: p }, (_, j) => bootstrapInterval(column(draws.theta, p, j), jackUsable ? column(draws.jack!, p, j) : null, job.theta[j], level));
  const bca = intervals.some((iv) => iv?.bcaLower !== null && iv?.bcaLower !== undefined);
  const bcaText = bcaNote ?? (jackFailed > 0 ? bootstrapText.bcaJackFailed(jackFailed) : bca ? bootstrapText.bca : bootstrapText.bcaDegenerate);
  const tail = ((replicates - failed) * (1 - level)) / 2;
  const notes = [bootstrapText.computed(replicates, job.resample, job.seed, level, failed), ...(tail < FEW_IN_TAIL ? [bootstrapText.fewInTail(tail)] : [])];
  return {
    summary: { ...base, status: 'computed', note: notes.join('; '), bca, bcaNote: bcaText },
    intervals,
    warnings: [],
  };
}
