/**
 * What `check` refuses before a run, the engine refuses too, with the same
 * message (its guard for plans that did not come through the checker): each
 * case's plan is run despite its diagnostics.
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { isLinearInParameters } from '../../engine/compile';
import { headerLookup } from '../../engine/data/header';
import { runPlan } from '../../engine/runner/run-plan';
import { tempDir, writeCsv } from './helpers';

const dir = tempDir();
const rows = Array.from({ length: 12 }, (_, i) => [i, 2 + 0.5 * i + 0.01 * ((i * 7) % 5), 1 + (i % 3), i % 2 ? 'A' : 'B']);
writeCsv(dir, 'a.csv', ['x', 'y', 'z', 'batch'], rows);
writeCsv(dir, 'b.csv', ['x', 'y', 'z', 'batch'], rows);

async function both(spec: string, code: string): Promise<{ check: string; fit: string[] }> {
  const { plan, diagnostics } = analyze(spec, { headers: headerLookup(dir), isLinearIn: isLinearInParameters }) // as the CLI and the editor check;
  const d = diagnostics.find((x) => x.code === code);
  expect(d, JSON.stringify(diagnostics)).toBeDefined();
  const result = await runPlan(plan, { baseDir: dir, specText: spec });
  const fitMessages = [...result.errors.map((e) => e.message), ...result.fits.map((f) => f.stop.message)];
  return { check: d!.message, fit: fitMessages };
}

const head = 'data d = "a.csv"\ndata e = "b.csv"\n';
const line = (name: string, data = 'd', response = 'y', extra = '') => `fit ${name} on ${data} {\n  model ${response} = a + b * x\n  param a\n  param b\n${extra}}\n`;

describe('check and fit refuse the same specs, with the same message', () => {
  it('predict on a model of two columns', async () => {
    const spec = `${head}fit f on d {\n  model y = a * x + b * z\n  param a\n  param b\n}\npredict f at z = 1\n`;
    const r = await both(spec, 'predictor_mismatch');
    expect(r.check).toBe("predict needs a model with exactly one predictor column; 'f' varies with 'x', 'z'");
    expect(r.fit).toContain(r.check);
  });

  it('invert on a response of two columns', async () => {
    const r = await both(`${head}${line('f', 'd', 'y - z')}invert f at y = 3\n`, 'response_mismatch');
    expect(r.fit).toContain(r.check);
  });

  it('compare with a per-group fit', async () => {
    const r = await both(`${head}${line('f')}${line('g', 'd', 'y', '  per batch\n')}compare f, g\n`, 'compare_per_group');
    expect(r.fit).toContain(r.check);
  });

  it('compare of fits on different data', async () => {
    const r = await both(`${head}${line('f')}${line('g', 'e')}compare f, g\n`, 'compare_mismatch');
    expect(r.fit).toContain(r.check);
  });

  it('method linear on a nonlinear model', async () => {
    const spec = `${head}fit f on d {\n  model y = a * exp(b * x)\n  param a = 1\n  param b = 0.1\n  method linear\n}\n`;
    const r = await both(spec, 'method_not_linear');
    expect(r.fit).toContain(r.check);
  });
});
