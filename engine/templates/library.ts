/**
 * The template library. Each template documents the heuristic behind its
 * starting values in `start().notes` (copied into the scaffolded spec).
 * Published models keep their usual names (Michaelis–Menten, Arrhenius,
 * 4-parameter logistic).
 */
import { lineFit, median, type XY } from './heuristics';
import { expOffsetStart, expStart, gaussianStart, logistic4Start, michaelisMentenStart, powerStart, reciprocalExpStart } from './families';
import type { StartValues, Template } from './types';

/** Molar gas constant R in J/(mol·K) (CODATA 2018, exact by the 2019 SI definition). */
export const GAS_CONSTANT = 8.314462618;

const span = (d: XY): number => (d.x.length ? d.x[d.x.length - 1] - d.x[0] : 1) || 1;

const line: Template = {
  id: 'line',
  title: 'straight line',
  formula: 'y = intercept + slope·x',
  fitName: 'line',
  parameters: [
    { name: 'intercept', meaning: 'response at x = 0' },
    { name: 'slope', meaning: 'change of response per unit x' },
  ],
  requires: [],
  model: (x, p) => `${p.intercept} + ${p.slope} * ${x}`,
  start(d) {
    const f = lineFit(d.x, d.y) ?? { intercept: median(d.y), slope: 0 };
    return { values: { intercept: f.intercept, slope: f.slope }, notes: ['intercept, slope: ordinary least-squares line through the data (exact for this model).'] };
  },
};

/** Highest polynomial degree `new --model polynomial --degree N` writes (the spec needs more rows than coefficients). */
export const MAX_POLY_DEGREE = 20;
/** Degree when `--degree` is not given. */
export const DEFAULT_POLY_DEGREE = 2;

/** Polynomial of degree n ≥ 1: c0 + c1·x + … + cn·x^n. */
export function polynomial(n: number): Template {
  const names = Array.from({ length: n + 1 }, (_, k) => `c${k}`);
  return {
    id: 'polynomial',
    title: `polynomial of degree ${n}`,
    formula: names.map((c, k) => (k === 0 ? c : k === 1 ? `${c}·x` : `${c}·x^${k}`)).join(' + '),
    fitName: n === 2 ? 'quadratic' : n === 3 ? 'cubic' : `degree${n}`,
    parameters: names.map((c, k) => ({ name: c, meaning: k === 0 ? 'constant term' : `coefficient of x^${k}` })),
    requires: [],
    model: (x, p) => names.map((c, k) => (k === 0 ? p[c] : k === 1 ? `${p[c]} * ${x}` : `${p[c]} * ${x}^${k}`)).join(' + '),
    start(d) {
      const f = lineFit(d.x, d.y) ?? { intercept: median(d.y), slope: 0 };
      const values: Record<string, number> = {};
      names.forEach((c, k) => (values[c] = k === 0 ? f.intercept : k === 1 ? f.slope : 0));
      return { values, notes: ['c0, c1 from the least-squares line, higher coefficients 0; the model is linear in its parameters, so the linear solver does not depend on these.'] };
    },
  };
}

const expDecay: Template = {
  id: 'exp_decay',
  title: 'exponential decay to a final level',
  formula: 'y = final_level + amplitude·exp(−x/tau)',
  fitName: 'decay',
  parameters: [
    { name: 'final_level', meaning: 'level approached for large x' },
    { name: 'amplitude', meaning: 'difference from the final level at x = 0' },
    { name: 'tau', lower: 0, meaning: 'time constant (x units); half-life = tau·ln 2' },
  ],
  requires: [],
  model: (x, p) => `${p.final_level} + ${p.amplitude} * exp(-${x} / ${p.tau})`,
  start(d) {
    const s = expOffsetStart(d);
    const { level, amplitude, rate } = s.values;
    if (rate < 0) return { values: { final_level: level, amplitude, tau: -1 / rate }, notes: s.notes.map((n) => n.replace('level, amplitude, rate', 'final_level, amplitude, tau = −1/rate')) };
    return {
      values: { final_level: level, amplitude, tau: span(d) / 3 },
      notes: ['final_level, amplitude: three-point rule on local means; tau: one third of the x range (the data rise away from their level instead of decaying towards it).'],
    };
  },
};

const expGrowth: Template = {
  id: 'exp_growth',
  title: 'exponential growth',
  formula: 'y = y0·exp(rate·x)',
  fitName: 'growth',
  parameters: [
    { name: 'y0', meaning: 'response at x = 0' },
    { name: 'rate', meaning: 'relative growth per unit x; doubling at x = ln 2 / rate' },
  ],
  requires: ['positive_y'],
  model: (x, p) => `${p.y0} * exp(${p.rate} * ${x})`,
  start(d) {
    const s = expStart(d);
    return { values: { y0: s.values.amplitude, rate: s.values.rate }, notes: s.notes };
  },
};

