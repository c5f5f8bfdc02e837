import { describe, expect, it } from 'vitest';
import { detectPlates, parseWell, wellName } from '../../../engine/front/views/wells';

/** Every well name of a plate, `A01`…, row by row. */
const plate = (rows: number, columns: number, name = (r: number, c: number) => wellName(r, c)): string[] =>
  Array.from({ length: rows * columns }, (_, i) => name(Math.floor(i / columns), (i % columns) + 1));

describe('views/wells', () => {
  it('reads well names with and without zero padding and with a plate prefix', () => {
    expect(parseWell('A01')).toEqual({ plate: null, row: 0, column: 1 });
    expect(parseWell('A1')).toEqual({ plate: null, row: 0, column: 1 });
    expect(parseWell('h12')).toEqual({ plate: null, row: 7, column: 12 });
    expect(parseWell('P24')).toEqual({ plate: null, row: 15, column: 24 });
    expect(parseWell('P1-A01')).toEqual({ plate: 'P1', row: 0, column: 1 });
    expect(parseWell('plate2_B07')).toEqual({ plate: 'plate2', row: 1, column: 7 });
    expect(parseWell('run 3 C11')).toEqual({ plate: 'run 3', row: 2, column: 11 });
    expect(parseWell('lot_7-x:D5')).toEqual({ plate: 'lot_7-x', row: 3, column: 5 });
  });

  it('rejects labels that merely resemble wells', () => {
    for (const label of ['H2O', 'Q1', 'A25', 'A0', 'A00', 'A001', 'AB12', 'A 1', 'A1b', '1A', 'P1A01', '-A01', 'control', '', 'A']) {
      expect(parseWell(label), label).toBeNull();
    }
  });

  it('takes a full 96-well plate as 96, a plate with a well beyond H12 as 384', () => {
    const p96 = detectPlates(plate(8, 12));
    expect(p96.layout?.shape).toEqual({ format: 96, rows: 8, columns: 12 });
    expect(p96.layout?.plates).toEqual(['']);
    expect(p96.layout?.groups).toHaveLength(96);
    expect(p96.layout?.groups[13]).toEqual({ group: 'B02', plate: '', row: 1, column: 2 });
    const p384 = detectPlates(plate(16, 24, (r, c) => `${String.fromCharCode(65 + r)}${c}`)); // unpadded
    expect(p384.layout?.shape.format).toBe(384);
    expect(p384.layout?.groups).toHaveLength(384);
    // a partial plate: rows A-B, columns 1-13 (13 > 12) needs the 384 layout
    expect(detectPlates(plate(2, 13)).layout?.shape.format).toBe(384);
    expect(detectPlates(['A01', 'A02', 'B01', 'I01']).layout?.shape.format).toBe(384); // row I > H
  });

  it('places several plates by prefix, in order of first appearance', () => {
    const labels = [...plate(2, 3).map((w) => `P2-${w}`), ...plate(8, 12).map((w) => `P1-${w}`)];
    const d = detectPlates(labels);
    expect(d.layout?.plates).toEqual(['P2', 'P1']);
    expect(d.layout?.shape.format).toBe(96);
    expect(d.layout?.groups.filter((g) => g.plate === 'P2')).toHaveLength(6);
  });

  it('refuses mixed prefixed and bare labels, duplicate wells, one row or one column, and any non-well label, saying why', () => {
    expect(detectPlates(['P1-A01', 'P1-A02', 'B01', 'B02']).notPlates).toMatch(/some group labels have a plate prefix/);
    expect(detectPlates(['A1', 'A01', 'B01', 'B02']).notPlates).toBe('groups A1 and A01 name the same well');
    expect(detectPlates(['P1-A1', 'P2-A1', 'P1-B2', 'P2-B2']).layout).not.toBeNull(); // the same well on two plates is fine
    expect(detectPlates(plate(1, 8, (_r, c) => `C${c}`)).notPlates).toMatch(/single row or a single column/); // concentration steps C1..C8
    expect(detectPlates(['B1', 'B2']).notPlates).toMatch(/single row/);
    expect(detectPlates(['A1', 'B1', 'C1']).notPlates).toMatch(/single column/);
    expect(detectPlates([...plate(8, 12), 'blank']).notPlates).toBe('group blank is not a well name');
    expect(detectPlates([]).layout).toBeNull();
  });
});
