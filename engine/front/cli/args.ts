/**
 * Argument parsing with Node's own `util.parseArgs` (strict: unknown options
 * are errors), turning its exceptions into messages.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { MSG } from './messages';

export type OptionSpec = NonNullable<ParseArgsConfig['options']>;

export type Parsed<V> = { ok: true; values: V; positionals: string[] } | { ok: false; message: string };

/** Parse `argv` for command `cmd`; `--help`/`-h` is always accepted. */
export function parseCommandArgs<V extends object>(cmd: string, argv: string[], options: OptionSpec): Parsed<V & { help?: boolean }> {
  try {
    const r = parseArgs({
      args: argv,
      options: { ...options, help: { type: 'boolean', short: 'h' } },
      allowPositionals: true,
      strict: true,
    });
    return { ok: true, values: r.values as V & { help?: boolean }, positionals: r.positionals };
  } catch (e) {
    const raw = e instanceof Error ? e.message : String(e);
    // Node's messages carry advice for script authors ("To specify a positional argument ..."); keep the first sentence.
    const sentence = raw.split(/\.\s/)[0].replace(/\.$/, '');
    const first = sentence.charAt(0).toLowerCase() + sentence.slice(1);
    return { ok: false, message: MSG.badArgs(cmd, first) };
  }
}

/** Levenshtein distance, for "did you mean" on commands and templates. */
export function editDistance(a: string, b: string): number {
  const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
  }
  return d[a.length][b.length];
}

/** The closest candidate within distance max(2, ⌈len/3⌉), or null. */
export function closest(word: string, candidates: readonly string[]): string | null {
  let best: string | null = null;
  let bestD = Math.max(2, Math.ceil(word.length / 3)) + 1;
  for (const c of candidates) {
    const dist = editDistance(word.toLowerCase(), c.toLowerCase());
    if (dist < bestD) {
      best = c;
      bestD = dist;
    }
  }
  return best;
}
