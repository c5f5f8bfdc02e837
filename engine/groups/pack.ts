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

/**
 * The same data with long number arrays as Float64Arrays: objects and arrays
 * on the way to one are copied, everything else is shared with the input
 * (which is not modified), and data with nothing to pack comes back as is.
 */
export function packNumbers<T>(value: T): T {
  return pack(value) as T;
}

/** Results packed for posting (`packResults`), restored by `unpackResults`. */
export interface PackedResults<T> {
  results: T[];
  /** Indices of the results that hold packed data (only they are walked on receipt). */
  packed: number[];
  /** Per result, the inputs of its top-level `bands` when those are deferred (the result then carries `bands: null`), else null. */
  bands: (BandInputs | null)[];
}

/**
 * `packNumbers` of each result, noting which changed: only those need
 * walking on the other side (a 12-point fit has no long array, and walking
 * it again costs about as much as cloning it). A result's own deferred
 * `bands` travel beside it.
 */
export function packResults<T extends { bands?: unknown }>(results: readonly T[]): PackedResults<T> {
  const packed: number[] = [];
  const bands: (BandInputs | null)[] = [];
  const out = results.map((r, i) => {
    const inputs = deferredBandInputs(r.bands);
    bands.push(inputs);
    const bare = inputs ? { ...r, bands: null } : r;
    const p = packNumbers(bare);
    if (p !== bare) packed.push(i);
    return p;
  });
  return { results: out, packed, bands };
}

/** The results of `packResults` after posting, restored in place (bands deferred again for `fit`). */
export function unpackResults<T extends { bands?: unknown }>(m: PackedResults<T>, fit: FitPlan): T[] {
  for (const i of m.packed) m.results[i] = unpackNumbers(m.results[i], fit);
  m.bands.forEach((inputs, i) => {
    if (inputs) m.results[i].bands = deferredBands(fit, inputs);
  });
  return m.results;
}

function pack(v: unknown): unknown {
  if (v === null || typeof v !== 'object' || ArrayBuffer.isView(v)) return v;
  const inputs = deferredBandInputs(v);
  if (inputs) return { [DEFERRED_BANDS]: inputs };
  if (Array.isArray(v)) {
    if (isNumberArray(v)) return Float64Array.from(v);
    let copy: unknown[] | null = null;
    for (let i = 0; i < v.length; i++) {
      const x: unknown = v[i];
      const y = pack(x);
      if (y !== x) (copy ??= v.slice())[i] = y;
    }
    return copy ?? v;
  }
  const o = v as Record<string, unknown>;
  let copy: Record<string, unknown> | null = null;
  for (const k of Object.keys(o)) {
    const x = o[k];
    const y = pack(x);
    if (y !== x) (copy ??= { ...o })[k] = y;
  }
  return copy ?? o;
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
