/**
 * The words for a fit in progress, shared by the CLI's progress line and the
 * editor's progress notification: the latest accepted iteration of the fit
 * being solved, e.g. `decay [b003]: iteration 12,345, objective 0.001235`.
 */
import type { RunIteration } from '../../runner/run-plan';
import { DIGITS, formatNumber } from '../../format';

export function iterationText(it: RunIteration): string {
  const who = `${it.fit}${it.group !== undefined ? ` [${it.group}]` : ''}`;
  return `${who}: iteration ${it.iteration.toLocaleString('en-US')}, objective ${formatNumber(it.cost, DIGITS.statistic)}`;
}
