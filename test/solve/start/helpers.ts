/** Builds starting-value inputs from a model text over a column x, as the fit runner does. */
import { analyze } from '../../../parser/index';
import { compileModel, isLinearInParameters } from '../../../engine/compile';
import type { StartInput, StartParameter } from '../../../engine/solve/start';
import { holdParams } from '../../../parser/plan-expr';

/** Builds a guessStart input from a model text over column x (with its structure, as the runner passes it). */
export function setup(modelText: string, params: StartParameter[], xs: number[], ys: number[], structure = true) {
  const decl = params.map((p) => `  param ${p.name}`).join('\n');
  const { plan } = analyze(`data d = "x.csv"\nfit f on d {\n  model y = ${modelText}\n${decl}\n}`);
  const expr = plan.fits[0].blocks[0].model;
  const names = params.map((p) => p.name);
  const model = compileModel(expr, names, ['x']);
  const cols = [Float64Array.from(xs)];
  const y = Float64Array.from(ys);
  const input: StartInput = {
    model,
    cols,
    n: xs.length,
    y,
    sqrtW: null,
    parameters: params,
    isLinearIn: (sub: readonly string[]) => isLinearInParameters(holdParams(expr, new Set(names.filter((q) => !sub.includes(q)))), sub),
    ...(structure ? { structure: { expr, columns: ['x'] } } : {}),
  };
  const ssr = (theta: Float64Array) => {
    const f = new Float64Array(xs.length);
    model.value(theta, cols, xs.length, f);
    return ys.reduce((s, v, i) => s + (v - f[i]) ** 2, 0);
  };
  return { input, ssr, model };
}
