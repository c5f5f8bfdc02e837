/**
 * engine/run/json.ts: the chunked serializer writes exactly the text of
 * `JSON.stringify(value, jsonReplacer, space)` (the output before streaming,
 * and the ECMAScript algorithm it follows) for every sample's result and for
 * the edge cases of that algorithm, in chunks of bounded size.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyze } from '../../parser';
import { runPlan } from '../../engine/runner/run-plan';
import { headerLookup } from '../../engine/data';
import { JSON_CHUNK_CHARS, jsonReplacer, resultToJson, resultToJsonValue, writeJson } from '../../engine/run/json';
import type { RunResult } from '../../engine/result';

const SAMPLES = join(__dirname, '..', '..', 'samples');
const NAMES = ['cooling', 'photometer', 'enzyme', 'thermistor', 'doseresponse', 'drift', 'arrhenius', 'plate'];

async function sampleResult(name: string): Promise<RunResult> {
  const dir = join(SAMPLES, name);
  const text = readFileSync(join(dir, `${name}.lsq`), 'utf8');
  const { plan } = analyze(text, { headers: headerLookup(dir) });
  return runPlan(plan, { baseDir: dir, specText: text, specPath: `${name}.lsq`, threads: 1, now: () => new Date(0) });
}

/** The replacer of the output before streaming (engine/run/json.ts until this change), verbatim: the reference text. */
function oldReplacer(_key: string, value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>, (v) => (Number.isFinite(v) ? v : null));
  return value;
}

function chunks(value: unknown, space: number | string = 2, size = JSON_CHUNK_CHARS): string[] {
  const out: string[] = [];
  writeJson(value, (c) => out.push(c), space, size);
  return out;
}

describe('engine/run/json writeJson', () => {
  for (const name of NAMES) {
    it(`writes the same bytes as JSON.stringify for the ${name} sample`, async () => {
      const result = await sampleResult(name);
      const reference = JSON.stringify(result, oldReplacer, 2);
      expect(JSON.stringify(result, jsonReplacer, 2)).toBe(reference);
      expect(resultToJson(result)).toBe(reference);
      // small chunks too: the text does not depend on where chunks end
      expect(chunks(result, 2, 97).join('')).toBe(reference);
      expect(resultToJson(result, 0)).toBe(JSON.stringify(result, oldReplacer));
      expect(resultToJsonValue(result)).toEqual(JSON.parse(JSON.stringify(result, oldReplacer)));
    });
  }

  it('follows JSON.stringify on the edge cases of its algorithm', () => {
    class WithToJson {
      toJSON(key: string) {
        return { key, n: NaN };
      }
    }
    const value = {
      nan: NaN,
      inf: Infinity,
      negInf: -Infinity,
      negZero: -0,
      big: 1e300,
      tiny: 5e-324,
      typed: new Float64Array([1.5, NaN, -0, Infinity, 2e-7]),
      ints: new Int32Array([1, -2, 3]),
      emptyTyped: new Float32Array(0),
      plain: [1, NaN, undefined, () => 1, Symbol('s'), null, 'a"b\\c\n\u2028', true, false, [], {}],
      skipped: undefined,
      fn: () => 2,
      sym: Symbol('t'),
      date: new Date(0),
      custom: new WithToJson(),
      wrappers: [Object(3), Object('s'), Object(false), Object(NaN)],
      nested: { a: [[[]], [{}], { b: { c: [new Float64Array([1])] } }] },
      'odd "key"\n': 1,
      '': 'empty key',
      unicode: 'é 漢字 😀 \u0000 \u001f',
    };
    for (const space of [2, 0, 4, 10, 12, '\t', 'abcdefghijklmnop', '', -1, 2.7]) {
      expect(resultToJson(value, space as never)).toBe(JSON.stringify(value, jsonReplacer, space as never));
    }
    expect(resultToJson([undefined])).toBe('[\n  null\n]');
    const cycle: Record<string, unknown> = {};
    cycle.self = cycle;
    expect(() => resultToJson(cycle)).toThrow(TypeError);
  });

  it('matches JSON.stringify on random JSON-like values (fast-check, seeded)', () => {
    const leaf = fc.oneof(fc.double(), fc.integer(), fc.string(), fc.boolean(), fc.constant(null), fc.constant(undefined));
    const tree = fc.letrec((tie) => ({
      node: fc.oneof({ depthSize: 'small' }, leaf, fc.array(tie('node')), fc.dictionary(fc.string(), tie('node')), fc.float64Array({ maxLength: 20 })),
    })).node;
    fc.assert(
      fc.property(tree, fc.integer({ min: 1, max: 50 }), (v, size) => {
        expect(chunks(v, 2, size).join('')).toBe(JSON.stringify(v, jsonReplacer, 2) ?? '');
      }),
      { seed: 20261203, numRuns: 300 },
    );
  });

  it('hands out bounded chunks: no chunk is much larger than the chunk size', () => {
    const value = { values: new Float64Array(200_000).map((_, i) => i / 7), rows: Array.from({ length: 20_000 }, (_, i) => ({ i, label: `row ${i}` })) };
    const out = chunks(value, 2, 4096);
    expect(out.length).toBeGreaterThan(100);
    // a chunk ends at the first write past the size: one block of numbers (4096 of them) at most beyond it
    const longest = Math.max(...out.map((c) => c.length));
    expect(longest).toBeLessThan(4096 + 4096 * 30);
    expect(out.join('')).toBe(JSON.stringify(value, jsonReplacer, 2));
  });
});

