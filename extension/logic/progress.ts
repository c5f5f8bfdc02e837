/**
 * The text of the fit progress notification: units done (fits, or groups of
 * a per-group fit) when there is more than one, and the latest accepted
 * iteration of the fit being solved (engine/front/views/progress.ts, the CLI's
 * words), so a long single fit visibly moves.
 */
import type { RunIteration } from '../../engine/runner';
import { iterationText } from '../../engine/front/views/progress';

export interface FitProgress {
  done: number;
  total: number;
  iteration?: RunIteration;
}

export function progressMessage(p: FitProgress): string {
  const parts: string[] = [];
  if (p.total > 1) parts.push(`${p.done} of ${p.total}`);
  if (p.iteration) parts.push(iterationText(p.iteration));
  return parts.join(' · ');
}
