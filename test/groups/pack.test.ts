import { describe, expect, it } from 'vitest';
import { packNumbers, unpackNumbers, PACK_MIN_LENGTH } from '../../engine/groups/pack';
import { lineData, lineFit } from '../fixtures/line-fit';

describe('engine/groups/pack', () => {
  it('turns long number arrays into Float64Arrays and back, keeping every bit', () => {
    const long = Array.from({ length: PACK_MIN_LENGTH + 3 }, (_, i) => (i === 0 ? -0 : i === 1 ? NaN : i === 2 ? Infinity : i / 7));
    const value = { a: long, nested: [[...long], [1, 2]], short: [1, 2, 3], mixed: [...long.slice(0, PACK_MIN_LENGTH), null], s: 'x', n: null };
    const packed = packNumbers(value);
    expect(packed.a).toBeInstanceOf(Float64Array);
    expect(packed.nested[0]).toBeInstanceOf(Float64Array);
    expect(Array.isArray(packed.short)).toBe(true);
    expect(Array.isArray(packed.mixed)).toBe(true);
    expect(value.a).toBe(long); // the input is not modified
    const back = unpackNumbers(structuredClone(packed));
    expect(back).toEqual(value);
    expect(Object.is(back.a[0], -0)).toBe(true);
    expect(Number.isNaN(back.a[1])).toBe(true);
    expect(Array.isArray(back.a)).toBe(true);
  });

  it('round-trips a complete FitResult through structured cloning', () => {
    const fit = lineFit({ ...lineData(40, 3), name: 'cal', group: 'g1' });
    const back = unpackNumbers(structuredClone(packNumbers(fit)));
    expect(back).toEqual(fit);
    expect(Array.isArray(back.points.residual)).toBe(true);
    expect(Array.isArray(back.bands!.x)).toBe(true);
  });
});
