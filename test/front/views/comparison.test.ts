import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { comparisonBlock, decisionSentence, groupComparisonBlock, nestedTestSentence } from '../../../engine/front/views/comparison';
import { AICC_CLEAR, AICC_TIE } from '../../../engine/thresholds';
import { markdownReport } from '../../../engine/front/views/markdown';
import { queryTextLines } from '../../../engine/front/views/text';
import type { QueryResult, RunResult } from '../../../engine/result';

type Comparison = Extract<QueryResult, { kind: 'compare' }>;
const row = (fit: string, p: number, aicc: number, deltaAicc: number, akaikeWeight: number) => ({ fit, n: 12, p, ssr: 1 / p, aic: aicc - 1, aicc, bic: aicc + 1, deltaAicc, akaikeWeight });

describe('views/comparison', () => {
  it('reads ΔAICc on the Burnham & Anderson (2002, §2.6) scale: within 2, above 10, between', () => {
    expect([AICC_TIE, AICC_CLEAR]).toEqual([2, 10]); // Burnham & Anderson 2002, §2.6
    const best = row('line', 2, 10, 0, 0.7);
    expect(decisionSentence(best, row('curve', 3, 11.5, 1.5, 0.3))).toBe('The data do not tell line and curve apart: their AICc differ by 1.5, within 2.');
    expect(decisionSentence(best, row('curve', 3, 12, 2, 0.3))).toContain('do not tell'); // 2 itself is a tie
    expect(decisionSentence(best, row('curve', 3, 15, 5, 0.1))).toBe('The data favour line over curve: its AICc is lower by 5.');
    expect(decisionSentence(best, row('curve', 3, 20, 10, 0.01))).toBe('The data favour line over curve: its AICc is lower by 10.');
    expect(decisionSentence(best, row('curve', 3, 20.5, 10.5, 0.005))).toBe('The data clearly favour line over curve: its AICc is lower by 10.5, more than 10.');
    expect(decisionSentence(best, row('curve', 11, NaN, NaN, NaN))).toBe('No verdict between line and curve: curve has no AICc (too few points for its parameters).');
  });

  it('states the nested test with its degrees of freedom and p, and a tiny p as a bound', () => {
    const t = { f: 660, df1: 3, df2: 20, pValue: 3.7e-20, simpler: 'one', richer: 'four' };
    expect(nestedTestSentence(t)).toBe('Nested test: four has 3 more parameters than one; F(3, 20) = 660, p < 0.0001, the chance that scatter alone would lower the residual sum of squares this much.');
    expect(nestedTestSentence({ ...t, df1: 1, f: 0.46, pValue: 0.508 })).toContain('has 1 more parameter than one; F(1, 20) = 0.46, p = 0.508,');
  });

  it('puts the decision first, one sentence per pair against the lowest AICc, then one column per fit', () => {
    const q: Comparison = { kind: 'compare', fits: ['a', 'b', 'c'], rows: [row('a', 2, 14, 4, 0.11), row('b', 3, 10, 0, 0.87), row('c', 4, 22, 12, 0.02)] };
    const b = comparisonBlock(q);
    expect(b.heading).toBe('Which model the data support: a, b, c');
    expect(b.lead).toEqual(['The data favour b over a: its AICc is lower by 4.', 'The data clearly favour b over c: its AICc is lower by 12, more than 10.']);
    expect(b.headers).toEqual(['evidence', 'a', 'b', 'c']);
    expect(b.rows.map((r) => r[0])).toEqual(['points', 'free parameters', 'residual sum of squares', 'AICc', 'AICc above the lowest', 'Akaike weight']);
    expect(b.rows[1]).toEqual(['free parameters', '2', '3', '4']);
    expect(b.notes).toHaveLength(1); // no nested test, no note about nesting
  });

  it('a withheld comparison shows only why, in text and Markdown', () => {
    const q: Comparison = { kind: 'compare', fits: ['a', 'b'], rows: [], withheld: 'Withheld: fit a did not converge.' };
    expect(comparisonBlock(q)).toMatchObject({ lead: [], rows: [], notes: ['Withheld: fit a did not converge.'] });
    const run = { queries: [q], fits: [], errors: [], expectations: [] } as unknown as RunResult;
    expect(queryTextLines(run)).toEqual(['Which model the data support: a, b', '  Withheld: fit a did not converge.']);
  });

  it('the Markdown report shares the block: the heading, each sentence its own paragraph, then the table', () => {
    const run = JSON.parse(readFileSync(join(__dirname, '../../fixtures/calibration-run.json'), 'utf8')) as RunResult;
    const md = markdownReport(run);
    const start = md.indexOf('### Which model the data support: cal, cal_quad');
    expect(start).toBeGreaterThan(0);
    const lines = md.slice(start).split('\n');
    expect(lines.slice(0, 6)).toEqual([
      '### Which model the data support: cal, cal_quad',
      '',
      'The data favour cal over cal_quad: its AICc is lower by 2.53.',
      '',
      'Nested test: cal_quad has 1 more parameter than cal; F(1, 15) = 0.46, p = 0.508, the chance that scatter alone would lower the residual sum of squares this much.',
      '',
    ]);
    expect(lines[6]).toBe('| evidence | cal | cal_quad |');
  });

  it('a compare of per-group fits: the wholes note first, then one row per group with the fit each group favours', () => {
    const ft = { f: 13.9, df1: 1, df2: 20, pValue: 0.0013, simpler: 'a', richer: 'b' };
    const q: Comparison = {
      kind: 'compare', fits: ['a', 'b'], rows: [row('a', 6, 20, 4, 0.12), row('b', 8, 16, 0, 0.88)],
      grouped: {
        by: 'sample\u001b[31m', over: 'column', groups: ['REF', 'TEST', 'T3'], joint: [],
        perGroup: [
          { group: 'REF', aicc: [10, 5], best: 'b', deltaAicc: 5, fTest: ft },
          { group: 'TE\u001bST', aicc: [7, 8], best: 'a', deltaAicc: 1, noFTest: 'No nested test: x.' },
          { group: 'T3', aicc: [NaN, 8], best: null, deltaAicc: NaN, noFTest: 'No nested test: fewer than two fits could be ranked.' },
        ],
      },
    };
    const whole = comparisonBlock(q);
    expect(whole.notes[0]).toMatch(/^Each fit is taken as a whole over its 3 groups of sample\\u001b\[31m: /);
    const b = groupComparisonBlock(q)!;
    expect(b.heading).toBe('Group by group: a, b');
    expect(b.headers).toEqual(['group', 'AICc a', 'AICc b', 'favoured', 'AICc above', 'F', 'df', 'p']);
    expect(b.rows.map((r) => r[3])).toEqual(['b', 'neither', 'n/a']); // a gap within 2 favours neither
    expect(b.rows[0].slice(5)).toEqual(['13.9', '1, 20', '0.0013']);
    expect(b.rows[1][0]).not.toContain('\u001b'); // user text through escape.ts
    expect(b.rows[2][1]).toBe('n/a');
    expect(b.lead).toEqual(['a favoured in 0, b favoured in 1, neither (AICc within 2) in 1 of 3 groups.']);
    // the text view shows both blocks
    const result = { queries: [q] } as unknown as RunResult;
    const text = queryTextLines(result).join('\n');
    expect(text).toContain('Which model the data support: a, b');
    expect(text).toContain('Group by group: a, b');
    // a comparison with a joint fit has no group table
    expect(groupComparisonBlock({ ...q, grouped: { ...q.grouped!, joint: ['a'], perGroup: undefined, noPerGroup: 'x' } })).toBeNull();
  });
});
