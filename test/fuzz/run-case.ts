/**
 * Runs one fuzz case the way the CLI does (its `check`, then the run and
 * every view of the result) and classifies what happened:
 *
 *   ok        no error;
 *   located   every error has a place: a spec range, or a data file and line;
 *   unlocated an error with no place (a run error with neither range nor file,
 *             a data-file error without a line, or a single fit refused as a
 *             failed fit for want of rows, which must be a located data error
 *             before fitting);
 *   parity    `check` reported no error but the run reported a spec error
 *             (see SPEC_ERRORS: the errors the spec alone decides);
 *   internal  an exception, an `internal` diagnostic or error, or JavaScript
 *             error text (a stack overflow, "is not a function", …) in a message;
 *   hang      the case ran over its budget of CPU time, or was blocked
 *             (decided by the campaign driver, fuzz-cli.ts, which runs cases
 *             in a worker thread).
 *
 * Data-dependent errors (bad cells, missing files, no usable rows in a
 * group, non-finite values, solver failures) are not parity failures: `check`
 * reads only the spec and the data files' header lines.
 */
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { checkSpec } from '../../engine/front/cli/spec';
import { runPlanSync } from '../../engine/runner/run-plan';
import { resultToJson } from '../../engine/run/json';
import { runText } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import { chartSpecs } from '../../engine/front/views/charts';
import { renderSvg } from '../../engine/front/views/svg';
import { loadDataFile } from '../../engine/data/load';
import { MSG } from '../../parser/messages';
import type { RunResult } from '../../engine/result';
import type { SpecCase } from './specs';

export type Outcome = 'ok' | 'located' | 'unlocated' | 'parity' | 'internal' | 'hang';

/** Worst first: a case is classified by the worst thing that happened in it. */
export const OUTCOMES: readonly Outcome[] = ['hang', 'internal', 'unlocated', 'parity', 'located', 'ok'];

export interface CaseResult {
  outcome: Outcome;
  /** What happened, first few errors (worst outcome first after sorting by the caller, if it cares). */
  notes: string[];
  /** Milliseconds. */
  elapsed: number;
  checkedClean: boolean;
}

/** Run errors the spec alone decides (engine/run): with a clean `check` none of them may appear. */
export const SPEC_ERRORS: ReadonlySet<string> = new Set(['unknown_fit', 'unknown_data', 'not_supported', 'no_predictor', 'wrong_variable', 'wrong_response', 'compare_grouped', 'compile_error']);

/** Text that only a failure of our own code would put in a message. */
const INTERNAL_TEXT = /internal|could not be completed|maximum call stack|invalid array length|invalid string length|cannot read propert|is not a function|is not iterable|undefined is not|rangeerror|typeerror|syntaxerror|referenceerror|out of memory|\n\s+at .+:\d+:\d+/i;

export interface RunCaseOptions {
  /** Folder the case's files are written to (emptied first). */
  dir: string;
  /** Render the SVG charts of the run too (costly: campaigns do it for some cases). */
  svg?: boolean;
  /** Also read each data file with the loader directly (CSV cases). */
  loader?: boolean;
}

/**
 * A single fit refused as a failed fit (no place but the fit's name) for want
 * of rows: the run must report these as located data errors before fitting
 * (engine/run/fit-data.ts), so one reaching the fit is unlocated.
 */
const REFUSED_FOR_ROWS: readonly RegExp[] = [/has no usable rows/, /usable rows? for \d+ free parameter/];

class Tally {
  outcome: Outcome = 'ok';
  readonly notes: string[] = [];
  add(o: Outcome, note: string): void {
    if (OUTCOMES.indexOf(o) < OUTCOMES.indexOf(this.outcome)) this.outcome = o;
    if (this.notes.length < 6) this.notes.push(`${o}: ${note.slice(0, 300)}`);
  }
}

/** Writes the case's spec (s.lsq) and data files into `dir`, replacing what was there. */
export function writeCase(c: SpecCase, dir: string): string {
  mkdirSync(dir, { recursive: true });
  for (const f of readdirSync(dir)) rmSync(join(dir, f), { recursive: true, force: true });
  const specPath = join(dir, 's.lsq');
  writeFileSync(specPath, c.spec);
  for (const f of c.files) {
    const p = join(dir, f.name);
    if (dirname(p) !== dir) continue; // only plain names inside the case folder
    writeFileSync(p, f.text);
  }
  return specPath;
}

export async function runCase(c: SpecCase, opts: RunCaseOptions): Promise<CaseResult> {
  const t0 = Date.now();
  const t = new Tally();
  let checkedClean = false;
  try {
    const specPath = writeCase(c, opts.dir);
    if (opts.loader) {
      for (const f of c.files) {
        const loaded = loadDataFile(join(opts.dir, f.name), { displayPath: f.name });
        if (!loaded.ok) {
          for (const e of loaded.errors) {
            if (INTERNAL_TEXT.test(e.message)) t.add('internal', `loader: ${e.message}`);
            else if (e.row === undefined) t.add('unlocated', `loader ${e.code}: ${e.message}`);
            else t.add('located', e.message);
          }
        }
      }
    }
    // read back as the CLI reads it (a lone surrogate, say, is written as U+FFFD)
    const text = readFileSync(specPath, 'utf8');
    const checked = checkSpec({ path: specPath, display: 's.lsq', dir: opts.dir, text });
    for (const d of checked.diagnostics) {
      const r = d.range;
      const inside = r && r.start.offset >= 0 && r.start.offset <= r.end.offset && r.end.offset <= text.length;
      if (d.code === 'internal' || INTERNAL_TEXT.test(d.message)) t.add('internal', `check ${d.code}: ${d.message}`);
      else if (!inside) t.add('unlocated', `check ${d.code} with a range outside the text: ${d.message}`);
      else if (d.severity === 'error') t.add('located', d.message);
    }
    checkedClean = checked.errors === 0;
    if (checkedClean) {
      const result = runPlanSync(checked.plan, { baseDir: opts.dir, specText: text, specPath: 's.lsq' });
      classifyRun(result, t);
      // every view of the result, as `fit --json --report` writes them
      runText(result);
      resultToJson(result);
      markdownReport(result);
      for (const [i, f] of result.fits.entries()) {
        const specs = chartSpecs(f);
        if (opts.svg && i < 3) for (const s of specs) await renderSvg(s.spec);
      }
    }
  } catch (e) {
    const err = e as Error;
    t.add('internal', `exception: ${err?.stack ?? String(e)}`);
  }
  return { outcome: t.outcome, notes: t.notes, elapsed: Date.now() - t0, checkedClean };
}

function classifyRun(result: RunResult, t: Tally): void {
  for (const e of result.errors) {
    if (e.code === 'internal' || INTERNAL_TEXT.test(e.message)) t.add('internal', `run ${e.code}: ${e.message}`);
    else if (SPEC_ERRORS.has(e.code)) t.add('parity', `run ${e.code} after a clean check: ${e.message}`);
    else if (e.range === undefined && e.file === undefined) t.add('unlocated', `run ${e.code}: ${e.message}`);
    else t.add('located', e.message);
  }
  for (const f of result.fits) {
    if (f.stop.code !== 'failed') continue;
    const m = f.stop.message;
    if (INTERNAL_TEXT.test(m)) t.add('internal', `fit ${f.name}: ${m}`);
    else if (m === MSG.methodNotLinear(f.name)) t.add('parity', `fit ${f.name} after a clean check: ${m}`);
    else if (f.group === undefined && REFUSED_FOR_ROWS.some((re) => re.test(m))) t.add('unlocated', `fit ${f.name} refused with no place: ${m}`);
  }
}
