/**
 * The template library. Each template documents the heuristic behind its
 * starting values in `start().notes` (copied into the scaffolded spec).
 * Published models keep their usual names (Michaelis–Menten, Arrhenius,
 * 4-parameter logistic).
 */
import { crossing, endMean, lineFit, localMean, meansByX, median, transformedLine, type XY } from './heuristics';
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

/** Polynomial of degree n ≥ 2: c0 + c1·x + … + cn·x^n. */
export function polynomial(n: number): Template {
  const names = Array.from({ length: n + 1 }, (_, k) => `c${k}`);
  return {
    id: `poly${n}`,
    title: `polynomial of degree ${n}`,
    formula: names.map((c, k) => (k === 0 ? c : k === 1 ? `${c}·x` : `${c}·x^${k}`)).join(' + '),
    fitName: `poly${n}`,
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
  title: 'exponential decay to a plateau',
  formula: 'y = plateau + span·exp(−x/tau)',
  fitName: 'decay',
  parameters: [
    { name: 'plateau', meaning: 'level approached for large x' },
    { name: 'span', meaning: 'plateau-to-start difference at x = 0' },
    { name: 'tau', lower: 0, meaning: 'time constant (x units); half-life = tau·ln 2' },
  ],
  requires: [],
  model: (x, p) => `${p.plateau} + ${p.span} * exp(-${x} / ${p.tau})`,
  start(d) {
    // Three equally spaced, locally averaged points y0, y1, y2 at the start, middle and end of the x range:
    // for y = plateau + A·exp(−x/tau) the ratio q = (y2 − y1)/(y1 − y0) equals exp(−h/tau), h = half the range,
    // so tau = −h/ln q and plateau = y2 + q·(y2 − y1)/(1 − q).
    const x0 = d.x[0];
    const h = span(d) / 2;
    const w = 0.05 * span(d);
    const y0 = localMean(d, x0, w);
    const y1 = localMean(d, x0 + h, w);
    const y2 = localMean(d, x0 + 2 * h, w);
    const q = (y2 - y1) / (y1 - y0);
    if (q > 0 && q < 1 && Number.isFinite(q)) {
      const tau = -h / Math.log(q);
      const plateau = y2 + (q * (y2 - y1)) / (1 - q);
      return {
        values: { plateau, span: (y0 - plateau) * Math.exp(x0 / tau), tau },
        notes: ['plateau, span, tau: three-point rule on local means (±5 % of the x range) at the start, middle and end: q = (y2 − y1)/(y1 − y0) = exp(−h/tau).'],
      };
    }
    const first = endMean(d.y, 0.1, 'first');
    const last = endMean(d.y, 0.1, 'last');
    const plateau = last - 0.1 * (first - last);
    return {
      values: { plateau, span: first - plateau, tau: span(d) / 3 },
      notes: ['plateau: mean of the last 10 % of points moved 10 % of the change further; span: first values minus plateau; tau: one third of the x range (the three-point rule needs a monotone decay).'],
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
    const f = transformedLine(d, (v) => v, Math.log);
    if (f) return { values: { y0: Math.exp(f.intercept), rate: f.slope }, notes: ['y0, rate: straight line through ln y against x (intercept ln y0, slope rate).'] };
    return { values: { y0: median(d.y), rate: 1 / span(d) }, notes: ['y0: median response; rate: 1 / x range (the log-linear estimate failed).'] };
  },
};

const logistic4: Template = {
  id: 'logistic4',
  title: '4-parameter logistic (dose–response)',
  formula: 'y = zero_dose + (full_dose − zero_dose) / (1 + (ec50/x)^hill)',
  fitName: 'dose_response',
  parameters: [
    { name: 'zero_dose', meaning: 'response without the agent (dose → 0)' },
    { name: 'full_dose', meaning: 'response at saturating dose' },
    { name: 'ec50', lower: 0, meaning: 'dose halfway between the two plateaus' },
    { name: 'hill', meaning: 'steepness (Hill slope)' },
  ],
  requires: ['positive_x'],
  note: 'Doses must be positive; the curve is symmetric in log dose. Rising or falling data both work: the direction is in full_dose − zero_dose.',
  model: (x, p) => `${p.zero_dose} + (${p.full_dose} - ${p.zero_dose}) / (1 + (${p.ec50} / ${x})^${p.hill})`,
  start(d) {
    const m = meansByX(d);
    const zero = endMean(m.y, 0.15, 'first');
    const full = endMean(m.y, 0.15, 'last');
    const mid = crossing(m, (zero + full) / 2, true);
    const ec50 = mid ?? Math.sqrt(m.x[0] * m.x[m.x.length - 1]);
    return {
      values: { zero_dose: zero, full_dose: full, ec50, hill: 1 },
      notes: [
        'zero_dose, full_dose: mean response of the lowest and highest 15 % of doses (replicates averaged).',
        mid !== null ? 'ec50: dose where the averaged responses cross the midpoint, interpolated in log dose.' : 'ec50: geometric mean of the dose range (no midpoint crossing found).',
        'hill: 1.',
      ],
    };
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
    // Hanes–Woolf: s/v = s/vmax + km/vmax, a straight line in s.
    const xs: number[] = [];
    const ys: number[] = [];
    for (let i = 0; i < d.x.length; i++) if (d.x[i] > 0 && d.y[i] > 0) { xs.push(d.x[i]); ys.push(d.x[i] / d.y[i]); }
    const hw = lineFit(xs, ys);
    if (hw && hw.slope > 0 && hw.intercept > 0) {
      return { values: { vmax: 1 / hw.slope, km: hw.intercept / hw.slope }, notes: ['vmax, km: Hanes–Woolf line s/v = s/vmax + km/vmax through the data.'] };
    }
    const m = meansByX(d);
    const vmax = Math.max(...m.y);
    const km = crossing(m, vmax / 2) ?? median(d.x);
    return { values: { vmax, km }, notes: ['vmax: highest averaged rate; km: substrate where the rate crosses vmax/2 (Hanes–Woolf line unusable).'] };
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
    const m = meansByX(d);
    const k = Math.max(1, Math.round(0.2 * m.y.length));
    const baseline = median([...m.y.slice(0, k), ...m.y.slice(m.y.length - k)]);
    let peak = 0;
    for (let i = 1; i < m.y.length; i++) if (Math.abs(m.y[i] - baseline) > Math.abs(m.y[peak] - baseline)) peak = i;
    const height = m.y[peak] - baseline;
    let lo = peak;
    let hi = peak;
    while (lo > 0 && Math.abs(m.y[lo - 1] - baseline) >= Math.abs(height) / 2) lo--;
    while (hi < m.y.length - 1 && Math.abs(m.y[hi + 1] - baseline) >= Math.abs(height) / 2) hi++;
    const fwhm = m.x[hi] - m.x[lo];
    const width = fwhm > 0 ? fwhm / 2.3548 : span(d) / 10;
    return {
      values: { baseline, height, center: m.x[peak], width },
      notes: [
        'baseline: median of the outer 20 % of points on each side; height, center: the point farthest from the baseline.',
        fwhm > 0 ? 'width: full width at half height of the contiguous points around the peak, divided by 2·√(2 ln 2) ≈ 2.3548.' : 'width: one tenth of the x range (peak narrower than the point spacing).',
      ],
    };
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
    const f = transformedLine(d, Math.log, Math.log);
    if (f) return { values: { a: Math.exp(f.intercept), b: f.slope }, notes: ['a, b: straight line through ln y against ln x (intercept ln a, slope b).'] };
    return { values: { a: median(d.y), b: 1 }, notes: ['a: median response, b: 1 (the log-log estimate failed).'] };
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
    const f = transformedLine(d, (t) => (t > 0 ? 1 / t : NaN), Math.log);
    if (f && f.slope < 0) {
      return { values: { A: Math.exp(f.intercept), Ea: (-f.slope * GAS_CONSTANT) / 1000 }, notes: ['A, Ea: straight line through ln k against 1/T (intercept ln A, slope −Ea/R).'] };
    }
    return { values: { A: Math.max(...d.y), Ea: 50 }, notes: ['A: largest rate, Ea: 50 kJ/mol (the ln k against 1/T line failed).'] };
  },
};

/** Fixed templates in menu order; polynomials are made on demand (`poly2`, `poly3`, …). */
export const TEMPLATES: readonly Template[] = [line, polynomial(2), polynomial(3), expDecay, expGrowth, logistic4, michaelisMenten, gaussianPeak, powerLaw, arrhenius];

/** Highest polynomial degree offered. */
export const MAX_POLY_DEGREE = 9;

/** Template by id (`poly2` … `poly9` included); undefined when unknown. */
export function findTemplate(id: string): Template | undefined {
  const m = /^poly([2-9])$/.exec(id);
  if (m) return polynomial(Number(m[1]));
  return TEMPLATES.find((t) => t.id === id);
}

/** Ids for help texts and "did you mean" lists. */
export function templateIds(): string[] {
  return [...TEMPLATES.map((t) => t.id).filter((id) => !/^poly\d$/.test(id)), `poly2 … poly${MAX_POLY_DEGREE}`];
}

export type { StartValues };
