/**
 * engine/data sampling for `new` and the editor's new spec: the header and
 * the first rows of a file, from the file (streamed) or from its first bytes.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { writeFileSync, mkdtempSync, rmSync, truncateSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseCsvBytes } from '../../engine/data/csv';
import { sampleDataFile, sampleFromBytes } from '../../engine/data/load';
import type { DataTable } from '../../engine/data/types';

const eol = fc.constantFrom('\n', '\r\n', '\r');
const cell = fc.oneof(
  fc.constantFrom('1', '-2.5', '3e-7', '', 'NA', 'S01', 'Ω', '温度', '🙂'),
  fc.tuple(fc.constantFrom('a', '1.5', 'Ω'), eol, fc.constantFrom('', 'b', '""')).map(([a, e, b]) => `"${a}${e}${b}"`),
);
const fileArb = fc.record({
  rows: fc.array(fc.tuple(cell, cell), { maxLength: 10 }),
  ends: fc.array(eol, { minLength: 12, maxLength: 12 }),
  bom: fc.boolean(),
});

function render(f: { rows: [string, string][]; ends: string[]; bom: boolean }): Uint8Array {
  const lines = ['x,"y ""q"""', ...f.rows.map((r) => r.join(','))];
  return new TextEncoder().encode((f.bom ? '\uFEFF' : '') + lines.map((l, i) => l + f.ends[i % f.ends.length]).join(''));
}

/** The first `rows` rows of `t`: file lines, cell text and values. */
function head(t: DataTable, rows: number) {
  return {
    headers: t.headers,
    lines: Array.from(t.lines).slice(0, rows),
    // a number cell by its value, any other by its text (whether a column keeps text depends on rows not compared)
    cols: t.columns.map((c) => Array.from(c.values).slice(0, rows).map((v, i) => (Number.isNaN(v) ? `text ${c.text?.[i] ?? ''}` : String(v)))),
  };
}

describe('engine/data sampleFromBytes, sampleDataFile', () => {
  it('the first bytes of a file give the first rows of the file, exactly; a record they cut off is left out', () => {
    fc.assert(fc.property(fileArb, fc.nat(), (f, cutSeed) => {
      const bytes = render(f);
      const full = parseCsvBytes(bytes, { file: 'd.csv' });
      if (!full.ok) return; // only well-formed files are compared
      const cut = cutSeed % (bytes.length + 1);
      const s = sampleFromBytes(bytes.subarray(0, cut), cut < bytes.length, { file: 'd.csv' });
      if (!s.ok) {
        // only a cut inside the header leaves no table
        expect(s.errors[0].code).toBe('empty_file');
        expect(s.errors[0].row).toBe(1);
        return;
      }
      expect(s.table.rowCount).toBeLessThanOrEqual(full.table.rowCount);
      expect(head(s.table, s.table.rowCount)).toEqual(head(full.table, s.table.rowCount));
      expect(s.complete).toBe(cut === bytes.length);
      if (cut === bytes.length) expect(s.table.rowCount).toBe(full.table.rowCount);
    }), { numRuns: 600, seed: 20261203 });
  });

  it('stops at maxRows', () => {
    const bytes = new TextEncoder().encode('x,y\n' + Array.from({ length: 30 }, (_, i) => `${i},${2 * i}`).join('\n') + '\n');
    const s = sampleFromBytes(bytes, false, { maxRows: 7 });
    expect(s.ok && s.table.rowCount).toBe(7);
    expect(s.ok && Array.from(s.table.columns[1].values)).toEqual([0, 2, 4, 6, 8, 10, 12]);
    expect(s.ok && s.complete).toBe(false);
    const all = sampleFromBytes(bytes, false, { maxRows: 100 });
    expect(all.ok && all.complete).toBe(true);
  });

  it('reads a 1 GiB file by its start only, and refuses what is not a regular file', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'lw-sample-'));
    try {
      const p = path.join(dir, 'big.csv');
      writeFileSync(p, 'x,y\n' + Array.from({ length: 12_000 }, (_, i) => `${i},${3 * i}`).join('\n') + '\n');
      truncateSync(p, 1 << 30); // sparse NUL bytes after the rows
      const s = sampleDataFile(p, { displayPath: 'big.csv' });
      expect(s.ok).toBe(true);
      if (!s.ok) return;
      expect(s.table.rowCount).toBe(10_000);
      expect(s.complete).toBe(false);
      expect(s.table.columns[1].values[9_999]).toBe(29_997);
      const d = sampleDataFile(dir, { displayPath: 'folder' });
      expect(!d.ok && d.errors[0].message).toMatch(/folder/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('a header longer than the bytes read says so, at line 1', () => {
    const bytes = new TextEncoder().encode('a'.repeat(100) + ',b\n1,2\n');
    const s = sampleFromBytes(bytes.subarray(0, 50), true, { file: 'wide.csv' });
    expect(!s.ok && s.errors[0]).toMatchObject({ code: 'empty_file', row: 1 });
    expect(!s.ok && s.errors[0].message).toMatch(/^the header of wide\.csv does not end within its first/);
  });
});
