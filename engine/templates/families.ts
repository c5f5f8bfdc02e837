/**
 * Data-driven starting values for each model family, in one canonical
 * parameterisation per family. The templates (library.ts) map them onto
 * their own parameter names for `leastwise new`; the fit runner maps them
 * onto any spec whose model has the family's structure
 * (engine/solve/start/recognise.ts). Input: finite (x, y) pairs sorted by x
 * (heuristics.ts `cleanPairs`). Every function returns finite numbers and a
 * note per value saying how it was found; they only need to land the solver
 * in the right basin.
 */
import { crossing, endMean, lineFit, localMean, meansByX, median, transformedLine, type XY } from './heuristics';

export interface FamilyStart<K extends string> {
  values: Record<K, number>;
  notes: string[];
}

const spanOf = (d: XY): number => (d.x.length ? d.x[d.x.length - 1] - d.x[0] : 1) || 1;
const finiteOr = (v: number, fallback: number) => (Number.isFinite(v) ? v : fallback);

/** Logit bounds: only responses strictly between 5 % and 95 % of the way between the plateaus enter the logit line. */
const LOGIT_LOW = 0.05;
const LOGIT_HIGH = 0.95;

/**
 * 4-parameter logistic y = zero + (full − zero) / (1 + (mid/x)^slope), slope > 0
 * (zero: response at dose 0, full: at saturating dose; falling curves have full < zero).
 * Zero doses (x = 0, e.g. untreated controls) count towards `zero`; only positive doses enter the log-dose steps.
 * Plateaus: mean response of the lowest and highest 15 % of distinct doses (replicates averaged).
 * mid and slope: the logit linearisation ln(f/(1 − f)) = slope·ln x − slope·ln mid, f = (y − zero)/(full − zero),
 * fitted to the averaged points with LOGIT_LOW < f < LOGIT_HIGH (a common practice for Hill plots); when fewer than
 * two such points exist or the line falls, mid is where the averaged responses cross the midpoint (interpolated in
 * log dose) and slope is 1.
 */
export function logistic4Start(d: XY): FamilyStart<'zero' | 'full' | 'mid' | 'slope'> {
  const m = meansByX(d);
  const zero = endMean(m.y, 0.15, 'first');
  const full = endMean(m.y, 0.15, 'last');
  const positive: XY = { x: [], y: [] };
  m.x.forEach((x, i) => {
    if (x > 0) {
      positive.x.push(x);
      positive.y.push(m.y[i]);
    }
  });
  const lx: number[] = [];
  const ly: number[] = [];
  if (full !== zero) {
    positive.x.forEach((x, i) => {
      const f = (positive.y[i] - zero) / (full - zero);
      if (f > LOGIT_LOW && f < LOGIT_HIGH) {
        lx.push(Math.log(x));
        ly.push(Math.log(f / (1 - f)));
      }
    });
  }
  const notes = ['zero_dose, full_dose: mean response of the lowest and highest 15 % of doses (replicates averaged; zero doses count as the lowest).'];
  const logit = lx.length >= 2 ? lineFit(lx, ly) : null;
  if (logit && logit.slope > 0) {
    const mid = Math.exp(-logit.intercept / logit.slope);
    if (Number.isFinite(mid) && mid > 0) {
      notes.push('ec50, hill: straight line through the logit of the averaged responses against ln dose (points between 5 % and 95 % of the way between the plateaus).');
      return { values: { zero, full, mid, slope: logit.slope }, notes };
    }
  }
  const cross = crossing(positive, (zero + full) / 2, true);
  const geo = positive.x.length ? Math.sqrt(positive.x[0] * positive.x[positive.x.length - 1]) : 1;
  notes.push(cross !== null ? 'ec50: dose where the averaged responses cross the midpoint, interpolated in log dose; hill: 1.' : 'ec50: geometric mean of the positive doses (no midpoint crossing found); hill: 1.');
  return { values: { zero, full, mid: cross ?? finiteOr(geo, 1), slope: 1 }, notes };
}

/**
 * Exponential with an offset, y = level + amplitude·exp(rate·x) (rate < 0: decay towards `level`, rate > 0:
 * growth away from it); `amplitude` is the difference from `level` at x = 0.
 * Three-point rule on local means (±5 % of the x range) y0, y1, y2 at the start, middle and end of the x range:
 * q = (y2 − y1)/(y1 − y0) = exp(rate·h), h = half the range; level = y2 + q·(y2 − y1)/(1 − q).
 * When q ≤ 0 or q = 1 (not monotone, or a straight line): level is the last 10 % mean moved 10 % of the change
 * further, rate = −3 / x range.
 */
