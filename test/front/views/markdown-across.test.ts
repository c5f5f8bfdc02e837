/** The report's sections for charts across curves (engine/front/views/markdown.ts). */
import { describe, expect, it } from 'vitest';
import { markdownReport, plateNote } from '../../../engine/front/views/markdown';
import { lineData, lineFit, runOf } from '../../fixtures/line-fit';

describe('views/markdown (charts across curves)', () => {
  const groups = ['A01', 'A02', 'B01', 'B02'].map((g, i) => lineFit({ ...lineData(8, 40 + i), name: 'cal', group: g }));
  const d = lineData(10, 3);
  const run = runOf([...groups, lineFit({ ...d, name: 'm1' }), lineFit({ ...d, name: 'm2' })]);

  it('links the across-group charts under the group table and the same-data overlay in its own section', () => {
    const md = markdownReport(run, {
      acrossCharts: {
        cal: [{ title: "cal: every group's curve", href: 'r-charts/cal~groups-overlay.svg' }, { title: 'cal: plate map of flags', href: 'r-charts/cal~groups-plate-flags.svg' }],
        'same-data:m1, m2': [{ title: 'Fits of the same data: m1, m2', href: 'r-charts/m1~same-data-overlay.svg' }],
      },
    });
    const across = md.indexOf('### Charts across groups');
    expect(across).toBeGreaterThan(md.indexOf('### Across converged groups'));
    expect(md.slice(across)).toMatch(/^### Charts across groups\n\n!\[cal: every group's curve\]\(r-charts\/cal~groups-overlay\.svg\)\n\n!\[cal: plate map of flags\]\(r-charts\/cal~groups-plate-flags\.svg\)\n/);
    expect(md).toContain('## Fits of the same data: m1, m2\n\n2 fits of y against x on the same rows, drawn together.\n\n### Charts\n\n![Fits of the same data: m1, m2](r-charts/m1~same-data-overlay.svg)');
    expect(md).not.toContain('No plate map');
  });

  it('adds no such sections without charts', () => {
    const md = markdownReport(run);
    expect(md).not.toContain('Charts across groups');
    expect(md).not.toContain('Fits of the same data');
  });

  it('says why well-like labels get no plate map, and says nothing for labels that are not well-like', () => {
    expect(plateNote(['A01', 'A02', 'B01', 'B02', 'blank'])).toBe('No plate map: group blank is not a well name.');
    expect(plateNote(['A1', 'A01', 'B01', 'B02'])).toBe('No plate map: groups A1 and A01 name the same well.');
    expect(plateNote(['A01', 'A02', 'B01', 'B02'])).toBeNull();
    expect(plateNote(['lot 1', 'lot 2', 'A01'])).toBeNull();
  });
});
