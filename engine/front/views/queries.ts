/**
 * The tables of `predict`, `invert` and `backcalc` for every view (CLI text,
 * Markdown, results panel: summary.ts `queryBlocks`). Numbers through the one
 * formatter (engine/format.ts); notes say where the new observation's spread
 * came from, which predictions extrapolate, which interval ends are
 * extrapolated or open, and for a transformed response that the numbers are
 * back on the response column's scale with intervals mapped end by end.
 */
import type { BackCalculation, FitResult, InversePrediction, ObservationSource, QueryResult, RunResult } from '../../result';
import { formatInterval, formatLevel, formatNumber, formatPercent, MISSING } from '../../format';
import type { QueryBlock } from './summary';
import { predictorUnit, responseUnit, withUnit } from './units';

/** The cell of a query's number that is withheld because its fit did not converge. */
const WITHHELD = 'withheld';

const label = (fit: string, group?: string): string => (group !== undefined ? `${fit} [${group}]` : fit);

/** Caution shown with back-calculated standards (calibration may feed clinical or legal decisions). */
export const CALIBRATION_CAUTION =
  'Acceptance of a calibration (allowed deviation of the standards, how many may fail, which ends may be dropped) is set by the validated procedure of the method and the laboratory\'s quality system, not by this table; for clinical and regulated work follow those procedures and local rules.';

/** The source of the new observation's spread, as a note (none for the residual s of an unweighted fit). */
function observationNote(fit: FitResult | undefined, source: ObservationSource | undefined, readings = 1): string | null {
  const mean = readings > 1 ? `; the response is the mean of ${readings} readings, so the new-reading variance is divided by ${readings}` : '';
  if (source === 'stated') return `New observation's ${fit?.sigmaAbsolute ? 'σ' : 'weight'} as stated in the query${mean}.`;
  if (source === 'expression') {
    return fit?.sigmaAbsolute
      ? `New observation's σ from the fit's sigma expression at each ${fit.predictor ?? 'x'}${mean}.`
      : `New observation's variance s²/w from the fit's weight expression at each ${fit?.predictor ?? 'x'}${mean}.`;
  }
  return readings > 1 ? `New reading's variance s²/${readings}: the response is the mean of ${readings} readings.` : null;
}

/** An inverse interval with its open sides said in words (never a bare n/a for an end that exists only on one side). */
export function inverseInterval(v: Pick<InversePrediction, 'interval' | 'ends'>): string {
  const [a, b] = v.interval;
  const [ea, eb] = v.ends ?? ['data', 'data'];
  if (ea === 'open' && eb === 'open') return 'open on both sides';
  if (ea === 'open' && b !== null) return `≤ ${formatNumber(b)} (open below)`;
  if (eb === 'open' && a !== null) return `≥ ${formatNumber(a)} (open above)`;
  return formatInterval(a, b);
}

export function predictBlock(q: Extract<QueryResult, { kind: 'predict' }>, fit: FitResult | undefined): QueryBlock {
  const lv = formatLevel(fit?.level ?? NaN);
  const t = q.transform;
  const back = t !== undefined && q.predictions.some((p) => p.original);
  // a transformed response has no declared unit here (FitResult.units), so its columns stay unlabelled
  const yUnit = responseUnit(fit);
  const notes: string[] = [];
  if (q.withheld) notes.push(q.withheld);
  else {
    notes.push('Confidence interval: where the mean response lies; prediction interval: where one new observation lies.');
    if (back && t) {
      notes.push(`On the scale of ${t.column}: fitted value and interval ends are those of ${t.expression} mapped back through its inverse, so the intervals are not symmetric about the fitted value; the fitted value estimates the median of ${t.column}, not its mean. JSON keeps the numbers on the scale of ${t.expression}.`);
    }
    const obs = observationNote(fit, q.observation);
    if (obs) notes.push(obs);
    const beyond = q.predictions.filter((p) => p.extrapolated);
    if (beyond.length > 0) {
      const r = q.range;
      notes.push(`Extrapolated beyond the data${r ? ` (${q.variable} from ${formatNumber(r[0])} to ${formatNumber(r[1])})` : ''}: ${q.variable} = ${beyond.map((p) => formatNumber(p.x)).join(', ')}; the model is not checked there and the intervals assume it still holds.`);
    }
  }
  return {
    heading: `Predictions from ${label(q.fit, q.group)} at ${q.variable}${back && t ? ` (${t.column}, back from ${t.expression})` : ''}`,
    headers: [withUnit(q.variable, predictorUnit(fit)), withUnit('fitted', yUnit), withUnit(`${lv} confidence interval`, yUnit), withUnit(`${lv} prediction interval`, yUnit)],
    rows: q.predictions.map((p) => {
      if (q.withheld) return [formatNumber(p.x), WITHHELD, '', ''];
      const v = back && p.original ? p.original : p;
      return [`${formatNumber(p.x)}${p.extrapolated ? ' (beyond data)' : ''}`, formatNumber(v.fitted), formatInterval(...v.confidence), formatInterval(...v.prediction)];
    }),
    align: ['right', 'right', 'right', 'right'],
    notes,
  };
}

