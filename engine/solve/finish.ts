/**
 * The end of a trust-region solve, shared by Levenberg–Marquardt (`lm.ts`)
 * and the interior reflective method (`reflective.ts`): the Jacobian made
 * current at the returned θ (the SolveOutcome contract), a small-step stop
 * from a point that never moved marked not converged, Gauss–Newton
 * polishing after a converged stop (`polish.ts`), and the outcome with its
 * trace and its non-finite report.
 */
import type { StopCode } from '../result';
import type { LeastSquaresProblem } from './problem';
import { polishGaussNewton, type PolishWorkspace } from './polish';
import { stopReason, type NonFiniteReport, type SolveOutcome } from './types';
import { stopText } from './messages';
import type { TraceRecorder } from './trace';
import type { PivotedQR } from '../linalg/qr';

export interface FinishState {
  problem: LeastSquaresProblem;
  x: Float64Array;
  r: Float64Array;
  jac: Float64Array;
  /** `jac` holds J(x). */
  jacobianCurrent: boolean;
  iterations: number;
  evaluations: number;
  jacobianEvaluations: number;
  /** A trial step was evaluated (a non-finite stop is then not about the starting values). */
  started: boolean;
  polish: boolean;
  /** Polishing trials must lie strictly inside the bounds. */
  strictInterior: boolean;
  workspace?: PolishWorkspace;
  recorder: TraceRecorder | null;
  nonFinite: NonFiniteReport | null;
}

export function finishSolve(code: StopCode, message: string, s: FinishState): SolveOutcome {
  const { problem, x, r, jac } = s;
  const { n, p } = problem;
  let njev = s.jacobianEvaluations;
  let nfev = s.evaluations;
  if (!s.jacobianCurrent && n > 0 && p > 0 && code !== 'non_finite') {
    problem.jacobian(x, jac);
    njev++;
  }
  const stop = stopReason(code, message);
  if ((code === 'small_step' || (code === 'non_finite' && s.started)) && s.iterations === 0) {
    // Every trial step from the start was rejected until the trust region
    // collapsed: the point never moved, so this is not evidence of an optimum.
    stop.converged = false;
    stop.message += stopText.noStepAccepted;
  }
  let factor: PivotedQR | null = null;
  if (stop.converged && s.polish) {
    const c = polishGaussNewton(problem, { x, r, jac }, 30, s.workspace, s.strictInterior);
    factor = c.factor;
    nfev += c.evaluations;
    njev += c.jacobianEvaluations;
    if (c.steps > 0) stop.message += stopText.polished(c.steps);
  }
  let ss = 0;
  for (let i = 0; i < n; i++) ss += r[i] * r[i];
  return {
    theta: x, residuals: r, jacobian: jac, cost: 0.5 * ss, stop, iterations: s.iterations, evaluations: nfev, jacobianEvaluations: njev,
    ...(factor ? { factor } : {}),
    ...(s.recorder ? { trace: s.recorder.result() } : {}),
    ...(code === 'non_finite' && s.nonFinite ? { nonFinite: s.nonFinite } : {}),
  };
}
