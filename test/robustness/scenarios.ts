/**
 * The robustness suite's curves: seeded, generated data in invented lab
 * scenarios, each fitted from the start values and bounds a user of that
 * scenario would type (no automatic starts here; the no-start scenarios are
 * added by the starting-value work). Every family draws its true parameters
 * and noise from its own seed, so a curve is identified by (family, index)
 * and regenerated bit for bit wherever it is drawn (test/fixtures/random.ts).
 *
 * Families (the `id`s below):
 *  - logistic4-*: an assay plate's wells, 10 doses 3-fold from 0.001 in
 *    duplicate ("plain"), plus two zero-dose control wells ("zero"); Hill
 *    slopes 0.6–3, plateaus near 0 and 100 %, noise σ = 3 %. Starts top/bot =
 *    100/0 (falling) or 0/100 (rising), ec = 1 in [0, inf], h = 1 in [0.1, 10].
 *    Potencies (log-uniform): from 3× the lowest to ⅓ of the highest dose for
 *    plain layouts; down to ⅓ of the lowest dose with zero-dose controls (they
 *    show the plateau the doses no longer reach); from a tenth of the lowest
 *    to ten times the highest dose in the "bounded" family, whose plateaus are
 *    constrained. Without a constraint, a plateau that no data point reaches
 *    has no least-squares value (the sum of squares keeps decreasing along
 *    top → ∞, ec → 0, or ec → 0 with a flattening slope), and no method can
 *    converge; such curves are left out of the unconstrained families.
 *  - exp-decay, exp-rise: a first-order process sampled from t = 0.
 *  - michaelis-menten: initial rates over substrate 0 … 20 mM (with a blank at 0).
 *  - gaussian: a peak on a baseline in a scan, start read roughly off a plot.
 *  - power: a power law y = a·x^k over 0 … 10 (x = 0 included).
 *  - stretched: a stretched-exponential relaxation from t = 0.
 *  - arrhenius: rate constants over 280–360 K, k = A·exp(−Ea/(R·T)).
 */
import { gaussian, rng } from '../fixtures/random';

export interface Curve {
  family: string;
  index: number;
  /** Predictor values (the model's only column, `x`). */
  x: number[];
  y: number[];
  /** True parameters the data were generated from (order of the family's `params`). */
  truth: number[];
}

export interface Family {
  id: string;
  /** Model formula in `x` (infix, parser syntax). */
  model: string;
  /** Parameter names in declaration order. */
  params: string[];
  /** `param` lines of the spec: start and bounds, e.g. `ec = 1 in [0, inf]`. */
  paramLines: (c: Curve) => string[];
  /** Curves in the full benchmark run. */
  count: number;
  seed: number;
  generate(index: number, uniform: () => number, normal: () => number): Curve;
}

const R_GAS = 8.314462618;
const DOSES = Array.from({ length: 10 }, (_, k) => 0.001 * 3 ** k);

function logistic(x: number, bot: number, top: number, ec: number, h: number): number {
  return bot + (top - bot) / (1 + Math.pow(x / ec, h));
}

interface LogisticLayout {
  rising: boolean;
  /** Two zero-dose control wells besides the 10 doses in duplicate. */
  zeroDose: boolean;
  /** Potency range, as multiples of the lowest and of the highest tested dose. */
  potency: [number, number];
  /** Plateau bounds (a screening lab's constraints), or none. */
  plateauBounds?: { bot: [number, number]; top: [number, number]; ecMax: number };
}

