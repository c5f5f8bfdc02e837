/**
 * JSON output of results: NaN and ±Infinity become null (JSON has no such
 * numbers; the result types document null as "not computable"), typed arrays
 * become plain arrays. `resultToJsonValue` gives the parsed form (for schema
 * validation or sending to a webview).
 */
import type { RunResult } from '../result';

function replacer(_key: string, value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>, (v) => (Number.isFinite(v) ? v : null));
  return value;
}

/** JSON text of a result (or any part of one); `space` as in JSON.stringify (default 2). */
export function resultToJson(result: RunResult | unknown, space: number | string = 2): string {
  return JSON.stringify(result, replacer, space);
}

/** The result as plain JSON data (non-finite numbers → null). */
export function resultToJsonValue<T = unknown>(result: RunResult | unknown): T {
  return JSON.parse(JSON.stringify(result, replacer)) as T;
}
