import { describe, expect, it } from 'vitest';
import Ajv from 'ajv';
import schema from '../../parser/plan.schema.json';
import { analyze } from '../../parser/index';
import { PLAN_VERSION } from '../../parser/plan';
import { specs } from './helpers';

const ajv = new Ajv({ allErrors: true });
const validate = ajv.compile(schema);

describe('parser/plan.schema.json', () => {
  it('carries the plan version', () => {
    expect(schema.properties.version.const).toBe(PLAN_VERSION);
    expect(schema.$id).toBe(`urn:leastwise:plan:${PLAN_VERSION}`);
  });

  it('accepts the plan of every test spec (after a JSON round trip)', () => {
    const all = specs();
    expect(all.length).toBeGreaterThanOrEqual(4);
    for (const s of all) {
      const plan = JSON.parse(JSON.stringify(analyze(s.text).plan));
      const ok = validate(plan);
      expect(validate.errors ?? [], s.name).toEqual([]);
      expect(ok).toBe(true);
    }
  });

  it('accepts unbounded parameters as absent bounds', () => {
    const { plan } = analyze('data d = "a.csv"\nfit f on d {\n  model y = a * x\n  param a in [-inf, inf]\n}');
    expect(plan.fits[0].parameters[0].lower).toBeUndefined();
    expect(plan.fits[0].parameters[0].upper).toBeUndefined();
    expect(validate(JSON.parse(JSON.stringify(plan)))).toBe(true);
  });

  it('rejects a plan that breaks the contract', () => {
    const plan = JSON.parse(JSON.stringify(analyze(specs()[0].text).plan));
    plan.fits[0].parameters[0].lower = null; // no nulls: absent means unbounded
    expect(validate(plan)).toBe(false);
    const plan2 = JSON.parse(JSON.stringify(analyze(specs()[0].text).plan));
    plan2.fits[0].blocks[0].model = { kind: 'call', fn: 'gamma', args: [] };
    expect(validate(plan2)).toBe(false);
    expect(validate({ ...plan2, version: 2 })).toBe(false);
  });
});