function logisticFamily(id: string, layout: LogisticLayout, count: number, seed: number): Family {
  const { rising, zeroDose, potency, plateauBounds: pb } = layout;
  const start = rising ? { bot: 100, top: 0 } : { bot: 0, top: 100 };
  return {
    id,
    model: 'bot + (top - bot) / (1 + (x / ec)^h)',
    params: ['bot', 'top', 'ec', 'h'],
    paramLines: () => pb
      ? [`bot = ${start.bot} in [${pb.bot[0]}, ${pb.bot[1]}]`, `top = ${start.top} in [${pb.top[0]}, ${pb.top[1]}]`, `ec = 1 in [0, ${pb.ecMax}]`, 'h = 1 in [0.1, 10]']
      : [`bot = ${start.bot}`, `top = ${start.top}`, 'ec = 1 in [0, inf]', 'h = 1 in [0.1, 10]'],
    count,
    seed,
    generate(index, u, g) {
      const low = DOSES[0] * potency[0];
      const high = DOSES[DOSES.length - 1] * potency[1];
      const ec = low * (high / low) ** u();
      const h = 0.6 + 2.4 * u();
      const plateauLow = 5 * (u() - 0.5);
      const plateauHigh = 100 + 10 * (u() - 0.5);
      const [top, bot] = rising ? [plateauLow, plateauHigh] : [plateauHigh, plateauLow];
      const x: number[] = [];
      if (zeroDose) x.push(0, 0);
      for (const d of DOSES) x.push(d, d);
      const y = x.map((d) => logistic(d, bot, top, ec, h) + 3 * g());
      return { family: id, index, x, y, truth: [bot, top, ec, h] };
    },
  };
}

