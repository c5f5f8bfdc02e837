/**
 * extension/logic/panel-joint.ts and the joint fit in the panel model: the
 * between-groups section of the sample samples/potency (reference standard
 * and test lot 7, bottom, top and hill shared, ec50 per sample) and the views
 * across groups (overlay, residuals by group, plate map) of a joint fit,
 * whose group results replace the separate ones.
 *
 * Reference values: scipy 1.17.1 / numpy 2.4.6 on samples/potency/plate.csv
 * (rows with sample != "Blank"): scipy.optimize.least_squares (xtol = ftol =
 * gtol = 1e-15) of the joint model (5 parameters) and of each sample alone (4
 * each); the F test by hand from the two sums of squares, p = scipy.stats.f.sf;
 * the covariance s²(JᵀJ)⁻¹ from least_squares' Jacobian; Fieller's interval as
 * the roots of the quadratic (b − ρa)² = t²(Vb − 2ρC + ρ²Va) with
 * t = scipy.stats.t.ppf(0.975, 43) (Fieller 1954), numpy.roots.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { runPlan } from '../../engine/runner/run-plan';
import type { RunResult } from '../../engine/result';
import { buildPanelModel, type PanelModel } from '../../extension/logic/panel-model';
import { panelJoint } from '../../extension/logic/panel-joint';
import { JOINT_CAUTION, jointBlocks } from '../../engine/front/views/joint';
import { jointTextLines } from '../../engine/front/views/text';
import { acrossCharts } from '../../engine/front/views/across';
import { DIGITS, formatNumber } from '../../engine/format';

const ROOT = join(__dirname, '..', '..');

async function runSpec(dir: string, spec: string): Promise<{ run: RunResult; model: PanelModel }> {
  const { plan } = analyze(spec, { headers: headerLookup(dir) });
  const run = await runPlan(plan, { baseDir: dir, specText: spec, threads: 1 });
  return { run, model: buildPanelModel(run, { specUri: `file://${dir}/spec.lsq`, specName: 'spec.lsq', declaredFits: plan.fits.map((f) => f.name) }) };
}

/** scipy 1.17.1 reference values (module comment). */
const REF = {
  ssrJoint: 14415942.404884754,
  ssrSeparate: 13647892.721608896,
  f: 0.7503475190322917,
  p: 0.5286172097401688,
  ec50: { ref: 40.097463549017874, lot: 48.877417496958884 },
  difference: 8.77995394794101,
  fieller: [1.1634913043, 1.2770916014],
  shared: { bottom: 2235.3402, top: 51687.3641, hill: 1.13167934 },
};

const num = (cell: string): number => Number(cell.replace('−', '-'));
const interval = (cell: string): [number, number] => {
  const m = /^\[(.+), (.+)\]$/.exec(cell);
  if (!m) throw new Error(`not an interval: ${cell}`);
  return [num(m[1]), num(m[2])];
};

