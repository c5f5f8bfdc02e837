/**
 * A fit whose every trial step is rejected must not be reported as converged.
 * NIST StRD MGH17 from start 1 with a loose tolerance (1e-6) makes the
 * Levenberg–Marquardt trust region collapse before any step is accepted.
 */
import { describe, expect, it } from 'vitest';
import { requireInCi } from '../fixtures/required';
import { join, resolve } from 'node:path';
import { writeFileSync } from 'node:fs';
import { analyze, hasErrors } from '../../parser';
import { runPlan } from '../../engine';
import { readHeaderFile } from '../../engine/data';
import { readStrd, strdAvailable } from './read-strd';
import { csvText, makeWorkDir, specText } from './pipeline';

const available = requireInCi('NIST StRD data', strdAvailable(), 'STRD_DIR');

describe.skipIf(!available)('solve/lm stalled start (NIST StRD MGH17)', () => {
  it('reports no convergence when no step is accepted from the starting values', async () => {
    const ds = readStrd('nls', 'MGH17');
    const work = makeWorkDir();
    try {
      writeFileSync(join(work.dir, 'MGH17.csv'), csvText(ds));
      const text = specText(ds, 1, 'MGH17.csv').replace(/\n}\n$/, '\n  tolerance 1e-6\n}\n');
      expect(text).toContain('tolerance 1e-6');
      const { plan, diagnostics } = analyze(text, { headers: (_n, p) => readHeaderFile(resolve(work.dir, p))?.headers });
      expect(hasErrors(diagnostics)).toBe(false);
      const result = await runPlan(plan, { baseDir: work.dir, specText: text });
      const fit = result.fits[0];
      expect(fit.iterations).toBe(0);
      expect(fit.stop.converged).toBe(false);
      expect(fit.stop.message).toContain('no step was accepted');
      expect(fit.warnings.map((w) => w.code)).toContain('no_convergence');
    } finally {
      work.dispose();
    }
  });
});
