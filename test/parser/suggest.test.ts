import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { boundedDistance, editDistance, suggest, Suggester } from '../../parser/suggest';
import { analyze } from '../../parser/index';
import { HEADER_10K, unknownNamesSpec } from '../bench/cases/suggest';

describe('parser/suggest', () => {
  it('computes edit distance with adjacent transpositions (from memory: kitten/sitting = 3)', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('tau', 'tua')).toBe(1);
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('Rate', 'rate')).toBe(0);
  });

  it('suggests close names, nearest first, and nothing for far ones', () => {
    expect(suggest('linar', ['auto', 'linear', 'levenberg_marquardt'])).toEqual(['linear']);
    expect(suggest('tmp', ['temp', 'time', 'tmp2'])).toEqual(['temp', 'tmp2']);
    expect(suggest('zzz', ['temp', 'time'])).toEqual([]);
    expect(suggest('x', ['x', 'y'])).toEqual(['y']);
  });
});

/**
 * The unbounded search as it was before the cost bounds: full optimal string
 * alignment table (Damerau 1964), every candidate compared. The oracle for
 * the bounded search.
 */
function fullDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  const d: number[][] = Array.from({ length: s.length + 1 }, (_, i) => Array.from({ length: t.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= s.length; i++) {
    for (let j = 1; j <= t.length; j++) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[s.length][t.length];
}
function referenceSuggest(word: string, candidates: readonly string[], limit = 3): string[] {
  const scored: { name: string; d: number; i: number }[] = [];
  const seen = new Set<string>();
  let i = 0;
  for (const c of candidates) {
    if (c === word || c === '' || seen.has(c)) continue; // (the bounded search never suggests an empty name either)
    seen.add(c);
    const d = fullDistance(word, c);
    if (d <= Math.max(1, Math.floor(Math.max(word.length, c.length) / 3))) scored.push({ name: c, d, i: i++ });
  }
  scored.sort((x, y) => x.d - y.d || x.i - y.i);
  return scored.slice(0, limit).map((s) => s.name);
}

describe('parser/suggest bounded cost', () => {
  const word = fc.string({ unit: fc.constantFrom('a', 'b', 'c', 'A', '_', '1', 'é'), maxLength: 14 });

  it('the banded distance equals the full table whenever it is at most k, and says "more than k" otherwise', () => {
    fc.assert(fc.property(word, word, fc.integer({ min: 0, max: 6 }), (a, b, k) => {
      const full = fullDistance(a, b);
      expect(boundedDistance(a, b, k)).toBe(Math.min(full, k + 1));
      expect(editDistance(a, b)).toBe(full);
    }), { numRuns: 3000, seed: 20261203 });
  });

  it('ordinary typos get exactly the suggestions of the unbounded search', () => {
    const columns = ['time_min', 'temp_C', 'temp_sd', 'conc_mg_L', 'absorbance', 'well', 'plate_id', 'dose_uM', 'response', 'batch', 'substrate_mM', 'rate_uM_min', 'T_K', 'k_obs'];
    const typos = ['time_mins', 'tmep_C', 'temp_c', 'conc_mgL', 'absorbanse', 'wel', 'plateid', 'dose', 'respons', 'bacth', 'substrat_mM', 'rate_um_min', 'TK', 'kobs', 'zzz', 'x'];
    for (const t of typos) expect(suggest(t, columns), t).toEqual(referenceSuggest(t, columns));
    fc.assert(fc.property(word, fc.array(word, { maxLength: 30 }), (w, cs) => {
      expect(new Suggester().suggest(w, cs)).toEqual(referenceSuggest(w, cs));
    }), { numRuns: 1500, seed: 7 });
  });

  it('several candidate lists read as one list in order; a repeated lookup is remembered, not recomputed', () => {
    const header = new Set(['temp_C', 'temp_sd', 'time_min']);
    const s = new Suggester();
    expect(s.suggest('tmp_C', [['tmp'], header, ['pi', 'e']])).toEqual(referenceSuggest('tmp_C', ['tmp', 'temp_C', 'temp_sd', 'time_min', 'pi', 'e']));
    const spent = s.spentCells;
    expect(s.suggest('tmp_C', header)).toEqual(['temp_C']);
    expect(s.spentCells).toBe(spent);
  });

  it('once the budget is spent, lookups give no suggestion (never a partial, possibly wrong one)', () => {
    const header = Array.from({ length: 2000 }, (_, i) => `sensor_${String(i).padStart(4, '0')}`);
    const s = new Suggester(200_000);
    const answers = Array.from({ length: 50 }, (_, i) => s.suggest(`snsor_${String(i * 37).padStart(4, '0')}`, header));
    expect(s.exhausted).toBe(true);
    const given = answers.filter((a) => a.length > 0);
    expect(given.length).toBeGreaterThan(0);
    expect(given.length).toBeLessThan(50);
    answers.forEach((a, i) => {
      if (a.length) expect(a).toEqual(referenceSuggest(`snsor_${String(i * 37).padStart(4, '0')}`, header));
    });
    // all answered lookups come first: the budget only ever cuts the tail
    expect(answers.findIndex((a) => a.length === 0)).toBe(given.length);
  });

  it('a spec with 1,000 unknown names over a 10,000-column header reports all of them; the first ones with suggestions', () => {
    const text = unknownNamesSpec(1000);
    const { diagnostics } = analyze(text, { headers: () => HEADER_10K });
    const unknown = diagnostics.filter((d) => d.code === 'undefined_name');
    expect(unknown).toHaveLength(1000);
    const first = unknown[0];
    const name = text.slice(first.range.start.offset, first.range.end.offset);
    expect(first.suggestions).toEqual(referenceSuggest(name, ['a', ...HEADER_10K, 'pi', 'e']));
    expect(first.suggestions!.length).toBeGreaterThan(0);
    expect(unknown.filter((d) => d.suggestions?.length).length).toBeLessThan(1000);
  });
});