describe('extension/logic/panel-joint on samples/potency', () => {
  let run: RunResult;
  let model: PanelModel;
  beforeAll(async () => {
    const dir = join(ROOT, 'samples', 'potency');
    ({ run, model } = await runSpec(dir, readFileSync(join(dir, 'potency.lsq'), 'utf8')));
  });

  it('has one between-groups section for the joint fit, converged, its lead naming the design', () => {
    expect(model.joint).toHaveLength(1);
    const j = model.joint![0];
    expect(j.fit).toBe('potency');
    expect(j.heading).toBe('Between groups: potency');
    expect(j.converged).toBe(true);
    expect(j.lead[0]).toMatch(/^Joint fit over 2 groups of sample: converged/);
    expect(j.lead[1]).toMatch(/^n 48, 5 parameters \(3 shared \+ 2 × 1 per group\), 43 degrees of freedom/);
    expect(j.tables.map((t) => t.title.split(' (')[0])).toEqual(['Shared parameters', 'Shared or per group', 'Between groups']);
  });

  it('shows the shared estimates as the scipy joint fit has them, and as each group entry shows them', () => {
    const t = model.joint![0].tables[0];
    expect(t.rows.map((r) => r[0])).toEqual(['bottom', 'top', 'hill']);
    expect(t.numeric).toEqual([1, 2, 3, 4]);
    for (const r of t.rows) {
      const ref = REF.shared[r[0] as keyof typeof REF.shared];
      expect(Math.abs(num(r[1]) - ref) / ref).toBeLessThan(5e-3); // the cell has 4 significant digits
      for (const f of model.fits) expect(f.parameterRows.find((p) => p[0] === r[0])!.slice(0, 5)).toEqual(r.slice(0, 5));
    }
  });

  it('tests shared against separate with the F and p of the two sums of squares (scipy reference)', () => {
    const t = model.joint![0].tables[1];
    expect(t.headers).toEqual(['per group instead', 'F', 'df', 'p', 'SSR shared → per group']);
    expect(t.numeric).toEqual([1, 2, 3, 4]);
    const all = t.rows[0];
    expect(all[0]).toBe('all of bottom, top, hill');
    expect(all[2]).toBe('3, 40');
    expect(num(all[1])).toBeCloseTo(REF.f, 3);
    expect(num(all[3])).toBeCloseTo(REF.p, 3);
    expect(all[4]).toBe(`${formatNumber(REF.ssrJoint)} → ${formatNumber(REF.ssrSeparate)}`);
    // one row per shared parameter released alone, each with 1 and 42 degrees of freedom
    expect(t.rows.slice(1).map((r) => [r[0], r[2]])).toEqual([['bottom', '1, 42'], ['top', '1, 42'], ['hill', '1, 42']]);
  });

  it('gives the ec50 difference and the ratio with Fieller\'s interval (scipy reference)', () => {
    const t = model.joint![0].tables[2];
    expect(t.numeric).toEqual([3, 4, 5, 6]);
    expect(t.rows).toHaveLength(1);
    const [param, a, b, diff, diffInt, ratio, ratioInt] = t.rows[0];
    expect([param, a, b]).toEqual(['ec50', 'Reference std', 'Test lot 7']);
    // printed to the digits of its standard error (about 1.0: one decimal, JCGM 100:2008, 7.2.6), so within half a unit of that digit
    expect(diff).toMatch(/^\d+\.\d$/);
    expect(Math.abs(num(diff) - REF.difference)).toBeLessThanOrEqual(0.05);
    expect(diffInt).toMatch(/^\[/);
    expect(num(ratio)).toBeCloseTo(REF.ec50.lot / REF.ec50.ref, 3);
    expect(ratio).toBe(formatNumber(REF.ec50.lot / REF.ec50.ref, DIGITS.statistic));
    const [lo, hi] = interval(ratioInt);
    expect(lo).toBeCloseTo(REF.fieller[0], 3);
    expect(hi).toBeCloseTo(REF.fieller[1], 3);
  });

  it('reads the tests, notes the parallelism check and keeps the caution apart', () => {
    const j = model.joint![0];
    expect(j.readings[0]).toMatch(/^Shared bottom, top, hill: no evidence that the groups differ \(p = 0\.529 ≥ 0\.05\); this does not show they are equal\.$/);
    expect(j.readings.some((r) => /parallelism check of a relative-potency comparison/.test(r))).toBe(true);
    expect(j.readings).toHaveLength(5);
    expect(j.readings).not.toContain(JOINT_CAUTION);
    expect(j.caution).toBe(JOINT_CAUTION);
    expect(j.caution).toContain('USP general chapter <1034>');
  });

  it('marks a joint solve that did not converge, and has no section without a joint fit', () => {
    const stopped: RunResult = { ...run, joint: [{ ...run.joint![0], stop: { code: 'max_iterations', message: 'iteration limit 4 reached', converged: false } }] };
    const j = panelJoint(stopped)[0];
    expect(j.converged).toBe(false);
    expect(j.lead[0]).toMatch(/^Joint fit over 2 groups of sample: NOT converged \(max_iterations: iteration limit 4 reached/);
    const { joint: _, ...plain } = run;
    expect(panelJoint(plain)).toEqual([]);
    expect(buildPanelModel(plain, { specUri: 'x', specName: 'x' }).joint).toBeUndefined();
  });

  it('reads the same blocks as the CLI summary (one source)', () => {
    const blocks = jointBlocks(run.joint!);
    const j = model.joint![0];
    expect(j.tables.map((t) => ({ title: t.title, headers: t.headers, rows: t.rows }))).toEqual(blocks[0].tables.map((t) => ({ title: t.title, headers: t.headers, rows: t.rows })));
    expect([...j.readings, j.caution]).toEqual(blocks[0].notes);
    const text = jointTextLines(run).join('\n');
    for (const t of j.tables) expect(text).toContain(t.title);
  });

  it('draws the joint fit\'s groups in the overlay and the residuals by group, for the panel and the report alike', () => {
    const g = model.groups.find((x) => x.fit === 'potency')!;
    expect(g.rows.map((r) => r.group).sort()).toEqual(['Reference std', 'Test lot 7']);
    const overlay = g.charts.find((c) => c.id === 'overlay')!;
    const layers = (overlay.spec as { layer: { name?: string; data: { values: { label: string; fitted: number; x: number }[] } }[] }).layer;
    const points = layers.find((l) => l.name === 'curve_points')!.data.values;
    expect(new Set(points.map((p) => p.label))).toEqual(new Set(['Reference std', 'Test lot 7']));
    expect(points.filter((p) => p.label === 'Test lot 7')).toHaveLength(24);
    // the curves are the joint fit's: the shared bottom, top and hill with each group's ec50 (scipy reference)
    const lines = layers.find((l) => l.name === 'curve_lines')!.data.values;
    const { bottom, top, hill } = REF.shared;
    for (const [label, ec50] of [['Reference std', REF.ec50.ref], ['Test lot 7', REF.ec50.lot]] as const) {
      const line = lines.filter((q) => q.label === label);
      expect(line.length, label).toBeGreaterThan(10);
      for (const q of line) expect(Math.abs(q.fitted - (bottom + (top - bottom) / (1 + (q.x / ec50) ** hill))), `${label} at ${q.x}`).toBeLessThan(1e-4 * top);
    }
    // no chart across groups of a shared parameter (one value for every group by construction)
    expect(g.charts.map((c) => c.id)).toEqual(['overlay', 'residuals-by-group', 'group-ec50']);
    const report = acrossCharts(run).find((a) => a.name === 'potency')!;
    expect(report.charts.map((c) => c.id)).toEqual(g.charts.map((c) => c.id));
  });
});

describe('extension/logic/panel-model: a joint fit over the wells of a plate', () => {
  // samples/plate's kinetics with the blank shared by every well: the joint fit's 96 groups keep their well names
  const spec = readFileSync(join(ROOT, 'samples', 'plate', 'plate.lsq'), 'utf8').replace('param blank = 0.05 [AU]', 'param blank = 0.05 shared [AU]');

  it('draws the plate maps of the joint fit\'s wells and compares each well with the first', async () => {
    expect(spec).toContain('shared [AU]');
    const { run, model } = await runSpec(join(ROOT, 'samples', 'plate'), spec);
    expect(run.joint).toHaveLength(1);
    const j = model.joint![0];
    expect(j.fit).toBe('kinetics');
    const wells = run.joint![0].groups;
    expect(wells.length).toBeGreaterThan(90);
    const g = model.groups.find((x) => x.fit === 'kinetics')!;
    expect(g.rows).toHaveLength(run.fits.length);
    const ids = g.charts.map((c) => c.id);
    expect(ids).toEqual(expect.arrayContaining(['overlay', 'residuals-by-group', 'plate-flags', 'plate-param-k', 'plate-param-amplitude']));
    expect(ids.filter((id) => id.endsWith('blank'))).toEqual([]);
    // the map of k holds one well per group with that group's estimate
    const kMap = g.charts.find((c) => c.id === 'plate-param-k')!;
    const data = JSON.stringify(kMap.spec);
    for (const w of [wells[0], wells[wells.length - 1]]) expect(data).toContain(`"${w}"`);
    // more groups than a full pair table: each well against the first, per per-group parameter
    const pairs = j.tables.find((t) => t.title.startsWith('Between groups'))!;
    expect(pairs.rows).toHaveLength(2 * (wells.length - 1));
    expect(new Set(pairs.rows.map((r) => r[1]))).toEqual(new Set([wells[0]]));
    expect(j.tables[1].rows.map((r) => r[0])).toEqual(['all of blank', 'blank']);
  });
});
