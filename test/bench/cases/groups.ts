/**
 * (7) Per-group four-parameter logistic fits on a generated 10,000-group
 * file with `fitGroupsParallel` on all available cores (worker threads
 * running dist/worker.js), end to end (reading and splitting the CSV
 * included); then the parts: reading + splitting alone, and fitting alone on
 * all cores against one thread, side by side.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import { analyze } from '../../../parser/index';
import { performance } from 'node:perf_hooks';
import { defaultWorkerFile, fitGroupData, fitGroupsParallel } from '../../../engine/parallel/fit-groups';
import { buildGroupTable } from '../../../engine/group/table';
import { compileColumnExpr } from '../../../engine/compile';
import type { FitResult } from '../../../engine/result';
import { loadSources } from '../../../engine/run/datasets';
import { prepareFitData } from '../../../engine/run';
import { compare, measure } from '../harness';
import { groupedLogisticCsv, LOGISTIC_MODEL } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

const DOSES = [0.01, 0.03, 0.1, 0.3, 1, 3, 10, 30, 100];

/** Invented assay plates: per-plate 4PL constants, N(0, 1.5) noise. */
export function writePlates(dir: string, plates: number): void {
  writeFileSync(`${dir}/plates.csv`, groupedLogisticCsv(plates, { header: 'plate,dose,signal', prefix: 'P', doses: DOSES, ec50Low: 0.2, ec50Decades: 1.5, seeds: [17, 19] }));
  writeFileSync(
    `${dir}/plates.lsq`,
    ['data plates = "plates.csv"', 'fit hill on plates {', `  model signal = ${LOGISTIC_MODEL.replace(/\bx\b/g, 'dose')}`, '  param bottom = 0', '  param top = 100', '  param ec50 = 1 in [0, inf]', '  param hill = 1', '  per plate', '}', ''].join('\n'),
  );
}

export async function benchGroups(ctx: BenchContext): Promise<BenchRow> {
  const plates = ctx.quick ? 200 : 10_000;
  writePlates(ctx.tmp, plates);
  const spec = readFileSync(`${ctx.tmp}/plates.lsq`, 'utf8');
  const a = analyze(spec);
  if (a.diagnostics.some((d) => d.severity === 'error')) throw new Error('plate spec does not check');
  const fit = a.plan.fits[0];
  const threads = os.availableParallelism();
  const workers = defaultWorkerFile();
  const runs = ctx.quick ? 1 : 3;

  // end to end, as a user runs it: read, split, fit on all cores
  let last: FitResult[] = [];
  const endToEnd = await measure(async () => {
    last = await fitGroupsParallel(a.plan, 'hill', { baseDir: ctx.tmp, threads });
  }, runs, 0);

  // the parts: reading + splitting, then fitting alone on all cores vs one thread, side by side
  const t0 = performance.now();
  const src = loadSources(a.plan.data, ctx.tmp).tables.get('plates');
  const prepared = src ? prepareFitData(fit, src.source, src.table, compileColumnExpr) : null;
  const prepareMs = performance.now() - t0;
  if (!prepared?.ok) throw new Error('plate data did not prepare');
  const cmp = await compare(
    () => fitGroupData(fit, prepared.data, { threads }),
    () => fitGroupData(fit, prepared.data, { threads: 1, workerFile: null }),
    runs,
    0,
  );

  const table = buildGroupTable(last);
  const rate = plates / (endToEnd.median / 1000);
  const fitRate = plates / (cmp.ours.median / 1000);
  return {
    id: 7,
    name: `Per-group 4PL fits, ${fmt(plates, 2)} groups, ${threads} threads (fitGroupsParallel)`,
    value: rate,
    unit: 'fits/s',
    spread: [plates / (endToEnd.max / 1000), plates / (endToEnd.min / 1000)],
    text:
      `${fmt(rate)} fits/s end to end (${fmt(endToEnd.median / 1000)} s, of which read + split ${fmt(prepareMs / 1000)} s); ` +
      `fitting alone ${fmt(fitRate)} fits/s on ${threads} threads vs ${fmt(plates / (cmp.other.median / 1000))} on one (×${fmt(1 / cmp.ratio.median)}); ` +
      `${table.summary.converged}/${plates} converged`,
    goal: '≥ 1,000 fits/s',
    met: rate >= 1000,
    details: { plates, threads, workerFile: workers, endToEndMs: endToEnd, prepareMs, fitOnlyAllThreadsMs: cmp.ours, fitOnlyOneThreadMs: cmp.other, speedup: 1 / cmp.ratio.median, summary: table.summary },
    ...(workers === null ? { note: 'no dist/worker.js beside the script: groups were fitted in process' } : {}),
  };
}
