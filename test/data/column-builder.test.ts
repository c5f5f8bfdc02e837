import { describe, expect, it } from 'vitest';
import { ColumnBuilder, LineList } from '../../engine/data/column-builder';

describe('data/column-builder ColumnBuilder', () => {
  it('grows across blocks and takes cells back across a block boundary', () => {
    const b = new ColumnBuilder('x');
    const n = (1 << 16) * 2 + 5;
    for (let i = 0; i < n; i++) b.pushNumber(i);
    for (let k = 0; k < 10; k++) b.unpush(); // back over the boundary at 2·2^16
    b.pushNumber(-1);
    const c = b.finish();
    expect(c.values.length).toBe(n - 9);
    expect(c.values[(1 << 16) * 2 - 6]).toBe((1 << 16) * 2 - 6);
    expect(c.values[n - 10]).toBe(-1);
    expect(Array.from(c.values.subarray(0, 3))).toEqual([0, 1, 2]);
  });

  it('taking back the only text cells turns the column numeric again, exactly as before them', () => {
    const b = new ColumnBuilder('g');
    b.push('1.5', '.');
    b.push('NA', '.');
    b.push('kiln', '.');
    expect(b.text).toEqual(['1.5', '', 'kiln']);
    expect(b.nonNumeric).toBe(1);
    b.unpush();
    expect(b.text).toBeNull();
    expect(b.nonNumeric).toBe(0);
    b.push('2', '.');
    const c = b.finish();
    expect(Array.from(c.values).map((v) => (Number.isNaN(v) ? 'NaN' : v))).toEqual([1.5, 'NaN', 2]);
    expect(c.text).toBeNull();
  });

  it('reserve: one block for the estimated rows, returned without a copy when nearly full, blocks beyond it', () => {
    const b = new ColumnBuilder('x');
    for (let i = 0; i < 10; i++) b.pushNumber(i);
    b.reserve(100_000);
    for (let i = 10; i < 95_000; i++) b.pushNumber(i);
    const c = b.finish();
    expect(c.values.length).toBe(95_000);
    expect(c.values.buffer.byteLength).toBe(100_000 * 8); // a view on the reserved block: no copy
    expect(c.values[94_999]).toBe(94_999);
    // an estimate that is too low: the reserved block fills, then blocks follow and are joined
    const low = new ColumnBuilder('y');
    low.reserve(70_000);
    for (let i = 0; i < 70_000 + 70_000; i++) low.pushNumber(i);
    for (let k = 0; k < 70_001; k++) low.unpush(); // back into the reserved block
    low.pushNumber(-5);
    const d = low.finish();
    expect(d.values.length).toBe(70_000);
    expect(d.values[69_998]).toBe(69_998);
    expect(d.values[69_999]).toBe(-5);
    // an estimate far too high: copied to its length
    const high = new ColumnBuilder('z');
    high.reserve(1000);
    high.pushNumber(1);
    expect(high.finish().values.buffer.byteLength).toBe(8);
  });

  it('LineList joins its blocks in order', () => {
    const l = new LineList();
    for (let i = 0; i < 70_000; i++) l.push(i + 2);
    const a = l.finish();
    expect(a.length).toBe(70_000);
    expect([a[0], a[65_535], a[65_536], a[69_999]]).toEqual([2, 65_537, 65_538, 70_001]);
  });
});
