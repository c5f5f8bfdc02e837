/**
 * Template shapes in arbitrary specs: when the model (canonical.ts) matches
 * the structure of a model family, that family's data-driven heuristic
 * (engine/templates/families.ts) gives the starting values. Recognised
 * forms (any order of terms and factors, any parameter names; X the single
 * predictor, possibly transformed, e.g. `(T + 273.15)`; k numbers):
 *   4-parameter logistic  a + (b − a)/(1 + (c/X)^(k·h)),  a + (b − a)/(1 + (X/c)^(k·h))
 *   Gaussian peak         [b +] h·exp(k·(X − c)²/w²)       (k < 0; also (c − X)²)
 *   exponential + offset  l + k·s·exp(k·r·X), exp(k·X/r)
 *   rise to a plateau     [l +] s·(1 − exp(k·r·X)), exp(k·X/r)
 *   exponential           [k +] k·s·exp(k·r·X), exp(k·X/r)
 *   Michaelis–Menten      v·X/(k + X)
 *   power law             a·X^b
 *   Arrhenius             a·exp(k·e/X)
 * Cheap: one canonical form and a handful of pattern matches per fit; no
 * match falls back to the general method (guess.ts). The linear parameters
 * are then re-solved exactly for the recognised nonlinear ones
 * (separable.ts) when that lowers the SSR.
 */
import { canonicalForm, evaluate } from './canonical';
import { call, K, matchPattern, P, pow, prod, sum, X, type Binding, type Pat } from './match';
import { linearSet, SeparableSolver } from './separable';
import type { StartInput } from './types';
import { cleanPairs, type XY } from '../../templates/heuristics';
import { expOffsetStart, expStart, gaussianStart, logistic4Start, michaelisMentenStart, powerStart, reciprocalExpStart } from '../../templates/families';
import { workArray } from '../../linalg/work-array';

type Values = Record<string, number>;

interface Shape {
  family: string;
  pattern: Pat;
  /** Starting values per pattern variable (null when the data do not suit the family). */
  start(d: XY, b: Binding): Values | null;
  /** Short description for the guessed-start message. */
  how: string;
}

const frac = (base: Pat) => prod(1, [sum(0, [1, P('b')], [-1, P('a')]), 1], [sum(1, [1, pow(base, prod(K('kh'), [P('h'), 1]))]), -1]);
const expo = (s: 1 | -1) => call('exp', prod(K('kr'), [P('r'), s], [X, 1]));
/** r from a rate R = kr·r^s. */
const fromRate = (rate: number, b: Binding, s: 1 | -1) => (s === 1 ? rate / b.numbers.kr : b.numbers.kr / rate);
const gaussExp = (order: boolean) => call('exp', prod(K('kg'), [order ? sum(0, [1, X], [-1, P('c')]) : sum(0, [1, P('c')], [-1, X]), 2], [P('w'), -2]));
const positiveX = (d: XY) => d.x.every((v) => v > 0);

function logistic(base: 'inverse' | 'direct'): Shape {
  return {
    family: '4-parameter logistic',
    pattern: sum(0, [1, P('a')], [1, frac(base === 'inverse' ? prod(1, [P('c'), 1], [X, -1]) : prod(1, [X, 1], [P('c'), -1]))]),
    how: 'from the data as a 4-parameter logistic (plateaus from the lowest and highest doses, midpoint and slope from a logit line)',
    start(d, b) {
      if (!d.x.every((v) => v >= 0) || d.x.filter((v) => v > 0).length < 2) return null;
      const s = logistic4Start(d).values;
      const [a, bb] = base === 'inverse' ? [s.zero, s.full] : [s.full, s.zero];
      return { a, b: bb, c: s.mid, h: s.slope / b.numbers.kh };
    },
  };
}

function gaussian(order: boolean, baseline: boolean): Shape {
  const peak = prod(1, [P('h'), 1], [gaussExp(order), 1]);
  return {
    family: 'Gaussian peak',
    pattern: baseline ? sum(0, [1, P('b')], [1, peak]) : peak,
    how: 'from the data as a Gaussian peak (baseline from the outer points, centre and height at the extreme point, width from the half-height width)',
    start(d, b): Values | null {
      const kg = b.numbers.kg;
      if (!(kg < 0)) return null;
      const s = gaussianStart(d).values;
      const w = s.sigma * Math.sqrt(-2 * kg);
      return baseline ? { b: s.baseline, h: s.height, c: s.center, w } : { h: s.height + s.baseline, c: s.center, w };
    },
  };
}

function expOffset(s: 1 | -1): Shape {
  return {
    family: 'exponential with offset',
    pattern: sum(0, [1, P('l')], [K('ka'), prod(1, [P('s'), 1], [expo(s), 1])]),
    how: 'from the data as an exponential with an offset (three-point rule on local means)',
    start(d, b) {
      const v = expOffsetStart(d).values;
      return { l: v.level, s: v.amplitude / b.numbers.ka, r: fromRate(v.rate, b, s) };
    },
  };
}

