import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import type { FitData } from '../../engine/run/fit-data';
import { runFit } from '../../engine/run/fit';
import { curveFromResult } from '../../engine/run/curve';
import { computeBands, deferredBandInputs } from '../../engine/run/fit-bands';
import { bandsOver } from '../../engine/stats/bands';
import { packResults, unpackResults } from '../../engine/groups/pack';
import type { Bands } from '../../engine/result';

// An invented dose-response well: 4PL(3, 95, 0.8, 1.2) plus fixed deviations (no outside reference needed:
// the check is that bands computed on first read equal bands computed at once by the same formulas).
const doses = [0.003, 0.01, 0.03, 0.1, 0.3, 1, 3, 10, 30, 100, 300, 1000];
const noise = [0.8, -0.4, 1.1, -1.3, 0.2, 0.9, -0.7, 0.3, -1.0, 0.6, -0.2, 0.5];
const y = doses.map((d, i) => 3 + (95 - 3) / (1 + (d / 0.8) ** 1.2) + noise[i]);

function wellFit() {
  const spec = ['data d = "d.csv"', 'fit f on d {', '  model y = bottom + (top - bottom) / (1 + (x / ec50)^hill)', '  param bottom = 0', '  param top = 100', '  param ec50 = 1 in [0, inf]', '  param hill = 1', '}', ''].join('\n');
  const { plan, diagnostics } = analyze(spec);
  expect(diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  const fit = plan.fits[0];
  const x = Float64Array.from(doses);
  const data: FitData = {
    fit: 'f', source: 'd', file: 'd.csv', n: x.length, modelColumns: ['x'], columns: [x], lines: Int32Array.from(doses, (_, i) => i + 2),
    y: Float64Array.from(y), weights: null, sigmaAbsolute: false, x, predictor: 'x', rowsDropped: 0, rowsWithoutGroup: 0,
  };
  return { fit, result: runFit(fit, data) };
}

/** The bands as the fit computed them before they were deferred: from the finished result's numbers. */
function eager(fit: ReturnType<typeof wellFit>['fit'], result: ReturnType<typeof wellFit>['result']): Bands {
  const curve = curveFromResult(fit, result)!;
  return bandsOver(Math.min(...doses), Math.max(...doses), curve.modelAt, curve.cov, curve.t, curve.newSd);
}

const plain = (b: Bands): Bands => ({ x: b.x, fitted: b.fitted, confidenceLower: b.confidenceLower, confidenceUpper: b.confidenceUpper, predictionLower: b.predictionLower, predictionUpper: b.predictionUpper });

describe('engine/run/fit-bands', () => {
  it('computes on first read the bands a fit computed at once, bit for bit, and the same arrays on every read', () => {
    const { fit, result } = wellFit();
    expect(result.stop.converged).toBe(true);
    const bands = result.bands!;
    const inputs = deferredBandInputs(bands);
    expect(inputs).not.toBeNull();
    const want = eager(fit, result);
    expect(bands.x.length).toBe(200);
    expect(plain(bands)).toEqual(want);
    expect(JSON.stringify(bands)).toBe(JSON.stringify(want));
    expect(bands.fitted).toBe(bands.fitted);
    expect(computeBands(fit, inputs!)).toEqual(want);
  });

  it('reads as plain data: keys in order, spread, structured clone and JSON', () => {
    const { fit, result } = wellFit();
    const want = eager(fit, result);
    expect(Object.keys(result.bands!)).toEqual(['x', 'fitted', 'confidenceLower', 'confidenceUpper', 'predictionLower', 'predictionUpper']);
    expect({ ...result.bands! }).toEqual(want);
    expect(structuredClone(result).bands).toEqual(want);
    expect(JSON.parse(JSON.stringify(result)).bands).toEqual(JSON.parse(JSON.stringify(want)));
  });

  it('takes an assigned array as plain data from then on', () => {
    const { fit, result } = wellFit();
    const bands = result.bands!;
    bands.x = [1, 2];
    expect(bands.x).toEqual([1, 2]);
    expect(deferredBandInputs(bands)).toBeNull();
    expect(bands.fitted).toEqual(eager(fit, result).fitted);
  });

  it('crosses a thread boundary as its inputs and reads the same on the other side', () => {
    const { fit, result } = wellFit();
    const posted = packResults([result]);
    expect(posted.bands[0]).not.toBeNull();
    expect(posted.results[0].bands).toBeNull();
    expect(result.bands).not.toBeNull(); // the result itself is not modified
    const back = unpackResults(structuredClone(posted), fit)[0];
    expect(deferredBandInputs(back.bands)).not.toBeNull();
    expect(JSON.stringify(back)).toBe(JSON.stringify(result));
  });
});
