import { describe, expect, it } from 'vitest';
import { normals, runSpec, tempDir, writeCsv } from './helpers';
import { warningLines } from '../../engine/front/views/summary';

describe('run: correlated parameters summarised', () => {
  it('a degree-10 polynomial gets one high_correlation warning, not one per pair (regression: 40 separate warnings)', async () => {
    const dir = tempDir();
    const z = normals(31, 40);
    // invented sensor characteristic on x in [1, 2], where the monomials are nearly collinear
    writeCsv(dir, 'p.csv', ['x', 'y'], Array.from({ length: 40 }, (_, i) => {
      const x = 1 + i / 39;
      return [x.toFixed(4), (2 + 0.5 * x - 0.1 * x * x + 0.001 * z[i]).toFixed(7)];
    }));
    const terms = Array.from({ length: 11 }, (_, k) => (k === 0 ? 'c0' : `c${k} * x^${k}`)).join(' + ');
    const params = Array.from({ length: 11 }, (_, k) => `  param c${k} = 0`).join('\n');
    const { result } = await runSpec(`data d = "p.csv"\nfit poly on d {\n  model y = ${terms}\n${params}\n}`, dir);
    const fit = result.fits[0];
    const corr = fit.warnings.filter((w) => w.code === 'high_correlation');
    expect(corr).toHaveLength(1);
    const pairs = corr[0].pairs!;
    expect(pairs.length).toBeGreaterThan(20); // dozens of pairs, all listed in JSON
    // each listed pair is above the threshold in the result's correlation matrix, worst first
    const names = fit.parameters.map((p) => p.name);
    for (const pair of pairs) expect(Math.abs(fit.correlation[names.indexOf(pair.parameters[0])][names.indexOf(pair.parameters[1])])).toBeGreaterThan(0.99);
    expect(corr[0].message).toMatch(new RegExp(`^${pairs.length} pairs of parameters are strongly correlated .* and ${pairs.length - 3} more;`));
    expect(warningLines(fit).filter((l) => l.includes('[high_correlation]'))).toHaveLength(1);
  });
});
