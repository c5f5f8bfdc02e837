/**
 * Shared inputs of the editor tests: the cooling demo spec (invented data
 * names), analyses with chosen data-file states, and run results built with
 * the view tests' line-fit fixture (test/fixtures/line-fit.ts).
 */
import { parse } from '../../parser';
import { completeAnalysis, dataRequests, type DataFileStatus, type EditorAnalysis } from '../../extension/logic/analysis';
import type { FitResult, RunResult } from '../../engine/result';
import { lineData, lineFit, runOf } from '../fixtures/line-fit';

export const COOLING = `# Cooling of a cast bracket (invented demo)
data bench = "cooling.csv" where time_min >= 0
const ambient = 21.5 [degC]
fit newton on bench {
  model temp_C = ambient + rise * exp(-time_min / tau)
  param rise = 60 in [0, 200] [degC]
  param tau  = 10 in [0.1, 1000] [min]
  sigma temp_sd
}
predict newton at time_min = 5, 10, 30 sigma 0.5
expect newton.tau within 11.5 .. 12.5
expect newton.r2 above 0.99
`;

export const COOLING_HEADERS = ['time_min', 'temp_C', 'temp_sd', 'batch'];

/** Analysis of `text` with every data file in `state` (headers given when found). */
export function analysisOf(text: string, state: DataFileStatus['state'] = 'found', headers: string[] = COOLING_HEADERS): EditorAnalysis {
  const parsed = parse(text);
  const data = dataRequests(parsed.ast).map((r) => ({ name: r.name, path: r.path, pathSpan: r.pathSpan, state, ...(state === 'found' ? { headers } : {}) }));
  return completeAnalysis(text, parsed, data);
}

/** 1-based line number of an offset. */
export function lineOf(text: string, offset: number): number {
  return text.slice(0, offset).split('\n').length;
}

/** 1-based line of the first line of `text` containing `needle`. */
export function lineContaining(text: string, needle: string): number {
  const i = text.indexOf(needle);
  if (i < 0) throw new Error(`"${needle}" not in text`);
  return lineOf(text, i);
}

/** A fit result named like a spec's fit, with parameters renamed to the spec's. */
export function fitNamed(name: string, params: [string, string], opts: { group?: string; n?: number; seed?: number } = {}): FitResult {
  const d = lineData(opts.n ?? 25, opts.seed ?? 7);
  const f = lineFit({ name, x: d.x, y: d.y, predictor: 'time_min', response: 'temp_C', group: opts.group });
  f.parameters[0].name = params[0];
  f.parameters[1].name = params[1];
  return f;
}

export function runWith(fits: FitResult[], extra: Partial<RunResult> = {}): RunResult {
  return runOf(fits, extra);
}
