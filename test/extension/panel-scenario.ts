/**
 * The results panel's trust scenario, run through the real engine: one spec
 * with five fits on invented cooling readings (a bracket cooling in still
 * air, Newton's law of cooling): `newton` converges (weighted by 1/σ², two
 * readings with weight 0 and one row with an empty cell), `line` and `quad` converge,
 * `slow` stops at its iteration limit, `empty` fails at run time (its `where`
 * keeps no row), then a comparison naming three of them. Shared by the model
 * tests and the page test in Chromium.
 */
import { analyze } from '../../parser/index';
import type { RunResult } from '../../engine/result';
import { headerLookup } from '../../engine/data/header';
import { runPlan } from '../../engine/runner/run-plan';
import { buildPanelModel, type PanelModel } from '../../extension/logic/panel-model';
import { tempDir, writeCsv } from '../run/helpers';
import { HEADER, scenarioRows, SPEC } from '../fixtures/panel-trust.cjs';

/** The spec (test/fixtures/panel-trust.cjs, shared with the end-to-end steps). */
export const SCENARIO_SPEC: string = SPEC;

export interface Scenario {
  dir: string;
  run: RunResult;
  model: PanelModel;
  declared: string[];
}

export async function runScenario(spec = SCENARIO_SPEC): Promise<Scenario> {
  const dir = tempDir();
  writeCsv(dir, 'bracket.csv', HEADER, scenarioRows());
  const { plan, diagnostics } = analyze(spec, { headers: headerLookup(dir) });
  const errors = diagnostics.filter((d) => d.severity === 'error');
  if (errors.length) throw new Error(`scenario spec has errors: ${errors.map((d) => d.message).join('; ')}`);
  const run = await runPlan(plan, { baseDir: dir, specText: spec });
  const declared = plan.fits.map((f) => f.name);
  const model = buildPanelModel(run, { specUri: 'file:///work/scenario/scenario.lsq', specName: 'scenario.lsq', declaredFits: declared });
  return { dir, run, model, declared };
}
