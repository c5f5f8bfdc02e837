import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { RunResult } from '../../../engine/result';
import { runText, fitTextLines } from '../../../engine/front/views/text';
import { textTable, markdownTable } from '../../../engine/front/views/table';
import { formatEstimate } from '../../../engine/format';
import { warningText } from '../../../engine/messages';

const run = JSON.parse(readFileSync(join(__dirname, '../../fixtures/calibration-run.json'), 'utf8')) as RunResult;

describe('views/table', () => {
  it('aligns columns and right-aligns numbers on their decimal point', () => {
    const lines = textTable(['name', 'value'], [['a', '1.5'], ['long name', '-12.25']]);
    expect(lines).toEqual(['  name        value', '  ---------  ------', '  a            1.5', '  long name  -12.25']);
  });
  it('escapes pipes in Markdown cells', () => {
    expect(markdownTable(['a', 'b'], [['x|y', '2']])).toEqual(['| a | b |', '| --- | ---: |', '| x\\|y | 2 |']);
  });
});

describe('views/text', () => {
  const text = runText(run);
  const fit = run.fits[0];

  it('prints every parameter with its rounded estimate, SE and interval', () => {
    for (const p of fit.parameters) {
      const f = formatEstimate(p.estimate, p.stderr, p.lower, p.upper);
      const line = text.split('\n').find((l) => l.trimStart().startsWith(p.name + ' '));
      expect(line).toBeDefined();
      for (const cell of [f.estimate, f.stderr, f.lower, f.upper, p.unit as string]) expect(line).toContain(cell);
    }
  });

  it('reports goodness of fit, the stop reason and warnings', () => {
    expect(text).toContain('Stopped: converged (exact');
    expect(text).toMatch(/points \(n\)\s+18/);
    expect(text).toMatch(/degrees of freedom\s+16/);
    for (const label of ['R²', 'adjusted R²', 'AIC', 'AICc', 'BIC', 'RMSE']) expect(text).toContain(label);
    expect(text).toContain('! intercept and slope are correlated');
    expect(text).not.toContain('reduced χ²'); // no sigma in this fit
  });

  it('notes that R² is descriptive for a model nonlinear in its parameters (keyed on the model, as the warning is) and shows χ² with sigma', () => {
    const caveat = warningText.r2_nonlinear();
    const nl = { ...fit, method: 'levenberg_marquardt' as const, sigmaAbsolute: true, goodness: { ...fit.goodness, chi2: 15.2, chi2Reduced: 0.95 }, warnings: [...fit.warnings, { code: 'r2_nonlinear' as const, message: caveat }] };
    const lines = fitTextLines(nl).join('\n');
    expect(lines.split('\n').find((l) => l.trimStart().startsWith('R² '))).toContain(caveat);
    expect(lines).toMatch(/reduced χ² \(χ²\/dof\)\s+0\.95/);
    // a model linear in its parameters fitted by an iterative solver carries no caveat
    const iterative = { ...fit, method: 'levenberg_marquardt' as const };
    expect(fitTextLines(iterative).join('\n')).not.toContain(caveat);
  });

  it('prints queries and expectations with verdicts', () => {
    expect(text).toContain('Predictions from cal at conc_mgL');
    expect(text).toContain('Inverse predictions from cal: conc_mgL from absorbance');
    expect(text).toContain('no solution inside the data range');
    // the comparison leads with its decision, then the nested test, then the evidence table (views/comparison)
    const at = (s: string) => text.indexOf(s);
    expect(at('Which model the data support: cal, cal_quad')).toBeGreaterThan(0);
    expect(text).toContain('  The data favour cal over cal_quad: its AICc is lower by 2.53.');
    expect(text).toContain('  Nested test: cal_quad has 1 more parameter than cal; F(1, 15) = 0.46, p = 0.508,');
    expect(text).toMatch(/ {2}AICc above the lowest +0 +2\.53\n/);
    expect(text).toMatch(/ {2}Akaike weight +0\.78 +0\.22\n/);
    expect(at('The data favour cal')).toBeLessThan(at('Nested test'));
    expect(at('Nested test')).toBeLessThan(at('  evidence '));
    expect(text).toMatch(/PASS {2}cal\.slope within 0\.11 \.\. 0\.13/);
    expect(text).toMatch(/FAIL {2}cal\.r2 above 0\.99999/);
    expect(text).toContain('1 of 2 expectations passed.');
  });

  it('marks a fit that did not converge', () => {
    const bad = { ...fit, stop: { code: 'max_iterations' as const, message: 'iteration limit 1 reached', converged: false }, iterations: 1 };
    expect(fitTextLines(bad)[1]).toContain('NOT converged (max_iterations: iteration limit 1 reached; 1 iterations');
  });
});
