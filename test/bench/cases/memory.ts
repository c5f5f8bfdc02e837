/**
 * (9) Peak memory of a 1e6-point fit, measured in a child process (so the
 * rest of the benchmark does not count): the growth of the resident set from
 * just before the data are made (after a full GC) to the peak
 * (`process.resourceUsage().maxRSS`), divided by the raw numeric data
 * (n rows × 2 columns × 8 bytes). Three jobs:
 *  - solver: Levenberg–Marquardt on the compiled problem only;
 *  - runFit: the complete FitResult (statistics, point table, bands);
 *  - runPlan: from a CSV file on disk through the whole runner.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { compileModel } from '../../../engine/compile';
import { runFit } from '../../../engine/run';
import { runPlan } from '../../../engine/runner';
import { levenbergMarquardt, modelProblem } from '../../../engine/solve';
import { analyze } from '../../../parser/index';
import { fitData, LOGISTIC_MODEL, modelSpec } from '../data';
import { doseResponse, E2E_PARAMS } from './end-to-end';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

export type MemoryJob = 'solver' | 'runFit' | 'runPlan';
const JOBS: readonly MemoryJob[] = ['solver', 'runFit', 'runPlan'];

export interface MemoryFigures {
  job: MemoryJob;
  n: number;
  baselineRss: number;
  peakRss: number;
  /** Where the peak came from. */
  peakSource: 'VmHWM' | 'maxRSS';
  stop: string;
}

/** VmHWM of this process in bytes (Linux), or null. */
function highWaterMark(): number | null {
  try {
    const m = /^VmHWM:\s+(\d+)\s+kB/m.exec(readFileSync('/proc/self/status', 'utf8'));
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null;
  }
}

/** Resets the high-water mark to the current resident size (Linux ≥ 4.0); false when not possible. */
function resetHighWaterMark(): boolean {
  try {
    writeFileSync('/proc/self/clear_refs', '5');
    return true;
  } catch {
    return false;
  }
}

/** Runs in the child: `node --expose-gc bench.js --child-memory JOB N [CSV]`; prints MemoryFigures as JSON. */
export async function memoryChild(job: MemoryJob, n: number, csv?: string): Promise<void> {
  const gc = (globalThis as { gc?: () => void }).gc;
  gc?.();
  const useHwm = resetHighWaterMark() && highWaterMark() !== null;
  const baselineRss = process.memoryUsage().rss;
  let stop = '';
  if (job === 'runPlan') {
    const spec = ['data d = "' + path.basename(csv!) + '"', 'fit f on d {', `  model y = ${LOGISTIC_MODEL}`, ...E2E_PARAMS.map((p) => `  param ${p}`), '}', ''].join('\n');
    const result = await runPlan(analyze(spec).plan, { baseDir: path.dirname(csv!), specText: spec });
    stop = result.fits[0]?.stop.code ?? result.errors.map((e) => e.message).join('; ');
  } else {
    const spec = modelSpec(LOGISTIC_MODEL, E2E_PARAMS);
    const { x, y } = doseResponse(n);
    if (job === 'runFit') {
      stop = runFit(spec.fit, fitData(spec.fit, ['x'], [x], y)).stop.code;
    } else {
      const model = compileModel(spec.model, spec.params, ['x']);
      stop = levenbergMarquardt(modelProblem({ model, columns: [x], response: y, n }), Float64Array.from([5, 90, 1, 1])).stop.code;
    }
  }
  const peakRss = useHwm ? (highWaterMark() as number) : process.resourceUsage().maxRSS * 1024;
  const figures: MemoryFigures = { job, n, baselineRss, peakRss, peakSource: useHwm ? 'VmHWM' : 'maxRSS', stop };
  process.stdout.write(JSON.stringify(figures) + '\n');
}

export function isMemoryJob(x: unknown): x is MemoryJob {
  return typeof x === 'string' && (JOBS as readonly string[]).includes(x);
}

function runChild(job: MemoryJob, n: number, csv: string): MemoryFigures {
  const r = spawnSync(process.execPath, ['--expose-gc', process.argv[1], '--child-memory', job, String(n), csv], { encoding: 'utf8', maxBuffer: 1 << 20 });
  if (r.status !== 0) throw new Error(`memory child (${job}) failed: ${r.stderr || r.error?.message}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as MemoryFigures;
}

export async function benchMemory(ctx: BenchContext): Promise<BenchRow> {
  const n = ctx.quick ? 20_000 : 1_000_000;
  const raw = n * 2 * 8;
  const csv = path.join(ctx.tmp, 'dose.csv');
  const { x, y } = doseResponse(n);
  const lines = ['x,y'];
  for (let i = 0; i < n; i++) lines.push(`${x[i]},${y[i]}`);
  writeFileSync(csv, lines.join('\n') + '\n');
  const figures: Record<string, MemoryFigures & { ratio: number; deltaMB: number }> = {};
  for (const job of JOBS) {
    ctx.log(`  (9) ${job}`);
    const f = runChild(job, n, csv);
    const delta = f.peakRss - f.baselineRss;
    figures[job] = { ...f, deltaMB: delta / 1e6, ratio: delta / raw };
  }
  const main = figures.runFit;
  return {
    id: 9,
    name: `Peak memory, ${fmt(n, 1)}-point 4-parameter fit (× raw data)`,
    value: main.ratio,
    unit: '× raw',
    spread: null,
    text: `runFit ${fmt(main.ratio)}× (${fmt(main.deltaMB)} MB over ${fmt(raw / 1e6)} MB raw); solver only ${fmt(figures.solver.ratio)}×; runPlan from CSV ${fmt(figures.runPlan.ratio)}×`,
    goal: '≤ 5× raw data',
    met: main.ratio <= 5,
    details: { n, rawBytes: raw, figures },
  };
}