function rise(s: 1 | -1, offset: boolean): Shape {
  const core = prod(1, [P('s'), 1], [sum(1, [-1, expo(s)]), 1]);
  return {
    family: 'rise to a plateau',
    pattern: offset ? sum(0, [1, P('l')], [1, core]) : core,
    how: 'from the data as a rise to a plateau (three-point rule on local means)',
    start(d, b) {
      const v = expOffsetStart(d).values;
      // l + s − s·exp(R·x): level = l + s, amplitude = −s
      const out: Values = { s: offset ? -v.amplitude : v.level, r: fromRate(v.rate, b, s) };
      if (offset) out.l = v.level + v.amplitude;
      return out;
    },
  };
}

function exponential(s: 1 | -1): Shape {
  return {
    family: 'exponential',
    pattern: sum(K('k0'), [K('ka'), prod(1, [P('s'), 1], [expo(s), 1])]),
    how: 'from the data as an exponential (straight line through ln y)',
    start(d, b) {
      const shifted: XY = { x: d.x, y: d.y.map((v) => v - b.numbers.k0) };
      const v = expStart(shifted).values;
      return { s: v.amplitude / b.numbers.ka, r: fromRate(v.rate, b, s) };
    },
  };
}

const SHAPES: readonly Shape[] = [
  logistic('inverse'),
  logistic('direct'),
  gaussian(true, true),
  gaussian(false, true),
  gaussian(true, false),
  gaussian(false, false),
  expOffset(-1),
  expOffset(1),
  rise(-1, true),
  rise(1, true),
  rise(-1, false),
  rise(1, false),
  exponential(-1),
  exponential(1),
  {
    family: 'Michaelis–Menten',
    pattern: prod(1, [P('v'), 1], [X, 1], [sum(0, [1, P('k')], [1, X]), -1]),
    how: 'from the data as Michaelis–Menten (Hanes–Woolf line)',
    start: (d) => (positiveX(d) ? (({ vmax, km }) => ({ v: vmax, k: km }))(michaelisMentenStart(d).values) : null),
  },
  {
    family: 'power law',
    pattern: prod(1, [P('a'), 1], [pow(X, P('b')), 1]),
    how: 'from the data as a power law (straight line through ln y against ln x)',
    start: (d) => (positiveX(d) ? (({ amplitude, exponent }) => ({ a: amplitude, b: exponent }))(powerStart(d).values) : null),
  },
  {
    family: 'Arrhenius',
    pattern: prod(1, [P('a'), 1], [call('exp', prod(K('ke'), [P('e'), 1], [X, -1])), 1]),
    how: 'from the data as an Arrhenius law (straight line through ln k against 1/T)',
    start(d, b) {
      const v = reciprocalExpStart(d)?.values;
      return v ? { a: v.amplitude, e: v.slope / b.numbers.ke } : null;
    },
  },
];

export interface Recognised {
  theta: Float64Array;
  family: string;
  how: string;
}

/**
 * The family a model has the structure of, with its bindings (null when
 * none). It depends on the expression alone, so it is remembered per
 * expression object (a plan's model is not modified after checking): the
 * groups of a per-group fit share one answer instead of matching the
 * patterns again for each group. Callers only read the answer.
 */
export function recogniseShape(input: Pick<StartInput, 'structure'>): { shape: Shape; binding: Binding } | null {
  if (!input.structure) return null;
  const expr = input.structure.expr;
  const known = recognised.get(expr);
  if (known !== undefined) return known;
  const form = canonicalForm(expr);
  let found: { shape: Shape; binding: Binding } | null = null;
  for (const shape of SHAPES) {
    const binding = matchPattern(shape.pattern, form);
    if (binding && binding.x) {
      found = { shape, binding };
      break;
    }
  }
  recognised.set(expr, found);
  return found;
}
const recognised = new WeakMap<object, { shape: Shape; binding: Binding } | null>();

/**
 * Starting values for the parameters `unknown` from a recognised family
 * (null when the model has no known shape, the data do not suit it, or a
 * value comes out non-finite). Entries of the other parameters are copied
 * from their given starts.
 */
export function recogniseStart(input: StartInput, unknown: readonly number[]): Recognised | null {
  const found = recogniseShape(input);
  if (!found || !input.structure) return null;
  const { shape, binding } = found;
  const { cols, n, y, parameters } = input;
  const names = input.structure.columns;
  const xs = workArray(n);
  for (let i = 0; i < n; i++) xs[i] = evaluate(binding.x!, (c) => cols[names.indexOf(c)]?.[i] ?? NaN);
  const d = cleanPairs(xs, y);
  if (d.x.length < 2) return null;
  const values = shape.start(d, binding);
  if (!values) return null;
  const theta = new Float64Array(parameters.length);
  parameters.forEach((p, j) => (theta[j] = p.initial ?? NaN));
  for (const [v, name] of Object.entries(binding.params)) {
    const j = parameters.findIndex((p) => p.name === name);
    if (j >= 0 && parameters[j].initial === undefined) theta[j] = values[v];
  }
  for (const j of unknown) {
    if (!Number.isFinite(theta[j])) return null;
    theta[j] = Math.min(parameters[j].upper, Math.max(parameters[j].lower, theta[j]));
  }
  // The linear parameters, solved exactly for the recognised nonlinear ones, when that fits better.
  const linear = linearSet(input, unknown);
  if (linear.length) {
    const sep = new SeparableSolver(input, []);
    const before = sep.solve(Float64Array.from(theta));
    const trial = Float64Array.from(theta);
    const after = new SeparableSolver(input, linear).solve(trial);
    if (after < before) theta.set(trial);
  }
  return { theta, family: shape.family, how: shape.how };
}
