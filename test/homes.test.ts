/**
 * One home per concept, checked on the source tree (DEVELOPERS.md, "Where
 * things live"): probability distributions only through
 * engine/stats/distributions.ts, and upper tails never as `1 − cdf`.
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/** Every .ts file (repo-relative, forward slashes) under the product's folders. */
export function productFiles(tops = ['parser', 'engine', 'extension']): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(path.join(ROOT, dir))) {
      const rel = `${dir}/${name}`;
      if (statSync(path.join(ROOT, rel)).isDirectory()) walk(rel);
      else if (name.endsWith('.ts')) out.push(rel);
    }
  };
  for (const top of tops) walk(top);
  return out;
}

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