export const FAMILIES: Family[] = [
  // potency inside the tested range (both plateaus seen): from three times the lowest to a third of the highest dose
  logisticFamily('logistic4-falling-plain', { rising: false, zeroDose: false, potency: [3, 1 / 3] }, 1500, 1101),
  logisticFamily('logistic4-rising-plain', { rising: true, zeroDose: false, potency: [3, 1 / 3] }, 1000, 1103),
  // zero-dose controls show the low-dose plateau, so potencies may lie below the tested range (to a third of the lowest dose)
  logisticFamily('logistic4-falling-zero', { rising: false, zeroDose: true, potency: [1 / 3, 1 / 3] }, 1500, 1102),
  logisticFamily('logistic4-rising-zero', { rising: true, zeroDose: true, potency: [1 / 3, 1 / 3] }, 1000, 1104),
  // plateaus constrained, potencies beyond both ends of the range (a tenth of the lowest to ten times the highest dose)
  logisticFamily('logistic4-bounded-zero', { rising: false, zeroDose: true, potency: [0.1, 10], plateauBounds: { bot: [-20, 50], top: [50, 150], ecMax: 1000 } }, 1000, 1105),
  {
    id: 'exp-decay',
    model: 'a * exp(-k * x) + c',
    params: ['a', 'k', 'c'],
    paramLines: () => ['a = 10', 'k = 1 in [0, inf]', 'c = 0'],
    count: 1000,
    seed: 1201,
    generate(index, u, g) {
      const a = 5 + 95 * u();
      const k = 0.05 * 100 ** u();
      const c = 10 * u();
      const x = Array.from({ length: 25 }, (_, i) => i * (4 / k) / 24 * (0.5 + u()));
      x[0] = 0;
      x.sort((p, q) => p - q);
      const y = x.map((t) => a * Math.exp(-k * t) + c + 0.02 * a * g());
      return { family: this.id, index, x, y, truth: [a, k, c] };
    },
  },
  {
    id: 'exp-rise',
    model: 'a * (1 - exp(-k * x)) + c',
    params: ['a', 'k', 'c'],
    paramLines: () => ['a = 10', 'k = 1 in [0, inf]', 'c = 0'],
    count: 1000,
    seed: 1202,
    generate(index, u, g) {
      const a = 5 + 95 * u();
      const k = 0.05 * 100 ** u();
      const c = 10 * (u() - 0.5);
      const span = (3 + 3 * u()) / k;
      const x = Array.from({ length: 20 }, (_, i) => (i * span) / 19);
      const y = x.map((t) => a * (1 - Math.exp(-k * t)) + c + 0.02 * a * g());
      return { family: this.id, index, x, y, truth: [a, k, c] };
    },
  },
  {
    id: 'michaelis-menten',
    model: 'vmax * x / (km + x)',
    params: ['vmax', 'km'],
    paramLines: () => ['vmax = 1 in [0, inf]', 'km = 1 in [0, inf]'],
    count: 1000,
    seed: 1301,
    generate(index, u, g) {
      const vmax = 5 * 40 ** u();
      const km = 0.05 * 1000 ** u();
      const x = [0, 0.1, 0.25, 0.5, 1, 2, 4, 8, 12, 20];
      const y = x.map((s) => (vmax * s) / (km + s) + 0.03 * vmax * g());
      return { family: this.id, index, x, y, truth: [vmax, km] };
    },
  },
  {
    id: 'gaussian',
    model: 'b + a * exp(-(x - m)^2 / (2 * s^2))',
    params: ['b', 'a', 'm', 's'],
    // a start read roughly off a plot: peak position within 10 % of the scan, width within a factor 2
    paramLines: (c) => {
      const [, a, m, s] = c.truth;
      const jitter = rng(9000 + c.index);
      return [
        'b = 0',
        `a = ${(1.5 * a).toPrecision(3)} in [0, inf]`,
        `m = ${(m + 10 * (jitter() - 0.5)).toPrecision(4)}`,
        `s = ${(s * 2 ** (2 * jitter() - 1)).toPrecision(3)} in [0, inf]`,
      ];
    },
    count: 1000,
    seed: 1401,
    generate(index, u, g) {
      const b = 20 * u();
      const a = 10 + 90 * u();
      const m = 30 + 40 * u();
      const s = 2 + 8 * u();
      const x = Array.from({ length: 101 }, (_, i) => i);
      const y = x.map((t) => b + a * Math.exp(-((t - m) ** 2) / (2 * s * s)) + 0.03 * a * g());
      return { family: this.id, index, x, y, truth: [b, a, m, s] };
    },
  },
  {
    id: 'power',
    model: 'a * x^k',
    params: ['a', 'k'],
    paramLines: () => ['a = 1', 'k = 1 in [0, 5]'],
    count: 500,
    seed: 1501,
    generate(index, u, g) {
      const a = 0.5 + 20 * u();
      const k = 0.3 + 2.2 * u();
      const x = Array.from({ length: 15 }, (_, i) => (10 * i) / 14);
      const scale = a * 10 ** k;
      const y = x.map((t) => a * Math.pow(t, k) + 0.02 * scale * g());
      return { family: this.id, index, x, y, truth: [a, k] };
    },
  },
  {
    id: 'stretched',
    model: 'a * exp(-(x / tau)^beta) + c',
    params: ['a', 'tau', 'beta', 'c'],
    paramLines: () => ['a = 1', 'tau = 1 in [0, inf]', 'beta = 1 in [0.1, 3]', 'c = 0'],
    count: 500,
    seed: 1601,
    generate(index, u, g) {
      const a = 0.5 + 2 * u();
      const tau = 0.3 * 10 ** u();
      const beta = 0.3 + 1.2 * u();
      const c = 0.2 * u();
      const x = Array.from({ length: 30 }, (_, i) => (i / 29) * 5 * tau);
      const y = x.map((t) => a * Math.exp(-Math.pow(t / tau, beta)) + c + 0.01 * a * g());
      return { family: this.id, index, x, y, truth: [a, tau, beta, c] };
    },
  },
  {
    id: 'arrhenius',
    model: 'A * exp(-Ea / (8.314462618 * x))',
    params: ['A', 'Ea'],
    paramLines: () => ['A = 1e9 in [0, inf]', 'Ea = 50000 in [0, inf]'],
    count: 1000,
    seed: 1701,
    generate(index, u, g) {
      const Ea = 40000 + 40000 * u();
      const A = 10 ** (6 + 6 * u());
      const x = Array.from({ length: 9 }, (_, i) => 280 + 10 * i);
      const y = x.map((T) => A * Math.exp(-Ea / (R_GAS * T)) * (1 + 0.03 * g()));
      return { family: this.id, index, x, y, truth: [A, Ea] };
    },
  },
];

/** Curve `index` of a family (deterministic: the family's generator is replayed from its seed). */
export function curvesOf(family: Family, count = family.count): Curve[] {
  const u = rng(family.seed);
  const g = gaussian(rng(family.seed + 50000));
  const out: Curve[] = [];
  for (let i = 0; i < count; i++) out.push(family.generate(i, u, g));
  return out;
}

/** Total curves in the full run. */
export function fullCount(): number {
  return FAMILIES.reduce((s, f) => s + f.count, 0);
}
