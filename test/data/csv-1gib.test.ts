/**
 * A 1 GiB CSV file loads (data/load streamed reading): before streaming,
 * any file of 512 MiB or more failed, because its text was one string.
 * Generated in a temp folder (about 18 million rows of a label and three
 * numbers, CRLF line ends, a quoted cell with a line break in every block);
 * the values are checked against the generator, the SHA-256 against
 * node:crypto over the file read independently. Its own file because it
 * writes and reads 1 GiB (about 20-40 s on the project's 2-core machine);
 * the regular `npx vitest run` (CI) runs it. Speed is measured by benchmark
 * #5, not here.
 */
import { createHash } from 'node:crypto';
import { closeSync, mkdtempSync, openSync, readSync, rmSync, statSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadDataFile } from '../../engine/data/load';

const GIB = 1024 ** 3;
const dir = mkdtempSync(join(tmpdir(), 'lw-1gib-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** One block of rows (10,007 of them, so blocks and read chunks never line up). */
function block(): { text: Buffer; rows: number; sumY: number; sumZ: number; quotedLine: number } {
  const lines: string[] = [];
  let sumY = 0;
  let sumZ = 0;
  for (let i = 0; i < 10_007; i++) {
    const y = (i * 7919) % 100_003 / 1000 + 0.123456789; // ≤ 15 significant digits: exact through either number path
    const z = -((i * 31) % 997) * 1e-6;
    sumY += y;
    sumZ += z;
    const label = i === 5000 ? '"kiln\r\nΩ"' : `S${String(i % 50).padStart(2, '0')}`;
    lines.push(`${label},${i},${y},${z}\r\n`);
  }
  return { text: Buffer.from(lines.join(''), 'utf8'), rows: 10_007, sumY, sumZ, quotedLine: 5000 };
}

describe('data/load loadDataFile on a 1 GiB file', () => {
  it('streams it into columns: every row, the right values and lines, the SHA-256 of its bytes', () => {
    const path = join(dir, 'big.csv');
    const b = block();
    const fd = openSync(path, 'w');
    let written = writeSync(fd, 'site,i,y,z\r\n');
    let blocks = 0;
    while (written < GIB) {
      written += writeSync(fd, b.text);
      blocks++;
    }
    closeSync(fd);
    const size = statSync(path).size;
    expect(size).toBeGreaterThanOrEqual(GIB);

    const r = loadDataFile(path, { displayPath: 'big.csv' });
    expect(r.ok, r.ok ? '' : JSON.stringify(r.errors)).toBe(true);
    if (!r.ok) return;
    const t = r.data.table;
    expect(t.headers).toEqual(['site', 'i', 'y', 'z']);
    expect(t.rowCount).toBe(blocks * b.rows);
    expect(r.data.bytes).toBe(size);
    const [site, i, y, z] = t.columns;
    expect(site.text?.length).toBe(t.rowCount);
    expect(site.text?.[b.quotedLine]).toBe('kiln\r\nΩ');
    expect(site.text?.[t.rowCount - 1]).toBe(`S${String((b.rows - 1) % 50).padStart(2, '0')}`);
    // each block repeats the generator's numbers; sums per block must match it
    for (const k of [0, Math.floor(blocks / 2), blocks - 1]) {
      let sy = 0;
      let sz = 0;
      for (let j = k * b.rows; j < (k + 1) * b.rows; j++) {
        sy += y.values[j];
        sz += z.values[j];
        if (i.values[j] !== j - k * b.rows) throw new Error(`row ${j}: i = ${i.values[j]}`);
      }
      expect(sy).toBe(b.sumY);
      expect(sz).toBe(b.sumZ);
    }
    // file lines: the header is line 1; the quoted CRLF makes its record two lines long
    const perBlock = b.rows + 1;
    expect(t.lines[0]).toBe(2);
    expect(t.lines[b.quotedLine + 1]).toBe(2 + b.quotedLine + 2);
    expect(t.lines[t.rowCount - 1]).toBe(1 + blocks * perBlock);

    // SHA-256 of the bytes read independently (node:crypto, 8 MiB reads)
    const hash = createHash('sha256');
    const buf = Buffer.alloc(8 << 20);
    const rd = openSync(path, 'r');
    for (let got; (got = readSync(rd, buf, 0, buf.length, null)) > 0; ) hash.update(buf.subarray(0, got));
    closeSync(rd);
    expect(r.data.sha256).toBe(hash.digest('hex'));
    rmSync(path);
  });
});
