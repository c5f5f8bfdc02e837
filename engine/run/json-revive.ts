/**
 * A result read back from its JSON (`leastwise merge` reads the shards'
 * results): JSON has no NaN or ±Infinity, so `engine/run/json.ts` writes
 * them as null. Where the result schema (engine/result.schema.json) declares
 * a number that may be non-finite (`#/definitions/num`), a null is read back
 * as NaN, so the views and the statistics computed from a fit result see the
 * same kind of value they see in the run that wrote it (a quantity that was
 * not computable stays not computable; which of the two it was is not
 * recoverable from JSON, and test/shard/revive.test.ts holds the views to
 * showing both alike). Everything else is kept as parsed.
 */
import schema from '../result.schema.json';

type Schema = { $ref?: string; type?: string | string[]; properties?: Record<string, Schema>; items?: Schema; additionalProperties?: boolean | Schema; anyOf?: Schema[]; oneOf?: Schema[] };

const DEFINITIONS = (schema as unknown as { definitions: Record<string, Schema> }).definitions;
const NUM = '#/definitions/num';

function resolve(s: Schema): Schema {
  let cur = s;
  for (let guard = 0; cur.$ref && cur.$ref !== NUM && guard < 32; guard++) cur = DEFINITIONS[cur.$ref.replace('#/definitions/', '')] ?? {};
  return cur;
}

function walk(value: unknown, s: Schema | undefined): unknown {
  if (s === undefined) return value;
  if (s.$ref === NUM) return value === null ? NaN : value;
  const r = resolve(s);
  if (r.$ref === NUM) return value === null ? NaN : value;
  const alternatives = r.anyOf ?? r.oneOf;
  if (alternatives) {
    // the first object alternative whose required keys are all present (query kinds, stop codes…)
    if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
      for (const a of alternatives) {
        const ra = resolve(a);
        if (ra.properties && Object.keys(value as object).every((k) => k in ra.properties! || ra.additionalProperties !== false)) {
          const kind = (ra.properties as Record<string, { const?: unknown }>).kind?.const;
          if (kind === undefined || kind === (value as { kind?: unknown }).kind) return walk(value, ra);
        }
      }
    }
    if (Array.isArray(value)) {
      const list = alternatives.map(resolve).find((a) => a.items !== undefined);
      if (list) return walk(value, list);
    }
    return value;
  }
  if (Array.isArray(value)) return r.items ? value.map((v) => walk(v, r.items)) : value;
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      const sub = r.properties?.[k] ?? (typeof r.additionalProperties === 'object' ? r.additionalProperties : undefined);
      out[k] = walk(v, sub);
    }
    return out;
  }
  return value;
}

/** The parsed JSON of a result (`JSON.parse` of what `writeJson` wrote), with nulls where the schema allows NaN read back as NaN. */
export function reviveResult(parsed: unknown): unknown {
  return walk(parsed, schema as unknown as Schema);
}
