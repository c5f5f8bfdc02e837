/**
 * (22) Joint fits with shared parameters (engine/run/joint.ts, engine/solve/block-lm.ts):
 * - headline: 384 dose–response curves (a 384-well plate, 12 doses each) with the Hill slope shared and
 *   bottom, top, ec50 per well, the whole run in this thread (parse and check, CSV, the separate per-well
 *   fits that give the starts, the joint solve, its covariance and the comparisons between groups);
 *   goal ≤ 1 s (issue 14);
 * - the joint solve alone (block Levenberg–Marquardt and covariance, starts 10 % off the truth) for
 *   100 … 10,000 groups: the log–log slope of time against groups, goal ≤ 1.15 (linear cost; a dense
 *   solve would grow with the cube of the parameter count).
 */
import { writeFileSync } from 'node:fs';
import { analyze } from '../../../parser/index';
import { headerLookup } from '../../../engine/data/header';
import { runPlanSync } from '../../../engine/runner/run-plan';
import { loadSources } from '../../../engine/run/datasets';
import { prepareFitData } from '../../../engine/run';
import { compileColumnExpr } from '../../../engine/compile';
import { jointSetup, solveJoint } from '../../../engine/run/joint';
import { logLogSlope, measure } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

const DOSES = Array.from({ length: 12 }, (_, k) => 0.01 * 2.5 ** k);

/** Seeded uniform numbers (a linear congruential generator; only the data's spread matters here). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

/** Wells with their own bottom, top and ec50 and one Hill slope 1.2; noise N(0, 1.5) by Box–Muller. */
function writeWells(dir: string, groups: number): { truth: number[][] } {
  const u = lcg(groups * 7 + 3);
  const normal = () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  const lines = ['well,dose,signal'];
  const truth: number[][] = [];
  for (let g = 0; g < groups; g++) {
    const bottom = 5 * u();
    const top = 95 + 10 * u();
    const ec50 = 0.1 * 10 ** (2 * u());
    truth.push([bottom, top, ec50]);
    const well = `W${String(g).padStart(5, '0')}`;
    for (const d of DOSES) lines.push(`${well},${d},${(bottom + (top - bottom) / (1 + (d / ec50) ** 1.2) + 1.5 * normal()).toFixed(3)}`);
  }
  writeFileSync(`${dir}/wells.csv`, lines.join('\n') + '\n');
  return { truth };
}

const SPEC = `data wells = "wells.csv"
fit curves on wells {
  model signal = bottom + (top - bottom) / (1 + (dose / ec50)^hill)
  param bottom = 0
  param top = 100
  param ec50 = 1 in [0, inf]
  param hill = 1 in [0.1, 10] shared
  per well
}
`;

export async function benchJoint(ctx: BenchContext): Promise<BenchRow> {
  // headline: 384 wells end to end
  const dir = ctx.tmp;
  writeWells(dir, 384);
  writeFileSync(`${dir}/wells.lsq`, SPEC);
  const endToEnd = async () => {
    const { plan } = analyze(SPEC, { headers: headerLookup(dir) });
    const r = runPlanSync(plan, { baseDir: dir, specText: SPEC });
    if (!r.joint?.[0]?.stop.converged) throw new Error(`joint fit did not converge: ${r.joint?.[0]?.stop.message ?? r.errors.map((e) => e.message).join('; ')}`);
  };
  const whole = await measure(endToEnd, ctx.quick ? 1 : 5);
  // CPU time of one more run (user + system of this process): on a shared machine the wall time also counts the others' load
  const c0 = process.cpuUsage();
  await endToEnd();
  const c1 = process.cpuUsage(c0);
  const cpuMs = (c1.user + c1.system) / 1000;

  // scaling of the joint solve alone
  const sizes = ctx.quick ? [100, 300] : [100, 300, 1000, 3000, 10_000];
  const times: number[] = [];
  for (const G of sizes) {
    const { truth } = writeWells(dir, G);
    const { plan } = analyze(SPEC, { headers: headerLookup(dir) });
    const src = loadSources(plan.data, dir).tables.get('wells')!;
    const prepared = prepareFitData(plan.fits[0], src.source, src.table, compileColumnExpr);
    if (!prepared.ok) throw new Error('data did not prepare');
    const setup = jointSetup(plan.fits[0], prepared.data, new Set(['hill']));
    const local0 = Float64Array.from(truth.flatMap((t) => t.map((v) => 1.1 * v)));
    const solve = () => {
      const s = solveJoint(setup, Float64Array.of(1.1 * 1.2), local0, {});
      if (!s.outcome.stop.converged) throw new Error(`${G} groups: ${s.outcome.stop.message}`);
    };
    times.push((await measure(solve, ctx.quick ? 1 : 3)).median);
    ctx.log(`  ${G} groups: ${fmt(times[times.length - 1])} ms`);
  }
  const slope = logLogSlope(sizes, times);
  const met = whole.median <= 1000 && slope <= 1.15;
  return {
    id: 21,
    name: 'Joint fit, shared parameters',
    value: whole.median,
    unit: 'ms',
    spread: [whole.min, whole.max],
    text: `384 curves (1 shared + 3 per well) end to end ${fmt(whole.median)} ms (CPU ${fmt(cpuMs)} ms); joint solve ${sizes.map((g, k) => `${g}: ${fmt(times[k])} ms`).join(', ')}; log-log slope ${fmt(slope)}`,
    goal: '≤ 1000 ms; slope ≤ 1.15',
    met,
    details: { endToEndMs: whole, endToEndCpuMs: cpuMs, groups: sizes, solveMs: times, slope },
  };
}
