/**
 * Cheaper transport of FitResults between threads. Structured cloning copies
 * a JavaScript number array element by element (and rebuilds it on the other
 * side), which made receiving results cost the host thread about as much as
 * a quarter of the fitting itself; a Float64Array is copied as one block.
 * So before posting, every array of at least PACK_MIN_LENGTH numbers is
 * replaced by a Float64Array with the same values, and after receiving every
 * Float64Array is turned back into a number array. FitResults (plain JSON
 * data by contract, engine/result.ts) hold no typed arrays of their own, so
 * the round trip is exact: same values, same bits (−0 and NaN included).
 *
 * Bands not computed yet (engine/run/fit-bands.ts) travel as their inputs,
 * under the key DEFERRED_BANDS, and are deferred again on receipt for the
 * fit plan given to `unpackNumbers`.
 */
import type { FitPlan } from '../../parser/plan';
import { toNumberArray } from '../run/number-array';
import { deferredBandInputs, deferredBands, type BandInputs } from '../run/fit-bands';

/** The key of a deferred bands object's inputs in packed data (a name no result field has). */
export const DEFERRED_BANDS = '\u0000deferredBands';

/** Shorter arrays are left alone (not worth it). */
export const PACK_MIN_LENGTH = 16;

function isNumberArray(a: unknown[]): a is number[] {
  if (a.length < PACK_MIN_LENGTH) return false;
  for (let i = 0; i < a.length; i++) if (typeof a[i] !== 'number') return false;
  return true;
}

/** A copy of plain JSON-like data with long number arrays as Float64Arrays. */
export function packNumbers<T>(value: T): T {
  return pack(value) as T;
}

function pack(v: unknown): unknown {
  const inputs = deferredBandInputs(v);
  if (inputs) return { [DEFERRED_BANDS]: inputs };
  if (Array.isArray(v)) return isNumberArray(v) ? Float64Array.from(v) : v.map(pack);
  if (v !== null && typeof v === 'object' && !ArrayBuffer.isView(v)) {
    const out: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) out[k] = pack(x);
    return out;
  }
  return v;
}

/** Restores packed data in place (Float64Arrays back to number arrays, deferred bands for `fit`) and returns it. */
export function unpackNumbers<T>(value: T, fit?: FitPlan): T {
  return unpack(value, fit) as T;
}

function unpack(v: unknown, fit: FitPlan | undefined): unknown {
  if (v instanceof Float64Array) return toNumberArray(v);
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) v[i] = unpack(v[i], fit);
    return v;
  }
  if (v !== null && typeof v === 'object' && !ArrayBuffer.isView(v)) {
    const o = v as Record<string, unknown>;
    if (DEFERRED_BANDS in o) {
      // (a caller error: the inputs mean nothing without the fit they belong to)
      if (!fit) throw new Error('deferred bands received without their fit plan');
      return deferredBands(fit, o[DEFERRED_BANDS] as BandInputs);
    }
    for (const k of Object.keys(o)) o[k] = unpack(o[k], fit);
    return o;
  }
  return v;
}
