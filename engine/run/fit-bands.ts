/**
 * The bands drawn with a single-predictor fit (`FitResult.bands`: the curve
 * and its confidence and prediction bands over 200 predictor values,
 * engine/stats/bands.ts), computed when first read.
 *
 * They cost more than the rest of a 12-point fit's statistics together (a
 * model and gradient evaluation and a quadratic form at each of 200 points,
 * then six 200-number arrays, about 10 KB a fit to keep and to send between
 * threads), and most runs never read them: a per-group run of 10,000 wells
 * shows a table and the worst groups; only charts, the results panel and
 * `--json` read them. So a fit's `bands` is an object whose six arrays are
 * computed together on the first read of any of them, from inputs fixed when
 * the fit finished (`BandInputs`, a few numbers); reading it again gives the
 * same arrays. Readers see plain data: the arrays are own enumerable
 * properties (accessors), so `JSON.stringify`, the JSON writer, spreading
 * and structured cloning read them as values; assigning one replaces it by a
 * plain value.
 *
 * Between threads (engine/groups/pack.ts) a deferred `bands` travels as its
 * inputs and is deferred again on the other side: the same inputs through
 * the same code, so the values are bit-identical to bands computed at once.
 */
import type { FitPlan } from '../../parser/plan';
import type { Bands } from '../result';
import { bandsOver } from '../stats/bands';
import { buildCurve } from './curve';

/** What the bands of a finished fit are computed from (free parameters in declaration order). */
export interface BandInputs {
  predictor: string;
  estimates: Float64Array;
  /** Standard errors and correlations (flat p×p) of the free estimates. */
  se: Float64Array;
  corr: Float64Array;
  dof: number;
  level: number;
  rmse: number;
  sigmaAbsolute: boolean;
  /** The predictor's range in the fitted rows. */
  min: number;
  max: number;
}

/** The bands of `fit` from `inputs`, computed now. */
export function computeBands(fit: FitPlan, inputs: BandInputs): Bands {
  const curve = buildCurve({
    fit,
    predictor: inputs.predictor,
    estimates: inputs.estimates,
    cov: { p: inputs.estimates.length, se: inputs.se, corr: inputs.corr },
    dof: inputs.dof,
    level: inputs.level,
    rmse: inputs.rmse,
    sigmaAbsolute: inputs.sigmaAbsolute,
  });
  return bandsOver(inputs.min, inputs.max, curve.modelAt, curve.cov, curve.t, curve.newSd);
}

const BAND_KEYS = ['x', 'fitted', 'confidenceLower', 'confidenceUpper', 'predictionLower', 'predictionUpper'] as const satisfies readonly (keyof Bands)[];

interface Deferred {
  fit: FitPlan;
  inputs: BandInputs;
  computed: Bands | null;
}

/** The state of each deferred bands object made here (read or not yet read alike). */
const deferred = new WeakMap<object, Deferred>();

/**
 * The six accessors, shared by every deferred bands object (they find their
 * object's state by `this`): defining shared accessors costs a few
 * microseconds a fit, a closure per accessor several times that.
 */
const ACCESSORS: PropertyDescriptorMap = Object.fromEntries(
  BAND_KEYS.map((k) => [
    k,
    {
      enumerable: true,
      configurable: true,
      get(this: Bands) {
        const d = deferred.get(this)!;
        return (d.computed ??= computeBands(d.fit, d.inputs))[k];
      },
      set(this: Bands, value: number[]) {
        // the others are read before the object becomes plain data: an assigned array is plain data from then on
        const d = deferred.get(this);
        if (d) {
          d.computed ??= computeBands(d.fit, d.inputs);
          deferred.delete(this);
          for (const other of BAND_KEYS) Object.defineProperty(this, other, { value: d.computed[other], enumerable: true, configurable: true, writable: true });
        }
        Object.defineProperty(this, k, { value, enumerable: true, configurable: true, writable: true });
      },
    },
  ]),
);

/**
 * Bands computed on first read (module comment). The inputs are copied, so
 * later changes to the caller's arrays do not reach them.
 */
export function deferredBands(fit: FitPlan, inputs: BandInputs): Bands {
  const own: BandInputs = { ...inputs, estimates: inputs.estimates.slice(), se: inputs.se.slice(), corr: inputs.corr.slice() };
  const bands = Object.defineProperties({}, ACCESSORS) as Bands;
  deferred.set(bands, { fit, inputs: own, computed: null });
  return bands;
}

/** The inputs of a deferred bands object, or null for any other value. */
export function deferredBandInputs(value: unknown): BandInputs | null {
  return value !== null && typeof value === 'object' ? deferred.get(value)?.inputs ?? null : null;
}
