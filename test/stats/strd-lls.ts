/**
 * Reader of NIST StRD linear least-squares `.dat` files (certified values and
 * data), from STRD_DIR (default ../shared/strd relative to the repo root).
 * Tests skip loudly when the folder is missing; the data are never copied.
 */
import { existsSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';

export const STRD_DIR = process.env.STRD_DIR ?? resolve(__dirname, '../../../shared/strd');

export interface LlsDataset {
  name: string;
  estimates: number[];
  stderrs: number[];
  residualSd: number;
  rSquared: number;
  residualSs: number;
  residualDof: number;
  /** Columns as in the file: y first, then x. */
  y: number[];
  x: number[];
}

export function strdAvailable(name: string): boolean {
  return existsSync(resolve(STRD_DIR, 'lls', `${name}.dat`));
}

export function readLls(name: string): LlsDataset {
  const lines = readFileSync(resolve(STRD_DIR, 'lls', `${name}.dat`), 'utf8').split(/\r?\n/);
  const range = /Data\s+\(lines (\d+) to (\d+)\)/.exec(lines.join('\n'));
  if (!range) throw new Error(`${name}: no data line range`);
  const estimates: number[] = [];
  const stderrs: number[] = [];
  let residualSd = NaN;
  let rSquared = NaN;
  let residualSs = NaN;
  let residualDof = NaN;
  for (const line of lines) {
    const b = /^\s+B\d+\s+(\S+)\s+(\S+)/.exec(line);
    if (b) {
      estimates.push(Number(b[1]));
      stderrs.push(Number(b[2]));
    }
    const sd = /Standard Deviation\s+(\S+)\s*$/.exec(line);
    if (sd && /^\s+Standard Deviation/.test(line)) residualSd = Number(sd[1]);
    const r2 = /R-Squared\s+(\S+)/.exec(line);
    if (r2) rSquared = Number(r2[1]);
    const res = /^Residual\s+(\d+)\s+(\S+)/.exec(line);
    if (res) {
      residualDof = Number(res[1]);
      residualSs = Number(res[2]);
    }
  }
  const y: number[] = [];
  const x: number[] = [];
  for (let k = Number(range[1]); k <= Number(range[2]); k++) {
    const cells = lines[k - 1].trim().split(/\s+/).map(Number);
    y.push(cells[0]);
    x.push(cells[1]);
  }
  return { name, estimates, stderrs, residualSd, rSquared, residualSs, residualDof, y, x };
}
