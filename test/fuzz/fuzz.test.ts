/**
 * The fuzzer in the suite: a fixed, bounded slice of what `npm run fuzz`
 * runs in campaigns (test/fuzz/fuzz-cli.ts), in this process, with small
 * sizes. Every case must end ok or with located errors: no internal error,
 * no unlocated error, no check/fit difference. A failure names the
 * case; `npm run fuzz -- --kind K --seed S --only I` reruns it.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadCorpus, specCase, SMALL } from './specs';
import { csvCase, CSV_SMALL } from './csv';
import { Rand } from './random';
import { runCase, type CaseResult } from './run-case';

const ROOT = path.resolve(__dirname, '..', '..');
const SEED = 20261203;
const dir = mkdtempSync(path.join(os.tmpdir(), 'leastwise-fuzz-suite-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function acceptable(r: CaseResult): boolean {
  return r.outcome === 'ok' || r.outcome === 'located';
}

describe('test/fuzz (seeded, bounded)', () => {
  const corpus = loadCorpus(ROOT);

  it('specs: random, mutated, nested, huge, odd Unicode and random bytes - check, fit and every view', async () => {
    const tally = new Map<string, number>();
    let fitted = 0;
    for (let i = 0; i < 240; i++) {
      const c = specCase(Rand.forCase(SEED, i), corpus, SMALL);
      const r = await runCase(c, { dir, svg: i % 40 === 0 });
      tally.set(`${c.shape}:${r.outcome}`, (tally.get(`${c.shape}:${r.outcome}`) ?? 0) + 1);
      if (r.checkedClean) fitted++;
      expect(acceptable(r), `spec case ${i} (${c.shape}, seed ${SEED}): ${r.notes.join(' | ')}\n${c.spec.slice(0, 400)}`).toBe(true);
    }
    // the generator reaches every shape and fits a fair share of its specs
    for (const shape of ['grammar', 'mutated', 'nesting', 'huge', 'unicode', 'bytes']) expect([...tally.keys()].some((k) => k.startsWith(shape)), shape).toBe(true);
    expect(fitted).toBeGreaterThan(50);
  }, 120_000);

  it('CSV files: quotes, line breaks, BOM, CR/LF mixes, ragged rows, junk, wide and tall - loader, check, fit', async () => {
    let fitted = 0;
    for (let i = 0; i < 120; i++) {
      const c = csvCase(Rand.forCase(SEED, i, 0x51), CSV_SMALL);
      const r = await runCase(c, { dir, loader: true, svg: i % 40 === 0 });
      if (r.checkedClean) fitted++;
      expect(acceptable(r), `csv case ${i} (${c.shape}, seed ${SEED}): ${r.notes.join(' | ')}\n${c.files[0].text.slice(0, 300)}`).toBe(true);
    }
    expect(fitted).toBeGreaterThan(30);
  }, 120_000);
});
