import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { findTemplate, scaffoldSpec, TEMPLATES, columnRef, identifierFrom, templateIds, GAS_CONSTANT } from '../../engine/templates';
import { crossing, lineFit, meansByX, cleanPairs } from '../../engine/templates/heuristics';
import { expOffsetStart, logistic4Start } from '../../engine/templates/families';

const grid = (a: number, b: number, n: number) => Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
const logGrid = (a: number, b: number, n: number) => grid(Math.log10(a), Math.log10(b), n).map((v) => 10 ** v);

/** Noise-free data from known parameters; starts must land close (exact where the heuristic is exact). */
const CASES: { id: string; x: number[]; f: (x: number) => number; truth: Record<string, number>; rel: number }[] = [
  { id: 'line', x: grid(0, 10, 11), f: (x) => 1.5 + 0.25 * x, truth: { intercept: 1.5, slope: 0.25 }, rel: 1e-9 },
  { id: 'exp_growth', x: grid(0, 5, 12), f: (x) => 2 * Math.exp(0.4 * x), truth: { y0: 2, rate: 0.4 }, rel: 1e-9 },
  { id: 'power', x: grid(1, 50, 12), f: (x) => 3 * x ** 0.75, truth: { a: 3, b: 0.75 }, rel: 1e-9 },
  { id: 'michaelis_menten', x: [0.1, 0.2, 0.5, 1, 2, 5, 10], f: (s) => (40 * s) / (0.8 + s), truth: { vmax: 40, km: 0.8 }, rel: 1e-9 },
  { id: 'arrhenius', x: grid(300, 400, 8), f: (t) => 5e7 * Math.exp((-60 * 1000) / (GAS_CONSTANT * t)), truth: { A: 5e7, Ea: 60 }, rel: 1e-6 },
  { id: 'exp_decay', x: grid(0, 60, 31), f: (t) => 21.5 + 164 * Math.exp(-t / 14.2), truth: { final_level: 21.5, amplitude: 164, tau: 14.2 }, rel: 0.1 },
  { id: 'logistic4', x: logGrid(1e-3, 1e2, 11), f: (d) => 4 + (98 - 4) / (1 + (0.42 / d) ** 1.2), truth: { zero_dose: 4, full_dose: 98, ec50: 0.42, hill: 1.2 }, rel: 0.35 },
  { id: 'gaussian', x: grid(0, 100, 101), f: (x) => 3 + 10 * Math.exp(-((x - 40) ** 2) / (2 * 6 ** 2)), truth: { baseline: 3, height: 10, center: 40, width: 6 }, rel: 0.1 },
];

