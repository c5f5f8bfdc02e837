/**
 * Opt-in per-iteration trace of the iterative solvers (`SolveOptions.trace`):
 * one record per trial step with the cost, the scaled gradient measure, the
 * scaled step norm, the trust radius and the ratio of actual to predicted
 * reduction (for the interior reflective method also the kind of step, the
 * step-back factor and the bounds met). Records carry free-parameter indices;
 * the run layer names them (engine/run/fit.ts).
 *
 * Memory is bounded: at most TRACE_HEAD first and TRACE_TAIL last records
 * are kept (the tail in a ring buffer), the middle ones are counted in
 * `omitted`. A run of 10⁹ gradient-descent iterations keeps 1,000 records.
 */
import type { FitTrace, IterationRecord } from '../result';

export const TRACE_HEAD = 500;
export const TRACE_TAIL = 500;

/** A trace record as the solvers write it: bounds by free-parameter index. */
export type SolverRecord = Omit<IterationRecord, 'bounds' | 'active'> & { bounds?: number[]; active?: number[] };

export interface SolverTrace {
  solver: FitTrace['solver'];
  records: SolverRecord[];
  omitted: number;
}

export class TraceRecorder {
  private readonly head: SolverRecord[] = [];
  private readonly tail: SolverRecord[] = [];
  private next = 0;
  private total = 0;

  constructor(readonly solver: FitTrace['solver']) {}

  add(record: SolverRecord): void {
    this.total++;
    if (this.head.length < TRACE_HEAD) {
      this.head.push(record);
      return;
    }
    if (this.tail.length < TRACE_TAIL) this.tail.push(record);
    else this.tail[this.next] = record;
    this.next = (this.next + 1) % TRACE_TAIL;
  }

  result(): SolverTrace {
    const tail = this.tail.length < TRACE_TAIL ? this.tail : [...this.tail.slice(this.next), ...this.tail.slice(0, this.next)];
    return { solver: this.solver, records: [...this.head, ...tail], omitted: this.total - this.head.length - tail.length };
  }
}

/** Null when not finite (trace records are JSON data). */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