export function invertBlock(q: Extract<QueryResult, { kind: 'invert' }>, fit: FitResult | undefined): QueryBlock {
  const xName = fit?.predictor ?? 'predictor';
  const lv = formatLevel(fit?.level ?? NaN);
  const readings = q.readings ?? 1;
  const notes: string[] = [];
  if (q.withheld) notes.push(q.withheld);
  else {
    notes.push(readings > 1
      ? `Interval from inverting the prediction band for the mean of ${readings} readings of the response.`
      : 'Interval from inverting the prediction band (one new measurement of the response).');
    const obs = observationNote(fit, q.observation, readings);
    if (obs) notes.push(obs);
  }
  return {
    heading: `Inverse predictions from ${label(q.fit, q.group)}: ${xName} from ${q.response}${readings > 1 ? ` (mean of ${readings} readings)` : ''}`,
    headers: [withUnit(q.response, responseUnit(fit)), withUnit(xName, predictorUnit(fit)), withUnit(`${lv} interval`, predictorUnit(fit)), 'note'],
    rows: q.inversions.map((v) => q.withheld
      ? [formatNumber(v.response), WITHHELD, '', '']
      : [formatNumber(v.response), formatNumber(v.x), v.x === null ? formatInterval(null, null) : inverseInterval(v), v.message ?? '']),
    align: ['right', 'right', 'right', 'left'],
    notes,
  };
}

const percent = (v: number | null): string => (v === null ? MISSING : `${v > 0 ? '+' : ''}${formatPercent(v / 100)}`);

/** A deviation interval in percent, with its open sides in words as the predictor interval has them. */
function percentInterval(s: BackCalculation): string {
  if (s.x === null) return '';
  if (s.nominal === 0) return 'nominal 0';
  const [ea, eb] = s.ends ?? ['data', 'data'];
  const [a, b] = s.deviationInterval;
  if (ea === 'open' && eb === 'open') return 'open on both sides';
  if (ea === 'open') return `≤ ${percent(b)} (open below)`;
  if (eb === 'open') return `≥ ${percent(a)} (open above)`;
  return `[${percent(a)}, ${percent(b)}]`;
}

export function backcalcBlock(q: Extract<QueryResult, { kind: 'backcalc' }>, fit: FitResult | undefined): QueryBlock {
  const lv = formatLevel(fit?.level ?? NaN);
  const x = q.predictor;
  const xUnit = predictorUnit(fit);
  const notes: string[] = [];
  if (q.withheld) notes.push(q.withheld);
  else {
    notes.push(`Each standard's ${q.response} read back through the curve as one new reading with the standard's own spread (${fit?.sigmaAbsolute ? 'its σ' : fit?.points.weight ? 's/√w of its row' : 'the residual s'}); deviation = 100·(back-calculated − nominal)/nominal, its interval from the inverse-prediction interval. The standards are part of the fit, so this checks the curve's agreement with them, not an independent accuracy.`);
    if (q.standards.some((s) => s.nominal === 0)) notes.push('A standard of nominal 0 (blank) has no percent deviation.');
    notes.push(CALIBRATION_CAUTION);
  }
  return {
    heading: `Back-calculated standards of ${label(q.fit, q.group)}: ${x} from ${q.response}`,
    headers: ['row', withUnit(`nominal ${x}`, xUnit), withUnit(q.response, responseUnit(fit)), withUnit(`back-calculated ${x}`, xUnit), withUnit(`${lv} interval`, xUnit), 'deviation', `${lv} deviation interval`, 'note'],
    rows: q.withheld ? [[WITHHELD, '', '', '', '', '', '', '']] : q.standards.map((s) => [
      String(s.row), formatNumber(s.nominal), formatNumber(s.response), formatNumber(s.x),
      s.x === null ? '' : inverseInterval(s), s.nominal === 0 ? MISSING : percent(s.deviationPercent), percentInterval(s), s.message ?? '',
    ]),
    align: ['right', 'right', 'right', 'right', 'right', 'right', 'right', 'left'],
    notes,
  };
}

/** The block of a predict, invert or backcalc result (null for other queries). */
export function fitQueryBlock(result: RunResult, q: QueryResult): QueryBlock | null {
  const fit = q.kind === 'compare' ? undefined : result.fits.find((f) => f.name === q.fit && f.group === q.group) ?? result.fits.find((f) => f.name === q.fit);
  if (q.kind === 'predict') return predictBlock(q, fit);
  if (q.kind === 'invert') return invertBlock(q, fit);
  if (q.kind === 'backcalc') return backcalcBlock(q, fit);
  return null;
}
