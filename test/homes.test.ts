/**
 * One home per concept, checked on the source tree (DEVELOPERS.md, "Where
 * things live"): probability distributions only through
 * engine/stats/distributions.ts, and upper tails never as `1 − cdf`.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { ROOT, tsFilesUnder } from './source-files';

const productFiles = (tops = ['parser', 'engine', 'extension']): string[] => tsFilesUnder(tops);

const read = (rel: string) => readFileSync(path.join(ROOT, rel), 'utf8');

describe('one home: probability distributions', () => {
  const WRAPPER = 'engine/stats/distributions.ts';
  it('only the wrapper imports a distribution or special function of @stdlib', () => {
    const offending = productFiles().filter((f) => f !== WRAPPER && /['"]@stdlib\/(stats-base-dists|math-base-special)-/.test(read(f)));
    expect(offending).toEqual([]);
    expect(read(WRAPPER)).toMatch(/@stdlib\/math-base-special-betainc/); // the scan looks at the right spelling
  });
  it('no upper tail is taken as 1 − cdf', () => {
    const re = /1\s*-\s*\w*(?:Cdf|cdf)\s*\(/;
    const offending = productFiles().filter((f) => re.test(read(f)));
    expect(offending).toEqual([]);
    expect(re.test('return 1 - normalCdf(y, mean, sd);')).toBe(true);
  });
});

describe('one home: user-facing engine messages', () => {
  /** The message modules of the engine's layers (DEVELOPERS.md, "Where things live"); the front ends (engine/front/) word their own text. */
  const HOMES = new Set(['engine/messages.ts', 'engine/solve/messages.ts']);
  /**
   * A message, error, withheld note or skip reason written as a string or template literal that starts with text:
   * `message: 'no such…'`, `error: \`fit ${…}\``, `message = '…'`. A literal assigned to one of these fields
   * is user-facing text by what the field is (they reach results, stops and warnings), so a hit is never a
   * false alarm; an empty string (`message = ''`) or a passed-on value (`message: e.message`) does not match.
   * Texts declared with an entry of a table (a template's title and notes in engine/templates/library.ts, a
   * recognised shape's family and `how` in engine/solve/start/recognise.ts) stay with their entry.
   */
  const LITERAL = /\b(?:message|error|withheld|skipped)\s*[:=]\s*(?:['"][A-Za-z(-]|`(?:[A-Za-z(-]|\$\{))/;
  const engineCode = () => productFiles(['engine']).filter((f) => !HOMES.has(f) && !f.startsWith('engine/front/'));
  it('no engine file outside the message modules writes a message literal', () => {
    const offending: string[] = [];
    for (const f of engineCode()) {
      read(f).split('\n').forEach((line, i) => {
        if (/^\s*(\*|\/\/|\/\*)/.test(line)) return; // comments
        if (LITERAL.test(line)) offending.push(`${f}:${i + 1}: ${line.trim()}`);
      });
    }
    expect(offending).toEqual([]);
  });
  it('the pattern catches the forms it is meant for and passes the rest', () => {
    for (const hit of ["message: 'no data rows to fit'", 'error: `the robust solver (loss ${loss})`', 'message: `${file}: no column`', "message = 'residuals are not finite';", "{ skipped: 'the model is linear' }", 'message: `--shard ${text}: the shard must be 1 to ${count}`']) {
      expect(LITERAL.test(hit), hit).toBe(true);
    }
    for (const miss of ["let message = '';", 'message: e.message', 'message: stopText.noRows', "reason: 'weight_zero'", "code: 'failed'"]) {
      expect(LITERAL.test(miss), miss).toBe(false);
    }
  });
});
