import { describe, expect, it } from 'vitest';
import { fitGroupList, fitOneGroup, unfittedGroup } from '../../engine/groups/group-job';
import { cancelTokenOf, createCancelFlag, isWorkerRequest, isWorkerResponse, setCancelled } from '../../engine/groups/protocol';
import { analyze } from '../../parser/index';
import type { FitData } from '../../engine/run';

const spec = 'data d = "d.csv"\nfit line on d {\n  model y = a + b * x\n  param a\n  param b\n  per lot\n}\n';
const fit = analyze(spec).plan.fits[0];

/** A group of an invented straight-line calibration: y = 1 + 2x exactly. */
function group(name: string, n: number): FitData {
  const x = Float64Array.from({ length: n }, (_, i) => i);
  return {
    fit: 'line', source: 'd', file: 'd.csv', group: name, n, modelColumns: ['x'], columns: [x],
    lines: Int32Array.from({ length: n }, (_, i) => i + 2), y: x.map((v) => 1 + 2 * v), weights: null,
    sigmaAbsolute: false, x, predictor: 'x', rowsDropped: 0, rowsWithoutGroup: 0,
  };
}

describe('engine/groups/group-job', () => {
  it('fits each group in order; a group that throws fails alone with the reason', () => {
    const exploding = new Proxy(group('boom', 5), {
      get(target, key) {
        if (key === 'n') throw new Error('unreadable rows');
        return Reflect.get(target, key);
      },
    });
    const out = fitGroupList(fit, [group('a', 6), exploding, group('c', 4)]);
    expect(out.map((r) => r.group)).toEqual(['a', 'boom', 'c']);
    expect(out[1].stop.code).toBe('failed');
    expect(out[1].stop.message).toContain('unreadable rows');
    expect(out[1].stop.message).toContain('boom');
    // exact data: intercept 1, slope 2 (closed form)
    for (const r of [out[0], out[2]]) {
      expect(r.stop.converged).toBe(true);
      expect(r.parameters[0].estimate).toBeCloseTo(1, 10);
      expect(r.parameters[1].estimate).toBeCloseTo(2, 10);
    }
  });

  it('gives cancelled results once the shared flag is set', () => {
    const flag = createCancelFlag();
    const token = cancelTokenOf(flag);
    const out = fitGroupList(fit, [group('a', 6), group('b', 6), group('c', 6)], token, (done) => {
      if (done === 1) setCancelled(flag);
    });
    expect(out.map((r) => r.stop.code)).toEqual(['exact', 'cancelled', 'cancelled']);
    expect(fitOneGroup(fit, group('d', 3), { cancelled: true }).stop.code).toBe('cancelled');
  });

  it('builds complete results for groups that did not run', () => {
    const r = unfittedGroup(fit, group('x', 3), { message: 'worker stopped' });
    expect(r).toMatchObject({ name: 'line', group: 'x', stop: { code: 'failed', message: 'worker stopped', converged: false } });
    expect(r.points.row).toEqual([2, 3, 4]);
  });
});

describe('engine/groups/protocol', () => {
  it('recognises well-formed messages and rejects others', () => {
    expect(isWorkerRequest({ kind: 'fitGroups', id: 1, fit, groups: [], cancelFlag: null })).toBe(true);
    expect(isWorkerRequest({ kind: 'fitGroups', id: 1, fit: 'line', groups: [], cancelFlag: null })).toBe(false);
    expect(isWorkerRequest({ kind: 'runPlan', id: 1, plan: {}, options: { baseDir: '/tmp' }, cancelFlag: createCancelFlag() })).toBe(true);
    expect(isWorkerRequest({ kind: 'runPlan', id: 1, plan: {}, options: {}, cancelFlag: null })).toBe(false);
    expect(isWorkerRequest({ kind: 'other', id: 1 })).toBe(false);
    expect(isWorkerResponse({ kind: 'progress', id: 2, done: 1, total: 3 })).toBe(true);
    expect(isWorkerResponse({ kind: 'groupsDone', id: 2, results: [] })).toBe(true);
    expect(isWorkerResponse({ kind: 'groupsDone', id: '2', results: [] })).toBe(false);
    expect(isWorkerResponse({ kind: 'error', id: 2 })).toBe(false);
    expect(isWorkerResponse({ kind: 'iteration', id: 2, fit: 'decay', iteration: 7, cost: 0.5 })).toBe(true);
    expect(isWorkerResponse({ kind: 'iteration', id: 2, fit: 'decay', group: 'b001', iteration: 7, cost: 0.5 })).toBe(true);
    expect(isWorkerResponse({ kind: 'iteration', id: 2, fit: 'decay', group: 3, iteration: 7, cost: 0.5 })).toBe(false);
    expect(isWorkerResponse({ kind: 'iteration', id: 2, fit: 'decay', iteration: '7', cost: 0.5 })).toBe(false);
  });

  it('reads the shared cancel flag through a token', () => {
    const flag = createCancelFlag();
    const token = cancelTokenOf(flag);
    expect(token.cancelled).toBe(false);
    setCancelled(flag);
    expect(token.cancelled).toBe(true);
    expect(cancelTokenOf(null).cancelled).toBe(false);
  });
});
