/**
 * The text of the fit progress notification: units done (fits, or groups of
 * a per-group fit) when there is more than one, and the latest accepted
 * iteration of the fit being solved, so a long single fit visibly moves.
 */
import type { RunIteration } from '../../engine/run';
import { fmt } from './format';

export interface FitProgress {
  done: number;
  total: number;
  iteration?: RunIteration;
}

export function progressMessage(p: FitProgress): string {
  const parts: string[] = [];
  if (p.total > 1) parts.push(`${p.done} of ${p.total}`);
  const it = p.iteration;
  if (it) {
    const who = `${it.fit}${it.group !== undefined ? ` [${it.group}]` : ''}`;
    parts.push(`${who}: iteration ${it.iteration.toLocaleString('en-US')}, objective ${fmt(it.cost)}`);
  }
  return parts.join(' · ');
}
