/**
 * NIST StRD linear datasets through the whole pipeline (spec → analyze →
 * runPlan), with the data written to a temp CSV (never into the repo).
 */
import { describe, expect, it } from 'vitest';
import { readLinear, strdAvailable, strdDir } from '../strd/read-strd';
import { requireInCi } from '../fixtures/required';
import { runSpec, tempDir, writeCsv } from './helpers';

const cases = [
  { name: 'Norris', model: 'b0 + b1 * x', params: ['b0', 'b1'] },
  { name: 'Pontius', model: 'b0 + b1 * x + b2 * x^2', params: ['b0', 'b1', 'b2'] },
];

const available = requireInCi('NIST StRD data', strdAvailable(), `STRD_DIR=${strdDir()}`);

for (const c of cases) {
  describe.runIf(available)(`run pipeline on NIST StRD ${c.name}`, () => {
    it('estimates, standard errors, residual SD and R² match the certified values', async () => {
      const d = readLinear(c.name);
      const dir = tempDir();
      writeCsv(dir, 'data.csv', ['x', 'y'], d.x.map((x, i) => [x, d.y[i]]));
      const spec = `data d = "data.csv"\nfit f on d {\n  model y = ${c.model}\n${c.params.map((p) => `  param ${p}`).join('\n')}\n}\n`;
      const { result } = await runSpec(spec, dir);
      const fit = result.fits[0];
      expect(fit.method).toBe('linear');
      // NIST StRD certified values (read from the .dat file): at least 9 significant digits for estimates
      fit.parameters.forEach((p, j) => {
        expect(Math.abs(p.estimate / d.estimates[j] - 1)).toBeLessThan(1e-9);
        expect(Math.abs(p.stderr! / d.stderrs[j] - 1)).toBeLessThan(1e-7);
      });
      expect(Math.abs(fit.goodness.rmse / d.residualSd - 1)).toBeLessThan(1e-8);
      expect(fit.goodness.r2).toBeCloseTo(d.rSquared, 10);
      expect(fit.goodness.dof).toBe(d.residualDof);
    });
  });
}
