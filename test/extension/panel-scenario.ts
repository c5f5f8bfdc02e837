/**
 * The results panel's trust scenario, run through the real engine: one spec
 * with four fits on invented cooling readings (a bracket cooling in still
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

export const SCENARIO_SPEC = `data bench = "cooling.csv" where time_min >= 0
data late = "cooling.csv" where time_min > 1000
const ambient = 21.5 [degC]

fit newton on bench {
  model temp_C = ambient + rise * exp(-time_min / tau)
  param rise = 150 in [0, 400] [degC]
  param tau  = 10 in [0.1, 1000] [min]
  weight w / temp_sd^2
}

fit line on bench {
  model temp_C = a + b * time_min
  param a
  param b
}

fit quad on bench {
  model temp_C = a + b * time_min + c * time_min^2
  param a
  param b
  param c
}

fit slow on bench {
  model temp_C = ambient + r * exp(-time_min / t)
  param r = 1
  param t = 1e6
  iterations 2
}

fit empty on late {
  model temp_C = c + d * time_min
  param c
  param d
}

compare line, quad, slow
`;

/** Readings every 2 min from 0 to 60 min (true rise 164 degC, tau 14.2 min), noise from a fixed sine hash (common practice for reproducible tests). */
export function scenarioRows(): (number | string)[][] {
  const rows: (number | string)[][] = [];
  for (let i = 0; i <= 30; i++) {
    const t = 2 * i;
    const y = 21.5 + 164 * Math.exp(-t / 14.2) + 0.8 * Math.sin(12.9898 * (i + 1));
    const sd = (0.5 + 0.003 * y).toFixed(3);
    // rows 9 and 21 (file lines 10 and 22) weight 0; line 27 has an empty reading
    rows.push([t, i === 25 ? '' : y.toFixed(2), sd, i === 8 || i === 20 ? 0 : 1]);
  }
  return rows;
}

export interface Scenario {
  dir: string;
  run: RunResult;
  model: PanelModel;
  declared: string[];
}

export async function runScenario(spec = SCENARIO_SPEC): Promise<Scenario> {
  const dir = tempDir();
  writeCsv(dir, 'cooling.csv', ['time_min', 'temp_C', 'temp_sd', 'w'], scenarioRows());
  const { plan, diagnostics } = analyze(spec, { headers: headerLookup(dir) });
  const errors = diagnostics.filter((d) => d.severity === 'error');
  if (errors.length) throw new Error(`scenario spec has errors: ${errors.map((d) => d.message).join('; ')}`);
  const run = await runPlan(plan, { baseDir: dir, specText: spec });
  const declared = plan.fits.map((f) => f.name);
  const model = buildPanelModel(run, { specUri: 'file:///work/scenario/scenario.lsq', specName: 'scenario.lsq', declaredFits: declared });
  return { dir, run, model, declared };
}
