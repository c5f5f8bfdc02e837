import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { RunResult } from '../../../engine/result';
import { leadingComment, markdownReport, reviewPoints, USE_OF_RESULTS } from '../../../engine/front/views/markdown';

const run = JSON.parse(readFileSync(join(__dirname, '../../fixtures/calibration-run.json'), 'utf8')) as RunResult;

describe('views/markdown', () => {
  const md = markdownReport(run, { charts: [[{ title: 'cal: data and fitted curve', href: 'report-charts/cal fit.svg' }]] });

  it('always carries the use-of-results caution', () => {
    expect(md).toContain(USE_OF_RESULTS);
    expect(USE_OF_RESULTS).toMatch(/safety, medical or legal/);
    expect(USE_OF_RESULTS).toMatch(/qualified people/);
  });

  it('lists points to review: warnings and failed expectations', () => {
    const points = reviewPoints(run);
    expect(points.some((p) => p.includes('correlated'))).toBe(true);
    expect(points.some((p) => p.includes('`cal.r2 above 0.99999`'))).toBe(true);
    expect(md).toContain('## Points to review');
  });

  it('has the parameter, goodness, query, expectation and provenance tables', () => {
    expect(md).toMatch(/\| parameter \| estimate \| std\. error \| 95% low \| 95% high \| unit \| note \|/);
    expect(md).toMatch(/\| slope \| 0\.11\d+ \|/);
    expect(md).toContain('### Goodness of fit');
    expect(md).toContain('### Predictions from cal at conc_mgL');
    expect(md).toContain('| **FAIL** | `cal.r2 above 0.99999` |');
    expect(md).toContain(run.provenance.specSha256);
    expect(md).toContain(run.provenance.data[0].sha256);
    expect(md).toContain('| options of cal | linear least squares, squared loss, level 95% |');
  });

  it('links charts with encoded relative paths', () => {
    expect(md).toContain('![cal: data and fitted curve](report-charts/cal%20fit.svg)');
  });

  it('says nothing stands out for a clean run', () => {
    const clean: RunResult = { ...run, fits: run.fits.map((f) => ({ ...f, warnings: [] })), expectations: run.expectations.filter((e) => e.passed) };
    expect(reviewPoints(clean)).toEqual([]);
    expect(markdownReport(clean)).toContain('Nothing stands out');
  });
});

describe('views/markdown leadingComment', () => {
  it('takes the comment block at the top of a spec', () => {
    expect(leadingComment('\uFEFF# Cooling demo\n#\n# CAUTION: invented\ndata d = "x.csv"\n# later comment\n')).toBe('Cooling demo\n\nCAUTION: invented');
    expect(leadingComment('data d = "x.csv"\n')).toBe('');
  });
  it('shows it under "About this spec"', () => {
    const md = markdownReport(run, { about: 'Calibration of a photometer.' });
    expect(md).toContain('## About this spec\n\nFrom the comment at the top of the spec:\n\n```text\nCalibration of a photometer.\n```');
  });
});