describe('templates', () => {
  for (const c of CASES) {
    it(`${c.id}: starting values from noise-free data land near the truth`, () => {
      const t = findTemplate(c.id)!;
      const y = c.x.map(c.f);
      const d = cleanPairs(c.x, y);
      const start = t.start(t.prepare ? t.prepare(d, 'x').d : d);
      for (const [k, v] of Object.entries(c.truth)) {
        expect(Math.abs(start.values[k] - v) / Math.abs(v), `${k}: ${start.values[k]} vs ${v}`).toBeLessThanOrEqual(c.rel);
      }
      expect(start.notes.length).toBeGreaterThan(0);
    });
  }

  it('scaffolds specs that parse and check clean against the CSV header', () => {
    const x = grid(1, 10, 10);
    for (const t of [...TEMPLATES, findTemplate('polynomial', { degree: 5 })!]) {
      const y = x.map((v) => 2 + Math.exp(-v / 4) + 0.1 * v);
      const r = scaffoldSpec({ template: t, dataPath: 'data/run 1.csv', headers: ['time (s)', 'signal'], x: 'time (s)', y: 'signal', xValues: x, yValues: y });
      expect(r.ok, t.id).toBe(true);
      if (!r.ok) continue;
      const { diagnostics } = analyze(r.text, { headers: () => ['time (s)', 'signal'] });
      expect(diagnostics.filter((dg) => dg.severity === 'error'), `${t.id}:\n${r.text}`).toEqual([]);
      expect(r.text).toContain('"time (s)"');
    }
  });

  it('renames parameters that clash with columns', () => {
    const t = findTemplate('line')!;
    const r = scaffoldSpec({ template: t, dataPath: 'a.csv', headers: ['slope', 'y'], x: 'slope', y: 'y', xValues: [1, 2, 3], yValues: [2, 4, 6.1] });
    expect(r.ok && r.text).toContain('model y = intercept + slope_p * slope');
  });

  it('refuses data that do not suit the model', () => {
    const r = scaffoldSpec({ template: findTemplate('power')!, dataPath: 'a.csv', headers: ['x', 'y'], x: 'x', y: 'y', xValues: [0, 1, 2, 3], yValues: [1, 2, 3, 4] });
    expect(r).toEqual({ ok: false, message: 'power law needs every x value to be positive' });
    const few = scaffoldSpec({ template: findTemplate('logistic4')!, dataPath: 'a.csv', headers: ['x', 'y'], x: 'x', y: 'y', xValues: [1, 2], yValues: [1, 2] });
    expect(few.ok).toBe(false);
  });

  it('knows its ids and writes names safely', () => {
    expect(findTemplate('polynomial', { degree: 9 })?.parameters).toHaveLength(10);
    expect(findTemplate('polynomial')?.parameters).toHaveLength(3);
    expect(findTemplate('poly3')).toBeUndefined();
    expect(templateIds()).toContain('michaelis_menten');
    expect(templateIds()).toContain('polynomial');
    expect(templateIds().some((id) => /^poly\d/.test(id))).toBe(false);
    expect(columnRef('temp_C')).toBe('temp_C');
    expect(columnRef('exp')).toBe('"exp"');
    expect(columnRef('a "b"')).toBeNull();
    expect(identifierFrom('2024 lab-run.csv', 'data')).toBe('d_2024_lab_run');
  });

  it('logistic4 start: zero-dose controls count towards the zero-dose level; rising and falling curves (invented, noise-free)', () => {
    const doses = [0, 0, 0, ...logGrid(1e-2, 1e3, 11)];
    for (const [zero, full] of [[5, 95], [95, 5]]) {
      const y = doses.map((d) => full + (zero - full) / (1 + (d / 2.5) ** 1.2));
      const s = logistic4Start(cleanPairs(doses, y)).values;
      expect(Math.abs(s.zero - zero)).toBeLessThan(0.1 * Math.abs(full - zero));
      expect(Math.abs(s.full - full)).toBeLessThan(0.1 * Math.abs(full - zero));
      // the logit line through the middle points gives the midpoint and slope closely on exact data
      expect(Math.abs(Math.log(s.mid / 2.5))).toBeLessThan(0.15);
      expect(Math.abs(s.slope - 1.2) / 1.2).toBeLessThan(0.15);
    }
    const r = scaffoldSpec({ template: findTemplate('logistic4')!, dataPath: 'a.csv', headers: ['dose', 'y'], x: 'dose', y: 'y', xValues: doses, yValues: doses.map((d) => 10 + 80 / (1 + (d / 3) ** 1.5)) });
    expect(r.ok && r.text).toContain('model y = full_dose + (zero_dose - full_dose) / (1 + (dose / ec50)^hill)');
    const neg = scaffoldSpec({ template: findTemplate('logistic4')!, dataPath: 'a.csv', headers: ['dose', 'y'], x: 'dose', y: 'y', xValues: [-1, 0, 1, 2, 3, 4], yValues: [1, 2, 3, 4, 5, 6] });
    expect(neg).toEqual({ ok: false, message: '4-parameter logistic (dose–response) needs every dose value to be zero or positive' });
    const one = scaffoldSpec({ template: findTemplate('logistic4')!, dataPath: 'a.csv', headers: ['dose', 'y'], x: 'dose', y: 'y', xValues: [0, 0, 0, 0, 5, 5], yValues: [1, 2, 3, 4, 5, 6] });
    expect(one).toEqual({ ok: false, message: '4-parameter logistic (dose–response) needs at least two different positive dose values' });
  });

  it('exponential-with-offset start: decay and growth by the three-point rule (noise-free)', () => {
    const x = grid(0, 10, 41);
    const decay = expOffsetStart(cleanPairs(x, x.map((t) => 2 + 5 * Math.exp(-0.4 * t)))).values;
    expect(decay.rate).toBeCloseTo(-0.4, 1);
    expect(decay.level).toBeCloseTo(2, 0);
    const growth = expOffsetStart(cleanPairs(x, x.map((t) => 1 + 0.5 * Math.exp(0.3 * t)))).values;
    expect(growth.rate).toBeCloseTo(0.3, 1);
    expect(growth.amplitude).toBeCloseTo(0.5, 0);
  });

  it('has helpers that behave on edge cases', () => {
    expect(lineFit([1, 1, 1], [1, 2, 3])).toBeNull();
    expect(crossing({ x: [1, 2, 3], y: [0, 10, 20] }, 15)).toBeCloseTo(2.5, 12);
    expect(crossing({ x: [1, 2], y: [0, 1] }, 5)).toBeNull();
    expect(meansByX({ x: [1, 1, 2], y: [1, 3, 5] })).toEqual({ x: [1, 2], y: [2, 5] });
  });
});
