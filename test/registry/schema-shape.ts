/**
 * Structural comparison of a hand-written JSON Schema with one generated from
 * the TypeScript types (ts-json-schema-generator), for the schema parity test.
 *
 * Compared: object property names, required properties, the schema of
 * `additionalProperties` (records), array items (tuples element-wise), and
 * the values a leaf admits (constants and enums, string, number, boolean,
 * null); unions are matched branch to branch, objects by the constant values
 * of their discriminating properties (`kind`, `of`, …). Not compared: what a
 * hand-written schema may add to a type — descriptions, defaults, bounds
 * (`minimum`, `pattern`, `minItems`), `integer` for `number`, and, where the
 * caller allows it (`nullableNumbers`: the result's NaN is written as null),
 * `null` beside `number`. A hand-written schema may narrow a plain `string`
 * or `number` of the types to constants, never the reverse.
 */

/* eslint-disable @typescript-eslint/no-explicit-any */
type Schema = any;

export interface ShapeOptions {
  /** Numbers of the types may be null in the hand-written schema (NaN and infinities are written as null). */
  nullableNumbers?: boolean;
}

function resolve(s: Schema, root: Schema): Schema {
  let cur = s;
  for (let i = 0; i < 50 && cur && typeof cur.$ref === 'string'; i++) {
    const parts = cur.$ref.replace(/^#\//, '').split('/').map(decodeURIComponent);
    let t = root;
    for (const p of parts) t = t?.[p];
    if (t === undefined) throw new Error(`unresolved $ref ${cur.$ref}`);
    cur = t;
  }
  return cur;
}

/** The alternatives a schema admits, each a single-kind schema. */
function branches(s: Schema, root: Schema): Schema[] {
  const r = resolve(s, root);
  if (r === true || r === undefined || (typeof r === 'object' && Object.keys(r).filter((k) => !['description', '$comment', 'title', 'default'].includes(k)).length === 0)) return [{ __any: true }];
  const alts = r.oneOf ?? r.anyOf;
  if (Array.isArray(alts)) return alts.flatMap((b: Schema) => branches(b, root));
  if (Array.isArray(r.enum)) return r.enum.map((v: unknown) => ({ const: v }));
  if (Array.isArray(r.type)) return r.type.map((t: string) => ({ ...r, type: t }));
  return [r];
}

type Kind = 'any' | 'const' | 'null' | 'number' | 'string' | 'boolean' | 'array' | 'object';
function kindOf(b: Schema): Kind {
  if (b.__any) return 'any';
  if ('const' in b) return 'const';
  if (b.type === 'null') return 'null';
  if (b.type === 'number' || b.type === 'integer') return 'number';
  if (b.type === 'string') return 'string';
  if (b.type === 'boolean') return 'boolean';
  if (b.type === 'array' || 'items' in b) return 'array';
  if (b.type === 'object' || 'properties' in b || 'additionalProperties' in b) return 'object';
  return 'any';
}

/** Discriminating constants of an object branch: `kind=predict`, `of=statistic`. */
function signature(b: Schema, root: Schema): string {
  const out: string[] = [];
  for (const [k, v] of Object.entries<Schema>(b.properties ?? {})) {
    const bs = branches(v, root);
    if (bs.length === 1 && kindOf(bs[0]) === 'const') out.push(`${k}=${JSON.stringify(bs[0].const)}`);
  }
  return out.sort().join(',');
}

export class ShapeComparer {
  readonly problems: string[] = [];
  private readonly seen = new Map<object, Set<object>>();

  constructor(private readonly hand: Schema, private readonly gen: Schema, private readonly options: ShapeOptions = {}) {}

  /** Compare the two roots; returns the list of differences (empty when the shapes agree). */
  run(): string[] {
    this.union('$', this.hand, this.gen);
    return this.problems;
  }

  private union(path: string, a: Schema, b: Schema): void {
    const ra = resolve(a, this.hand);
    const rb = resolve(b, this.gen);
    if (ra && rb && typeof ra === 'object' && typeof rb === 'object') {
      const s = this.seen.get(ra) ?? new Set<object>();
      if (s.has(rb)) return;
      s.add(rb);
      this.seen.set(ra, s);
    }
    const A = branches(a, this.hand);
    const B = branches(b, this.gen);
    const kinds = (xs: Schema[]) => new Set(xs.map(kindOf));
    const ka = kinds(A);
    const kb = kinds(B);
    if (kb.has('any')) return;
    if (ka.has('any')) {
      this.problems.push(`${path}: the schema admits anything, the types ${[...kb].join(' | ')}`);
      return;
    }
    // constants
    const ca = A.filter((x) => kindOf(x) === 'const').map((x) => JSON.stringify(x.const)).sort();
    const cb = B.filter((x) => kindOf(x) === 'const').map((x) => JSON.stringify(x.const)).sort();
    const narrowed = (c: string) => (typeof JSON.parse(c) === 'string' && kb.has('string')) || (typeof JSON.parse(c) === 'number' && kb.has('number'));
    const extra = ca.filter((c) => !cb.includes(c) && !narrowed(c));
    const missing = cb.filter((c) => !ca.includes(c) && !(typeof JSON.parse(c) === 'string' && ka.has('string') && false));
    if (extra.length || missing.length) {
      this.problems.push(`${path}: values differ: the schema ${extra.length ? `has ${extra.join(', ')} not in the types` : ''}${extra.length && missing.length ? ' and ' : ''}${missing.length ? `lacks ${missing.join(', ')} of the types` : ''}`);
    }
    // primitive kinds
    for (const k of ['number', 'string', 'boolean', 'null'] as const) {
      if (ka.has(k) === kb.has(k)) continue;
      if (k === 'null' && ka.has('null') && this.options.nullableNumbers && kb.has('number')) continue;
      if ((k === 'string' || k === 'number') && kb.has(k) && !ka.has(k) && A.some((x) => kindOf(x) === 'const' && typeof x.const === k)) continue;
      this.problems.push(`${path}: ${ka.has(k) ? `the schema admits ${k}, the types do not` : `the types admit ${k}, the schema does not`}`);
    }
    // arrays
    const aa = A.filter((x) => kindOf(x) === 'array');
    const ab = B.filter((x) => kindOf(x) === 'array');
    if (aa.length && ab.length) this.array(path, aa[0], ab[0]);
    else if (aa.length !== ab.length) this.problems.push(`${path}: ${aa.length ? 'the schema admits an array, the types do not' : 'the types admit an array, the schema does not'}`);
    // objects
    const oa = A.filter((x) => kindOf(x) === 'object');
    const ob = B.filter((x) => kindOf(x) === 'object');
    if (oa.length === 1 && ob.length === 1) this.object(path, oa[0], ob[0]);
    else if (oa.length || ob.length) {
      const sa = new Map(oa.map((x) => [signature(x, this.hand), x]));
      const sb = new Map(ob.map((x) => [signature(x, this.gen), x]));
      for (const [sig, x] of sb) {
        const y = sa.get(sig);
        if (y) this.object(`${path}<${sig}>`, y, x);
        else this.problems.push(`${path}: the types have a variant {${sig}} the schema lacks (schema variants: ${[...sa.keys()].map((k) => `{${k}}`).join(' ')})`);
      }
      for (const sig of sa.keys()) if (!sb.has(sig)) this.problems.push(`${path}: the schema has a variant {${sig}} the types lack`);
    }
  }

  private array(path: string, a: Schema, b: Schema): void {
    if (Array.isArray(b.items)) {
      b.items.forEach((item: Schema, i: number) => this.union(`${path}[${i}]`, Array.isArray(a.items) ? a.items[i] : a.items, item));
      if (Array.isArray(a.items) && a.items.length !== b.items.length) this.problems.push(`${path}: tuple of ${a.items.length} in the schema, ${b.items.length} in the types`);
      return;
    }
    if (b.items === undefined) return;
    if (Array.isArray(a.items)) {
      // a tuple in the schema, an array of fixed length in the generated one ([number, number] → items, minItems = maxItems = 2)
      if (b.minItems !== a.items.length || b.maxItems !== a.items.length) this.problems.push(`${path}: tuple of ${a.items.length} in the schema, not in the types`);
      a.items.forEach((item: Schema, i: number) => this.union(`${path}[${i}]`, item, b.items));
      return;
    }
    if (a.items === undefined) {
      this.problems.push(`${path}[]: the schema says nothing of the items`);
      return;
    }
    this.union(`${path}[]`, a.items, b.items);
  }

  private object(path: string, a: Schema, b: Schema): void {
    const pa = Object.keys(a.properties ?? {}).sort();
    const pb = Object.keys(b.properties ?? {}).sort();
    const onlyA = pa.filter((k) => !pb.includes(k));
    const onlyB = pb.filter((k) => !pa.includes(k));
    if (onlyA.length) this.problems.push(`${path}: properties in the schema but not in the types: ${onlyA.join(', ')}`);
    if (onlyB.length) this.problems.push(`${path}: properties in the types but not in the schema: ${onlyB.join(', ')}`);
    const ra = [...(a.required ?? [])].sort();
    const rb = [...(b.required ?? [])].sort();
    const reqA = ra.filter((k: string) => !rb.includes(k));
    const reqB = rb.filter((k: string) => !ra.includes(k));
    if (reqA.length) this.problems.push(`${path}: required in the schema, optional in the types: ${reqA.join(', ')}`);
    if (reqB.length) this.problems.push(`${path}: required in the types, optional in the schema: ${reqB.join(', ')}`);
    if (b.additionalProperties === false && a.additionalProperties !== false && pa.length) {
      this.problems.push(`${path}: the schema allows properties the types do not have (additionalProperties is not false)`);
    }
    if (b.additionalProperties && typeof b.additionalProperties === 'object') {
      if (a.additionalProperties && typeof a.additionalProperties === 'object') this.union(`${path}{*}`, a.additionalProperties, b.additionalProperties);
      else this.problems.push(`${path}: the types allow any key (a record), the schema does not say of what`);
    }
    for (const k of pa.filter((x) => pb.includes(x))) this.union(`${path}.${k}`, a.properties[k], b.properties[k]);
  }
}

export function compareShapes(hand: Schema, gen: Schema, options: ShapeOptions = {}): string[] {
  return new ShapeComparer(hand, gen, options).run();
}
