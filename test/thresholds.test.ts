/**
 * engine/thresholds.ts, the one home of the thresholds behind what a user is
 * told: each value carries its reason, and every place that shows a verdict on
 * a threshold (engine warnings, the notes of the views, the CLI help) reads it
 * from there.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { CORRELATION_SYMBOL, INFLUENCE_THRESHOLDS, isHighCorrelation, isLargeCondition, isSerialDurbinWatson, THRESHOLDS } from '../engine/thresholds';
import { fitWarnings } from '../engine/stats/warnings';
import { warningInput } from './fixtures/warning-input';
import { goodnessEntries } from '../engine/front/views/summary';
import { HELP } from '../engine/front/cli/messages';
import { AUTO_GROUPS_ALONE, AUTO_MIN_GROUPS, AUTO_MIN_ROWS } from '../engine/groups/threads';
import { warningText } from '../engine/messages';
import { lineData, lineFit } from './fixtures/line-fit';

const ROOT = join(__dirname, '..');

const input = warningInput;

describe('engine/thresholds', () => {
  it('documents every value with its reason or source', () => {
    const source = readFileSync(join(ROOT, 'engine/thresholds.ts'), 'utf8');
    for (const key of [...Object.keys(THRESHOLDS), ...Object.keys(INFLUENCE_THRESHOLDS)]) {
      const m = new RegExp(`/\\*\\*((?:(?!\\*/)[\\s\\S])*)\\*/\\s*${key}:`).exec(source);
      expect(m, key).not.toBeNull();
      expect(m![1], key).toMatch(/Reason|Common practice|common practice|§|\d{4}/);
    }
  });

  it('the large condition number is one value for the warning and the note beside the number', () => {
    const fit = lineFit({ ...lineData(12, 3), name: 'cal' });
    const note = (condition: number) => goodnessEntries({ ...fit, goodness: { ...fit.goodness, condition } }).find((e) => e.label === 'condition number')?.note;
    const warned = (condition: number) => fitWarnings(input({ condition })).some((w) => w.code === 'ill_conditioned');
    const t = THRESHOLDS.condition;
    for (const condition of [1e4, t / 2, t, t * 1.01, 1e10, 1e14]) {
      expect(note(condition) !== undefined, `κ = ${condition}`).toBe(warned(condition));
      expect(warned(condition)).toBe(isLargeCondition(condition));
    }
    expect(warned(t * 1.01)).toBe(true);
    expect(warned(t)).toBe(false);
    expect(warningText.ill_conditioned(2 * t)).toContain('> 1e+8');
  });

  it('the Durbin–Watson note follows the value, on the warning’s band', () => {
    const fit = lineFit({ ...lineData(12, 3), name: 'cal' });
    const note = (d: number) => goodnessEntries({ ...fit, residuals: { ...fit.residuals, durbinWatson: d } }).find((e) => e.label === 'Durbin–Watson')?.note ?? '';
    const warned = (d: number) => fitWarnings(input({ residuals: { durbinWatson: d, runs: null, shapiroWilk: null } })).some((w) => w.code === 'residual_pattern');
    for (const d of [0.385, 0.99, 1.2, 2, 2.9, 3.2]) {
      // the note's reading follows the value (engine/front/views/influence.ts): 'far below/above 2' exactly where the warning fires
      expect(/far (below|above) 2/.test(note(d)), `d = ${d}`).toBe(warned(d));
      expect(warned(d)).toBe(isSerialDurbinWatson(d));
    }
    // issue 13: "near 2: no serial correlation" was printed beside d = 0.385
    expect(note(0.385)).not.toContain('no sign');
  });

  it('one correlation test and one symbol', () => {
    expect(isHighCorrelation(THRESHOLDS.correlation)).toBe(false);
    expect(isHighCorrelation(-0.995)).toBe(true);
    expect(isHighCorrelation(NaN)).toBe(false);
    expect(warningText.high_correlation('a', 'b', 0.99512)).toContain(`(${CORRELATION_SYMBOL} = 0.9951)`);
  });

  it('the CLI help states the automatic thread rule from engine/groups/threads.ts, and so does the README', () => {
    expect(HELP.fit).toContain(`from ${AUTO_MIN_GROUPS} groups and either ${AUTO_GROUPS_ALONE} groups or ${AUTO_MIN_ROWS} rows on`);
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    expect(readme).toContain(`at least ${AUTO_MIN_GROUPS} groups and either ${AUTO_GROUPS_ALONE} groups or ${AUTO_MIN_ROWS.toLocaleString('en-US')} rows`);
  });
});