export function expOffsetStart(d: XY): FamilyStart<'level' | 'amplitude' | 'rate'> {
  const x0 = d.x[0] ?? 0;
  const h = spanOf(d) / 2;
  const w = 0.05 * spanOf(d);
  const y0 = localMean(d, x0, w);
  const y1 = localMean(d, x0 + h, w);
  const y2 = localMean(d, x0 + 2 * h, w);
  const q = (y2 - y1) / (y1 - y0);
  if (q > 0 && q !== 1 && Number.isFinite(q) && Math.abs(Math.log(q)) > 1e-6) {
    const rate = Math.log(q) / h;
    const level = y2 + (q * (y2 - y1)) / (1 - q);
    const amplitude = (y0 - level) * Math.exp(-rate * x0);
    if ([rate, level, amplitude].every(Number.isFinite)) {
      return { values: { level, amplitude, rate }, notes: ['level, amplitude, rate: three-point rule on local means (±5 % of the x range) at the start, middle and end: q = (y2 − y1)/(y1 − y0) = exp(rate·h).'] };
    }
  }
  const first = endMean(d.y, 0.1, 'first');
  const last = endMean(d.y, 0.1, 'last');
  const level = last - 0.1 * (first - last);
  const rate = -3 / spanOf(d);
  return {
    values: { level, amplitude: (first - level) * Math.exp(-rate * x0), rate },
    notes: ['level: mean of the last 10 % of points moved 10 % of the change further; amplitude: first values minus level; rate: −3 / x range (the three-point rule needs a monotone curve).'],
  };
}

/** Exponential y = amplitude·exp(rate·x): straight line through ln|y| against x (all y of one sign), else median y and rate 1 / x range. */
export function expStart(d: XY): FamilyStart<'amplitude' | 'rate'> {
  const sign = d.y.every((v) => v > 0) ? 1 : d.y.every((v) => v < 0) ? -1 : 0;
  const f = sign !== 0 ? transformedLine(d, (v) => v, (v) => Math.log(sign * v)) : null;
  if (f) return { values: { amplitude: sign * Math.exp(f.intercept), rate: f.slope }, notes: ['y0, rate: straight line through ln y against x (intercept ln y0, slope rate).'] };
  return { values: { amplitude: finiteOr(median(d.y), 1), rate: 1 / spanOf(d) }, notes: ['y0: median response; rate: 1 / x range (the log-linear estimate failed).'] };
}

/** Michaelis–Menten v = vmax·s/(km + s): Hanes–Woolf line s/v = s/vmax + km/vmax; else the highest averaged rate and where the rate crosses half of it. */
export function michaelisMentenStart(d: XY): FamilyStart<'vmax' | 'km'> {
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
  return { values: { vmax: finiteOr(vmax, 1), km: finiteOr(km, 1) }, notes: ['vmax: highest averaged rate; km: substrate where the rate crosses vmax/2 (Hanes–Woolf line unusable).'] };
}

/**
 * Gaussian peak y = baseline + height·exp(−(x − center)²/(2·sigma²)): baseline the median of the outer 20 % of
 * averaged points on each side; height and center at the averaged point farthest from the baseline; sigma from the
 * full width at half height of the contiguous points around it (FWHM = 2·√(2 ln 2)·sigma ≈ 2.3548·sigma).
 */
export function gaussianStart(d: XY): FamilyStart<'baseline' | 'height' | 'center' | 'sigma'> {
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
  const sigma = fwhm > 0 ? fwhm / 2.3548 : spanOf(d) / 10;
  return {
    values: { baseline, height, center: m.x[peak], sigma },
    notes: [
      'baseline: median of the outer 20 % of points on each side; height, center: the point farthest from the baseline.',
      fwhm > 0 ? 'width: full width at half height of the contiguous points around the peak, divided by 2·√(2 ln 2) ≈ 2.3548.' : 'width: one tenth of the x range (peak narrower than the point spacing).',
    ],
  };
}

/** Power law y = amplitude·x^exponent: straight line through ln|y| against ln x (x > 0, y of one sign); else median y and exponent 1. */
export function powerStart(d: XY): FamilyStart<'amplitude' | 'exponent'> {
  const sign = d.y.every((v) => v > 0) ? 1 : d.y.every((v) => v < 0) ? -1 : 0;
  const f = sign !== 0 ? transformedLine(d, Math.log, (v) => Math.log(sign * v)) : null;
  if (f) return { values: { amplitude: sign * Math.exp(f.intercept), exponent: f.slope }, notes: ['a, b: straight line through ln y against ln x (intercept ln a, slope b).'] };
  return { values: { amplitude: finiteOr(median(d.y), 1), exponent: 1 }, notes: ['a: median response, b: 1 (the log-log estimate failed).'] };
}

/** y = amplitude·exp(slope/x) (Arrhenius with x the absolute temperature): straight line through ln|y| against 1/x. */
export function reciprocalExpStart(d: XY): FamilyStart<'amplitude' | 'slope'> | null {
  const sign = d.y.every((v) => v > 0) ? 1 : d.y.every((v) => v < 0) ? -1 : 0;
  const f = sign !== 0 ? transformedLine(d, (t) => (t !== 0 ? 1 / t : NaN), (v) => Math.log(sign * v)) : null;
  if (!f) return null;
  return { values: { amplitude: sign * Math.exp(f.intercept), slope: f.slope }, notes: ['A, Ea: straight line through ln k against 1/T (intercept ln A, slope −Ea/R).'] };
}