describe('engine/run/json number text: every double round-trips', () => {
  /** Doubles from random bit patterns (every exponent, subnormals included) plus the edge values; NaN and ±Infinity left out (written as null). */
  function doubles(count: number): Float64Array {
    const view = new DataView(new ArrayBuffer(8));
    let s = 0x9e3779b9;
    const next = () => {
      // xorshift32 (Marsaglia 2003), enough to spread the bit patterns
      s ^= s << 13; s >>>= 0; s ^= s >>> 17; s ^= s << 5; s >>>= 0;
      return s;
    };
    const out = new Float64Array(count);
    const edges = [0, -0, 5e-324, -5e-324, 2.2250738585072014e-308, 2.225073858507201e-308, Number.MAX_VALUE, -Number.MAX_VALUE, Number.EPSILON, 1, -1, 0.1, 1e21, 1e-7, 123456789012345680000, 2 ** 53, 2 ** 53 + 2];
    let k = 0;
    for (; k < edges.length; k++) out[k] = edges[k];
    while (k < count) {
      view.setUint32(0, next());
      view.setUint32(4, next());
      const v = view.getFloat64(0);
      if (Number.isFinite(v)) out[k++] = v;
    }
    return out;
  }

  it('2 million random doubles in a typed array, a plain array, shallow and deep (indentation over 10 characters), indented and compact: Number(text) === value, the text is String(value)', () => {
    const values = doubles(2_000_000);
    const plain = Array.from(values);
    const deep = { a: { b: { c: { d: { e: { f: values } } } } } };
    for (const [space, value, pick] of [
      [2, { v: values }, (o: any) => o.v],
      [0, plain, (o: any) => o],
      [2, deep, (o: any) => o.a.b.c.d.e.f],
    ] as const) {
      const text = resultToJson(value, space);
      const back = pick(JSON.parse(text)) as number[];
      expect(back.length).toBe(values.length);
      let bad = 0;
      for (let i = 0; i < values.length; i++) if (!(back[i] === values[i])) bad++;
      expect(bad).toBe(0);
      // the element texts themselves: shortest round-trip form, as String(x) (−0 is written 0, as JSON.stringify does)
      const texts = (space === 0 ? text.slice(1, -1) : text.slice(text.indexOf('[') + 1, text.lastIndexOf(']'))).split(',').map((t) => t.trim());
      let differ = 0;
      for (let i = 0; i < values.length; i++) if (texts[i] !== String(values[i])) differ++;
      expect(differ).toBe(0);
    }
  });

  it('a plain array mixing numbers, non-finite numbers, strings, booleans and objects: the text of JSON.stringify with the replacer', () => {
    const mixed = [1.5, NaN, 'a', 2, 3, true, null, -Infinity, { x: 1e-310 }, 4, undefined, 5e-324, [0.1, 0.2], 7];
    for (const space of [0, 2, 4]) expect(resultToJson({ deep: { deeper: { deepest: { more: { m: mixed } } } }, m: mixed }, space)).toBe(JSON.stringify({ deep: { deeper: { deepest: { more: { m: mixed } } } }, m: mixed }, jsonReplacer, space));
  });
});
