/**
 * Fit warnings from the finished statistics. Thresholds live in
 * engine/thresholds.ts (each with its reason), texts in engine/messages.ts
 * (warningText); each rule below says which inequality triggers it. A fit that did not converge gets only the
 * warnings about its input and its stop (guessed starts, dropped rows, no
 * convergence, few degrees of freedom, a parameter at a bound at the last
 * iterate): the statistical ones (rank, conditioning, correlation, residual
 * patterns and normality, the R² caveat) describe a fitted result and are
 * withheld (engine/run/fit-stats.ts).
 */
import { patternText, warningText } from '../messages';
import { isHighCorrelation, isLargeCondition, isSerialDurbinWatson, THRESHOLDS as T } from '../thresholds';
import type { CorrelatedPair, FitWarning, ResidualDiagnostics, StopReason } from '../result';

export interface WarningInput {
  /** Free parameters with their estimates and bounds. */
  free: { name: string; estimate: number; lower: number; upper: number }[];
  /** Correlation matrix of the free parameters (NaN where undefined). */
  correlation: number[][];
  condition: number;
  rank: number;
  /** Free parameters left undetermined when rank < p (NaN covariance rows). */
  undetermined: string[];
  n: number;
  stop: StopReason;
  residuals: ResidualDiagnostics;
  /** Model linear in its free parameters. */
  linear: boolean;
  rowsDropped: number;
  /** File lines of the dropped rows, when known (named in the warning: the first few in its text, all in `rows`). */
  droppedLines?: ArrayLike<number>;
  file: string;
  guessed: { names: string[]; how: string };
}

/** Side of the bound an estimate sits on: |θ − b| ≤ boundRelative·max(1, |b|). */
export function boundHit(estimate: number, lower: number, upper: number): 'lower' | 'upper' | null {
  const near = (b: number) => Number.isFinite(b) && Math.abs(estimate - b) <= T.boundRelative * Math.max(1, Math.abs(b));
  if (near(lower)) return 'lower';
  if (near(upper)) return 'upper';
  return null;
}

/**
 * One `high_correlation` warning for all pairs with |ρⱼₖ| > THRESHOLDS.correlation (`isHighCorrelation`),
 * however many there are (a degree-10 polynomial has dozens): all pairs in `pairs`, worst |ρ| first, the
 * worst few in the text; `parameters` lists the parameters involved, those of the worst pair first.
 */
function correlatedPairs(input: WarningInput): FitWarning | null {
  const pairs: CorrelatedPair[] = [];
  const p = input.free.length;
  for (let j = 0; j < p; j++) {
    for (let k = j + 1; k < p; k++) {
      const rho = input.correlation[j]?.[k];
      if (rho !== undefined && isHighCorrelation(rho)) pairs.push({ parameters: [input.free[j].name, input.free[k].name], rho });
    }
  }
  if (pairs.length === 0) return null;
  pairs.sort((a, b) => Math.abs(b.rho) - Math.abs(a.rho));
  const names: string[] = [];
  for (const pair of pairs) for (const n of pair.parameters) if (!names.includes(n)) names.push(n);
  const message = pairs.length === 1
    ? warningText.high_correlation(pairs[0].parameters[0], pairs[0].parameters[1], pairs[0].rho)
    : warningText.high_correlations(pairs, names.length, p);
  return { code: 'high_correlation', message, parameters: names, pairs };
}

export function fitWarnings(input: WarningInput): FitWarning[] {
  const out: FitWarning[] = [];
  const p = input.free.length;
  if (input.guessed.names.length) {
    out.push({ code: 'guessed_start', message: warningText.guessed_start(input.guessed.names, input.guessed.how), parameters: input.guessed.names });
  }
  if (input.rowsDropped > 0) {
    const rows = input.droppedLines && input.droppedLines.length === input.rowsDropped ? Array.from(input.droppedLines) : undefined;
    out.push({ code: 'rows_dropped', message: warningText.rows_dropped(input.rowsDropped, input.file, rows), ...(rows ? { rows } : {}) });
  }
  if (!input.stop.converged) out.push({ code: 'no_convergence', message: warningText.no_convergence(input.stop.message) });
  if (input.n - p < T.minDof) out.push({ code: 'few_dof', message: warningText.few_dof(input.n, p) });
  for (const par of input.free) {
    const side = boundHit(par.estimate, par.lower, par.upper);
    if (side) {
      out.push({ code: 'at_bound', message: warningText.at_bound(par.name, side, side === 'lower' ? par.lower : par.upper), parameters: [par.name] });
    }
  }
  if (!input.stop.converged) return out;
  if (input.rank < p) {
    const undetermined = input.undetermined;
    out.push({ code: 'rank_deficient', message: warningText.rank_deficient(input.rank, p, undetermined), parameters: undetermined });
  } else if (isLargeCondition(input.condition)) {
    out.push({ code: 'ill_conditioned', message: warningText.ill_conditioned(input.condition) });
  }
  const correlated = correlatedPairs(input);
  if (correlated) out.push(correlated);
  const patterns: string[] = [];
  const runs = input.residuals.runs;
  if (runs && runs.pValue < T.residualP) patterns.push(patternText.runs(runs.observed, runs.expected, runs.pValue));
  const dw = input.residuals.durbinWatson;
  if (dw !== null && isSerialDurbinWatson(dw)) patterns.push(patternText.durbinWatson(dw));
  if (patterns.length) out.push({ code: 'residual_pattern', message: warningText.residual_pattern(patterns.join('; ')) });
  const sw = input.residuals.shapiroWilk;
  if (sw && sw.pValue < T.residualP) out.push({ code: 'non_normal_residuals', message: warningText.non_normal_residuals(sw.w, sw.pValue) });
  if (!input.linear) out.push({ code: 'r2_nonlinear', message: warningText.r2_nonlinear() });
  return out;
}
