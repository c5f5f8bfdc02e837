/**
 * Options and outcome shared by the solvers (linear QR, Levenberg–Marquardt,
 * the interior reflective trust region, gradient descent, robust IRLS).
 * Options are checked by `validateSolveOptions` (`options.ts`) before a
 * solver starts; an invalid option gives a `failed` stop that says which.
 */
import type { StopReason, StopCode } from '../result';
import type { SolverTrace } from './trace';
import type { CancelToken } from './problem';
import type { PivotedQR } from '../linalg/qr';
import { DIGITS, formatWritten } from '../format';

/** How bound-constrained nonlinear problems are solved (`index.ts` `solveNonlinear`). */
export type BoundsMethod = 'reflective' | 'projection';

export interface SolveOptions {
  /** Iteration limit. Default 1000 (LM: the hardest NIST StRD starts need up to ~750), 100000 (gradient descent). */
  maxIterations?: number;
  /** Residual-evaluation limit. Default max(2000, 2·maxIterations, 100·(p + 1)) for LM, 2·maxIterations + 600 for gradient descent. */
  maxEvaluations?: number;
  /** Relative cost-reduction tolerance (see each solver for its inequality). Default 1e-10 (gradient descent 1e-15). */
  reductionTolerance?: number;
  /** Relative step tolerance. Default 1e-10 (gradient descent 1e-15). */
  stepTolerance?: number;
  /** Scaled-gradient tolerance. Default 1e-10. */
  gradientTolerance?: number;
  /** Checked once per iteration. */
  cancel?: CancelToken;
  /** LM and reflective: Gauss–Newton polishing after a converged stop (`polish.ts`). Default true. */
  polish?: boolean;
  /** Called after each accepted iteration with the cost ½‖r‖². */
  onIteration?: (it: number, cost: number) => void;
  /** Record a per-iteration trace in the outcome (`trace.ts`). Default false. */
  trace?: boolean;
  /** Bounded nonlinear problems: interior reflective trust region (default) or projection with an active set. */
  bounds?: BoundsMethod;
}

/** Where the model stopped being finite: rows, parameters and the parameter values (located by the run layer). */
export interface NonFiniteReport {
  what: 'residuals' | 'jacobian';
  /** 0-based residual indices, the first few (at most NON_FINITE_ROWS). */
  rows: number[];
  /** Number of rows with a non-finite entry. */
  count: number;
  /** Free-parameter indices whose Jacobian column has a non-finite entry (empty for residuals). */
  parameters: number[];
  /** The parameter values at which it happened. */
  theta: number[];
}

export interface SolveOutcome {
  theta: Float64Array;
  residuals: Float64Array;
  /** n×p column-major at theta. */
  jacobian: Float64Array;
  /** ½‖r‖² (robust fits: ½Σ c²ρ(rᵢ²/c²), see `loss.ts`). */
  cost: number;
  stop: StopReason;
  iterations: number;
  /** Residual evaluations (passes over the data computing r). */
  evaluations: number;
  jacobianEvaluations: number;
  /** Numerical rank of the Jacobian at theta, when the solver determined it. */
  rank?: number;
  /**
   * The pivoted, column-scaled QR (`{ pivot: true, scale: true }`, default rank
   * tolerance) of `jacobian` exactly as returned, when the solver's last
   * factorisation was of that matrix: the statistics use it instead of
   * factoring the same numbers again (the same deterministic arithmetic, so
   * the same bits). Absent when the solver has none.
   */
  factor?: PivotedQR;
  /** Robust fits: final IRLS weights ρ′(rᵢ²/c²) per residual. */
  robustWeights?: Float64Array;
  /** Robust fits: the loss scale c the weights were computed with (given, or from the residuals' spread; engine/solve/loss.ts). */
  robustScale?: number;
  /** Per-iteration trace, when `options.trace` was set. */
  trace?: SolverTrace;
  /** With a `non_finite` stop: where the residuals or the Jacobian were not finite. */
  nonFinite?: NonFiniteReport;
}

export const DEFAULT_TOLERANCE = 1e-10;

const CONVERGED: ReadonlySet<StopCode> = new Set(['exact', 'small_reduction', 'small_step', 'small_gradient']);

export function stopReason(code: StopCode, message: string): StopReason {
  return { code, message, converged: CONVERGED.has(code) };
}

/** A number in a stop or option message (sizes and tolerances, read by magnitude): engine/format.ts, `DIGITS.magnitude` digits, e.g. `3.1e-13`. */
export function fmt(x: number): string {
  return formatWritten(x, DIGITS.magnitude);
}

export function allFinite(x: Float64Array, length = x.length): boolean {
  for (let i = 0; i < length; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}

export function halfSumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return 0.5 * s;
}

/** Most rows named in a non-finite report. */
export const NON_FINITE_ROWS = 5;

/** Locate the non-finite entries of r (length n) or of J (n×p column-major). */
export function nonFiniteReport(what: NonFiniteReport['what'], values: Float64Array, n: number, p: number, theta: Float64Array): NonFiniteReport {
  const cols = what === 'residuals' ? 1 : p;
  const bad = new Uint8Array(n);
  const parameters: number[] = [];
  for (let j = 0; j < cols; j++) {
    let any = false;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(values[j * n + i])) {
        bad[i] = 1;
        any = true;
      }
    }
    if (any && what === 'jacobian') parameters.push(j);
  }
  const rows: number[] = [];
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (!bad[i]) continue;
    count++;
    if (rows.length < NON_FINITE_ROWS) rows.push(i);
  }
  return { what, rows, count, parameters, theta: Array.from(theta) };
}
