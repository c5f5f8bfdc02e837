/**
 * CPU time of one thread, for the fuzz campaign's per-case budget
 * (fuzz-cli.ts): on a shared machine wall time measures the neighbours too,
 * so a case is judged by the CPU time of the worker thread that runs it.
 * Linux only (/proc); elsewhere `threadFolder` gives null and the campaign
 * falls back to wall time.
 */
import { readFileSync, realpathSync } from 'node:fs';
import path from 'node:path';

/** USER_HZ, the unit of CPU times in /proc: 100 on Linux for every architecture Node supports (proc(5)). */
const CLOCK_TICKS = 100;

/** The calling thread's folder under /proc (`/proc/<pid>/task/<tid>`), or null where there is none. */
export function threadFolder(): string | null {
  try {
    return realpathSync('/proc/thread-self');
  } catch {
    return null;
  }
}

export interface ThreadCpu {
  /** User plus system CPU time, ms (resolution 1000 / USER_HZ = 10 ms). */
  ms: number;
  /** Scheduler state R (running or runnable); false when sleeping or waiting (a blocked read, an idle event loop). */
  running: boolean;
}

/** CPU time and state of the thread at `folder`, from its `stat` (proc(5): fields 3, 14 and 15); null once it is gone. */
export function threadCpu(folder: string): ThreadCpu | null {
  try {
    const stat = readFileSync(path.join(folder, 'stat'), 'utf8');
    // the command name (field 2) is in parentheses and may hold spaces: fields from 3 on follow the last ')'
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const ticks = Number(f[11]) + Number(f[12]);
    return Number.isFinite(ticks) ? { ms: (ticks * 1000) / CLOCK_TICKS, running: f[0] === 'R' } : null;
  } catch {
    return null;
  }
}