const logistic4: Template = {
  id: 'logistic4',
  title: '4-parameter logistic (dose–response)',
  formula: 'y = full_dose + (zero_dose − full_dose) / (1 + (x/ec50)^hill)',
  fitName: 'dose_response',
  parameters: [
    { name: 'zero_dose', meaning: 'response without the agent (dose → 0)' },
    { name: 'full_dose', meaning: 'response at saturating dose' },
    { name: 'ec50', lower: 0, meaning: 'dose halfway between the two plateaus' },
    { name: 'hill', meaning: 'steepness (Hill slope)' },
  ],
  requires: ['nonnegative_x', 'two_positive_x'],
  note: 'Doses must be zero or positive: zero-dose controls (no agent) sit on the zero_dose level. The curve is symmetric in log dose. Rising or falling data both work: the direction is in full_dose − zero_dose.',
  // (x/ec50)^hill, not (ec50/x)^hill: at a zero dose the power is 0 and its derivatives have finite limits (engine/compile)
  model: (x, p) => `${p.full_dose} + (${p.zero_dose} - ${p.full_dose}) / (1 + (${x} / ${p.ec50})^${p.hill})`,
  start(d) {
    const s = logistic4Start(d);
    return { values: { zero_dose: s.values.zero, full_dose: s.values.full, ec50: s.values.mid, hill: s.values.slope }, notes: s.notes };
  },
};

const michaelisMenten: Template = {
  id: 'michaelis_menten',
  title: 'Michaelis–Menten',
  formula: 'v = vmax·s / (km + s)',
  fitName: 'enzyme',
  parameters: [
    { name: 'vmax', lower: 0, meaning: 'limiting rate at saturating substrate' },
    { name: 'km', lower: 0, meaning: 'substrate concentration at half the limiting rate' },
  ],
  requires: ['positive_x'],
  model: (x, p) => `${p.vmax} * ${x} / (${p.km} + ${x})`,
  start(d) {
    return michaelisMentenStart(d);
  },
};

const gaussianPeak: Template = {
  id: 'gaussian',
  title: 'Gaussian peak on a constant baseline',
  formula: 'y = baseline + height·exp(−(x − center)² / (2·width²))',
  fitName: 'peak',
  parameters: [
    { name: 'baseline', meaning: 'response away from the peak' },
    { name: 'height', meaning: 'peak height above the baseline (negative for a dip)' },
    { name: 'center', meaning: 'peak position' },
    { name: 'width', lower: 0, meaning: 'standard deviation of the peak; FWHM = 2.3548·width' },
  ],
  requires: [],
  model: (x, p) => `${p.baseline} + ${p.height} * exp(-((${x} - ${p.center})^2) / (2 * ${p.width}^2))`,
  start(d) {
    const s = gaussianStart(d);
    return { values: { baseline: s.values.baseline, height: s.values.height, center: s.values.center, width: s.values.sigma }, notes: s.notes };
  },
};

const powerLaw: Template = {
  id: 'power',
  title: 'power law',
  formula: 'y = a·x^b',
  fitName: 'power',
  parameters: [
    { name: 'a', meaning: 'response at x = 1' },
    { name: 'b', meaning: 'exponent' },
  ],
  requires: ['positive_x', 'positive_y'],
  model: (x, p) => `${p.a} * ${x}^${p.b}`,
  start(d) {
    const s = powerStart(d);
    return { values: { a: s.values.amplitude, b: s.values.exponent }, notes: s.notes };
  },
};

const arrhenius: Template = {
  id: 'arrhenius',
  title: 'Arrhenius',
  formula: 'k = A·exp(−Ea/(R·T)), Ea in kJ/mol, T in kelvin',
  fitName: 'arrhenius',
  parameters: [
    { name: 'A', lower: 0, meaning: 'pre-exponential factor (units of the rate)' },
    { name: 'Ea', unit: 'kJ/mol', meaning: 'activation energy' },
  ],
  requires: ['positive_y'],
  constants: [{ name: 'R', value: GAS_CONSTANT, comment: 'molar gas constant, J/(mol K) (CODATA 2018)' }],
  note: 'Temperatures are read as kelvin; when every value is below 200 they are taken as degrees Celsius and 273.15 is added.',
  prepare(d, x) {
    if (d.x.length === 0 || d.x.some((t) => t >= 200)) return { d, x };
    return { d: { x: d.x.map((t) => t + 273.15), y: d.y }, x: `(${x} + 273.15)`, note: `${x} read as degrees Celsius (every value below 200): T = ${x} + 273.15.` };
  },
  model: (x, p) => `${p.A} * exp(-${p.Ea} * 1000 / (R * ${x}))`,
  start(d) {
    const s = reciprocalExpStart(d);
    if (s && s.values.slope < 0) return { values: { A: s.values.amplitude, Ea: (-s.values.slope * GAS_CONSTANT) / 1000 }, notes: s.notes };
    return { values: { A: Math.max(...d.y), Ea: 50 }, notes: ['A: largest rate, Ea: 50 kJ/mol (the ln k against 1/T line failed).'] };
  },
};

/** Templates in menu order; the polynomial stands for every degree (`findTemplate('polynomial', { degree })`). */
export const TEMPLATES: readonly Template[] = [line, polynomial(DEFAULT_POLY_DEGREE), expDecay, expGrowth, logistic4, michaelisMenten, gaussianPeak, powerLaw, arrhenius];

/** Template by id, undefined when unknown; `degree` applies to `polynomial` (default DEFAULT_POLY_DEGREE). */
export function findTemplate(id: string, options: { degree?: number } = {}): Template | undefined {
  if (id === 'polynomial') return polynomial(options.degree ?? DEFAULT_POLY_DEGREE);
  return TEMPLATES.find((t) => t.id === id);
}

/** Ids for help texts and "did you mean" lists. */
export function templateIds(): string[] {
  return TEMPLATES.map((t) => t.id);
}

export type { StartValues };
