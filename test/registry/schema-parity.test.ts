/**
 * The published JSON Schemas (parser/plan.schema.json, engine/result.schema.json)
 * are hand-written, with the constraints and descriptions a reader needs; this
 * test holds them to the TypeScript types that are the specification
 * (parser/plan.ts `Plan`, engine/result.ts `RunResult`): a schema generated
 * from the types by ts-json-schema-generator (2.4.0, pinned) must have the
 * same shape (test/registry/schema-shape.ts says what is compared). Since the
 * name unions of the types come from the registries (parser/registry/), an
 * enum of functions, statistics, methods or losses in a schema that misses or
 * adds a name fails here, and so does a field added to a type but not to its
 * schema.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createGenerator } from 'ts-json-schema-generator';
import { compareShapes } from './schema-shape';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const read = (rel: string) => JSON.parse(readFileSync(path.join(ROOT, rel), 'utf8'));

function generated(file: string, type: string): unknown {
  return createGenerator({
    path: path.join(ROOT, file),
    type,
    tsconfig: path.join(ROOT, 'tsconfig.json'),
    skipTypeCheck: true,
    additionalProperties: false,
    expose: 'all',
    topRef: true,
    jsDoc: 'none',
  }).createSchema(type);
}

describe('JSON Schemas against the TypeScript types', () => {
  it('parser/plan.schema.json has the shape of Plan', () => {
    expect(compareShapes(read('parser/plan.schema.json'), generated('parser/plan.ts', 'Plan'))).toEqual([]);
  }, 120_000);

  it('engine/result.schema.json has the shape of RunResult (numbers may be null: NaN in JSON)', () => {
    expect(compareShapes(read('engine/result.schema.json'), generated('engine/result.ts', 'RunResult'), { nullableNumbers: true })).toEqual([]);
  }, 120_000);
});

describe('the schema parity check can fail (mutated copies of the schemas)', () => {
  const plan = () => read('parser/plan.schema.json');
  const genPlan = generated('parser/plan.ts', 'Plan');

  it('a function missing from the plan schema (hypot) is reported', () => {
    const s = plan();
    const fn = s.definitions.exprCall.properties.fn;
    fn.enum = fn.enum.filter((f: string) => f !== 'hypot');
    expect(compareShapes(s, genPlan).join('\n')).toContain('lacks "hypot" of the types');
  }, 120_000);

  it('a former loss name, a dropped statistic and a field missing from a schema are reported', () => {
    const s = plan();
    s.definitions.options.properties.loss.enum.push('soft_l1');
    s.definitions.statistic.enum = s.definitions.statistic.enum.filter((x: string) => x !== 'adj_r2');
    delete s.definitions.parameter.properties.unit;
    const problems = compareShapes(s, genPlan).join('\n');
    expect(problems).toContain('has "soft_l1" not in the types');
    expect(problems).toContain('lacks "adj_r2" of the types');
    expect(problems).toContain('properties in the types but not in the schema: unit');
  });
});
