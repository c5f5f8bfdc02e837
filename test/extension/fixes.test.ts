import { describe, expect, it } from 'vitest';
import { specDiagnostics } from '../../extension/logic/diagnostics';
import { startInside, widenedBound, type LsqFix } from '../../extension/logic/fixes';
import { analysisOf, COOLING } from './helpers';
import { analyze } from '../../parser';

/** The spec text after applying one fix's edits (last edit first, so offsets hold). */
function apply(text: string, fix: LsqFix): string {
  let out = text;
  for (const e of [...fix.edits].sort((a, b) => b.start - a.start)) {
    expect(out.slice(e.start, e.end)).toBe(e.oldText);
    out = out.slice(0, e.start) + e.newText + out.slice(e.end);
  }
  return out;
}

const codesOf = (text: string) => analyze(text).diagnostics.map((d) => d.code);

describe('extension/logic/fixes', () => {
  it('offers "did you mean" as a preferred edit of the misspelt name', () => {
    const text = COOLING.replace('sigma temp_sd', 'sigma temp_sdd');
    const d = specDiagnostics(analysisOf(text)).find((x) => x.code === 'undefined_name')!;
    expect(d.fixes?.[0]).toMatchObject({ title: "Change to 'temp_sd'", preferred: true });
    expect(apply(text, d.fixes![0])).toBe(COOLING);
  });

  it('moves a start above its upper bound inside, or widens that bound; either leaves the spec valid', () => {
    const text = COOLING.replace('param rise = 60 in [0, 200]', 'param rise = 300 in [0, 200]');
    const d = specDiagnostics(analysisOf(text)).find((x) => x.code === 'initial_outside_bounds')!;
    expect(d.fixes?.map((f) => f.title)).toEqual(['Move the start of rise inside its bounds: 100', 'Widen the upper bound of rise to 400']);
    expect(d.fixes![0].preferred).toBe(true);
    const moved = apply(text, d.fixes![0]);
    expect(moved).toContain('param rise = 100 in [0, 200]');
    expect(codesOf(moved)).not.toContain('initial_outside_bounds');
    const widened = apply(text, d.fixes![1]);
    expect(widened).toContain('param rise = 300 in [0, 400]');
    expect(codesOf(widened)).not.toContain('initial_outside_bounds');
  });

  it('handles a negative start below a zero bound with an infinite upper one, and a bound written as a constant', () => {
    const text = 'const top = 5\ndata d = "a.csv"\nfit f on d {\n  model y = k * x + c\n  param k = -1 in [0, inf]\n  param c = 10 in [0.0005, top]\n}\n';
    const ds = specDiagnostics(analysisOf(text, 'unknown')).filter((x) => x.code === 'initial_outside_bounds');
    expect(ds).toHaveLength(2);
    expect(ds[0].fixes?.map((f) => f.edits[0].newText)).toEqual(['1', '-2']);
    expect(apply(text, ds[0].fixes![0])).toContain('param k = 1 in [0, inf]');
    // 10 mirrored in 5 is 0, outside [0.0005, 5]: the ratio mirror 25/10 = 2.5; the constant bound is replaced by a number
    expect(ds[1].fixes?.map((f) => f.edits[0].newText)).toEqual(['2.5', '15']);
    expect(apply(text, ds[1].fixes![1])).toContain('param c = 10 in [0.0005, 15]');
  });

  it('startInside: strictly inside, as short as the rule allows', () => {
    // (lo, hi, x) → expected, worked by hand from the rule in the doc comment
    expect(startInside(150, 0, 100)).toBe('50');
    expect(startInside(-1, 0, Infinity)).toBe('1');
    expect(startInside(10, 0.0005, 5)).toBe('2.5');
    expect(startInside(0.01, 0.1, 10)).toBe('0.19');
    expect(startInside(-3, -Infinity, -5)).toBe('-7');
    // mirror and ratio mirror both outside a narrow box: its middle
    expect(startInside(100, 1, 2)).toBe('1.5');
    for (const [x, lo, hi] of [[150, 0, 100], [-1, 0, Infinity], [1e-9, 1e-6, 1], [7, -Infinity, 3]]) {
      const v = Number(startInside(x, lo, hi));
      expect(v > lo && v < hi, `${x} in (${lo}, ${hi}) -> ${v}`).toBe(true);
    }
    expect(startInside(50, 0, 100)).toBeUndefined();
  });

  it('widenedBound: past the start, keeping a positive bound positive', () => {
    expect(widenedBound(150, 0, 100)).toBe('200');
    expect(widenedBound(0.01, 0.1, 10)).toBe('0.001');
    expect(widenedBound(-1, 0, Infinity)).toBe('-2');
    expect(widenedBound(50, 0, 100)).toBeUndefined();
  });
});

describe('extension/logic/fixes: predict against a near spelling in the model', () => {
  const text = COOLING.replace('exp(-time_min', 'exp(-time_mn');
  it('with the header read there is no predict error at all (the model line has the error)', () => {
    const ds = specDiagnostics(analysisOf(text));
    expect(ds.filter((d) => d.code === 'predictor_mismatch')).toEqual([]);
  });

  it('with the header not read, offers both directions, neither preferred', () => {
    const d = specDiagnostics(analysisOf(text, 'unknown')).find((x) => x.code === 'predictor_mismatch')!;
    expect(d.fixes?.map((f) => [f.title, f.preferred ?? false])).toEqual([
      ["Change to 'time_mn'", false],
      ["Change 'time_mn' in the model of newton to 'time_min'", false],
    ]);
    expect(apply(text, d.fixes![1])).toBe(COOLING);
  });

  it('keeps the one preferred fix for a name that is no near spelling (another column chosen)', () => {
    const other = COOLING.replace('predict newton at time_min', 'predict newton at batch');
    const d = specDiagnostics(analysisOf(other, 'unknown')).find((x) => x.code === 'predictor_mismatch')!;
    expect(d.fixes?.map((f) => [f.title, f.preferred])).toEqual([["Change to 'time_min'", true]]);
  });
});

describe('extension/logic/fixes: number text', () => {
  it('writes tiny and huge values so the spec reads them back', () => {
    const tiny = startInside(-1e-9, 1e-8, 1)!;
    expect(Number(tiny)).toBeGreaterThan(1e-8);
    const text = `data d = "a.csv"\nfit f on d {\n  model y = k * x\n  param k = ${tiny} in [1e-8, 1]\n}\n`;
    expect(analyze(text).diagnostics).toEqual([]);
    expect(Number(widenedBound(3e12, 0, 1e12))).toBe(5e12);
  });
});
