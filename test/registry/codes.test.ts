/**
 * One case style for every code (issue 12, "one case style for all codes"):
 * snake_case, as JSON carries them. Checked on every registry of codes —
 * diagnostic codes (parser/messages.ts CODES), stop codes, warning codes,
 * group flags — and, by a scan of the sources, on every other code the
 * product writes: the literal unions of `…Code` / `…Flag` types and every
 * `code: '…'` or `code === '…'` literal (run errors of the data reader, the
 * runner and the queries have no registry of their own).
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { CODES } from '../../parser/messages';
import { STOP_CODES, WARNING_CODES } from '../../engine/result';
import { GROUP_FLAGS } from '../../engine/groups/flags';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const SNAKE = /^[a-z][a-z0-9]*(?:_[a-z0-9]+)*$/;
const notSnake = (codes: Iterable<string>) => [...codes].filter((c) => !SNAKE.test(c));

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(path.join(ROOT, dir))) {
    const rel = `${dir}/${name}`;
    if (statSync(path.join(ROOT, rel)).isDirectory()) out.push(...sources(rel));
    else if (name.endsWith('.ts')) out.push(rel);
  }
  return out;
}

/** Code literals written in the sources: members of `type XCode = 'a' | 'b'` (or `XFlag`) and values in `code: 'a'`, `code === 'a'`, `code !== 'a'`. */
export function codeLiterals(source: string): string[] {
  const found: string[] = [];
  for (const m of source.matchAll(/export type \w+(?:Code|Flag) =([^;]+);/g)) {
    for (const lit of m[1].matchAll(/'([^']*)'/g)) found.push(lit[1]);
  }
  for (const m of source.matchAll(/\bcode\s*(?::|===|!==)\s*'([^']*)'/g)) found.push(m[1]);
  return found;
}

describe('codes: one case style (snake_case)', () => {
  it('every diagnostic code, stop code, warning code and group flag is snake_case', () => {
    expect(notSnake(Object.keys(CODES))).toEqual([]);
    expect(notSnake(STOP_CODES)).toEqual([]);
    expect(notSnake(WARNING_CODES)).toEqual([]);
    expect(notSnake(GROUP_FLAGS)).toEqual([]);
    expect(Object.keys(CODES).length).toBeGreaterThan(40);
    expect(WARNING_CODES).toContain('at_bound');
  });

  it('every code literal in parser/, engine/ and extension/ is snake_case', () => {
    const bad: string[] = [];
    let seen = 0;
    for (const f of ['parser', 'engine', 'extension'].flatMap(sources)) {
      // Node's system error names (`ENOENT`, `EISDIR`) are not ours; editor codes are namespaced (`fit.stop.max_iterations`): each part is checked
      const codes = codeLiterals(readFileSync(path.join(ROOT, f), 'utf8')).filter((c) => !/^E[A-Z]+$/.test(c));
      seen += codes.length;
      bad.push(...codes.filter((c) => notSnake(c.split('.')).length > 0).map((c) => `${f}: '${c}'`));
    }
    expect(bad).toEqual([]);
    expect(seen).toBeGreaterThan(100);
  });

  it('the scan finds codes in both forms and the style check rejects kebab-case (the checks can fail)', () => {
    expect(codeLiterals("export type DataErrorCode =\n  | 'file_not_found'\n  | 'bad-one';\nreturn { code: 'csv-syntax' }; if (e.code === 'x') {}")).toEqual(['file_not_found', 'bad-one', 'csv-syntax', 'x']);
    expect(notSnake(['nested-too-deeply', 'at_bound', 'Upper', 'x2'])).toEqual(['nested-too-deeply', 'Upper']);
  });
});
