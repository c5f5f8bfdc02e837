/**
 * Progress on stderr for long fits, only when stderr is a terminal: nothing
 * is shown during the first `delayMs` (short runs stay silent), then at most
 * one line per `intervalMs`, rewritten in place and cleared at the end.
 */
import type { CliIo } from './io';

export interface ProgressOptions {
  /** Quiet period before the first line. Default 700 ms. */
  delayMs?: number;
  /** Minimum time between updates. Default 150 ms. */
  intervalMs?: number;
}

export interface ProgressLine {
  /** The line's text, or a function giving it (called only when the line is drawn: fits report every iteration). */
  update(text: string | (() => string)): void;
  done(): void;
}

export function progressLine(io: CliIo, opts: ProgressOptions = {}): ProgressLine {
  if (!io.stderrIsTTY) return { update: () => undefined, done: () => undefined };
  const now = io.now ?? Date.now;
  const start = now();
  const delay = opts.delayMs ?? 700;
  const interval = opts.intervalMs ?? 150;
  let last = -Infinity;
  let shown = false;
  return {
    update(text) {
      const t = now();
      if (t - start < delay || t - last < interval) return;
      last = t;
      shown = true;
      io.stderr(`\r\x1b[2K${typeof text === 'function' ? text() : text}`);
    },
    done() {
      if (shown) io.stderr('\r\x1b[2K');
      shown = false;
    },
  };
}
