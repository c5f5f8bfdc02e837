/**
 * Reader for NIST StRD regression files (`nls/*.dat`, `lls/*.dat`), using
 * the line numbers stated in each file's `File Format` block. The data are
 * read from STRD_DIR (default ../shared/strd next to the repository root);
 * nothing is copied into the repository.
 */
import { readFileSync, existsSync, readdirSync } from 'node:fs';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';

export type StrdKind = 'nls' | 'lls';

export interface StrdParameter {
  name: string;
  /** Starting values (nls only): [start 1, start 2]. */
  starts: [number, number] | null;
  certified: number;
  /** Certified standard deviation (standard error) of the estimate. */
  certifiedSd: number;
  /** Number of significant digits printed for the certified value. */
  digits: number;
}

export interface StrdDataset {
  name: string;
  kind: StrdKind;
  parameters: StrdParameter[];
  /** Certified residual sum of squares. */
  rss: number;
  rssDigits: number;
  /** Certified residual standard deviation. */
  residualSd: number;
  /** Certified R² (linear problems; NaN for nonlinear ones). */
  rSquared: number;
  /** Residual degrees of freedom of the certified analysis of variance (linear problems; NaN for nonlinear ones). */
  residualDof: number;
  /** Column names of the data block, response first. */
  columns: string[];
  /** Data columns, each of length n, in `columns` order. */
  data: Float64Array[];
  n: number;
}

/** Root of the StRD files: env STRD_DIR, else ../shared/strd relative to the repository root. */
export function strdDir(): string {
  if (process.env.STRD_DIR) return resolve(process.env.STRD_DIR);
  let dir: string;
  try {
    dir = dirname(fileURLToPath(import.meta.url));
  } catch {
    dir = process.cwd();
  }
  // Walk up to the repository root (the folder holding package.json).
  let root = dir;
  for (let i = 0; i < 6 && !existsSync(join(root, 'package.json')); i++) root = dirname(root);
  if (!existsSync(join(root, 'package.json'))) root = process.cwd();
  return resolve(root, '..', 'shared', 'strd');
}

export function strdAvailable(dir = strdDir()): boolean {
  return existsSync(join(dir, 'nls')) && existsSync(join(dir, 'lls'));
}

export function listDatasets(kind: StrdKind, dir = strdDir()): string[] {
  return readdirSync(join(dir, kind)).filter((f) => f.endsWith('.dat')).map((f) => f.slice(0, -4)).sort();
}

/** Significant digits of a printed number such as -0.402962525080404E-04 (15). */
export function significantDigits(text: string): number {
  const mantissa = text.replace(/^[+-]/, '').split(/[eE]/)[0];
  const digits = mantissa.replace('.', '').replace(/^0+/, '');
  // A printed zero ("0.000000000000000") is certified to its decimal places.
  if (digits.length === 0) return Math.max(1, (mantissa.split('.')[1] ?? '').length);
  return digits.length;
}

function range(lines: string[], label: string): [number, number] | null {
  const re = new RegExp(`${label}\\s*\\(lines\\s+(\\d+)\\s+to\\s+(\\d+)\\)`);
  for (const l of lines.slice(0, 12)) {
    const m = re.exec(l);
    if (m) return [Number(m[1]), Number(m[2])];
  }
  return null;
}

const NUM = '([-+]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][-+]?\\d+)?)';

export function parseStrd(text: string, name: string, kind: StrdKind): StrdDataset {
  const lines = text.replace(/\r/g, '').split('\n');
  const cert = range(lines, 'Certified Values');
  const dataRange = range(lines, 'Data');
  if (!cert || !dataRange) throw new Error(`${name}: no File Format line ranges`);
  const block = lines.slice(cert[0] - 1, cert[1]);
  const parameters: StrdParameter[] = [];
  let rss = NaN;
  let rssText = '';
  let residualSd = NaN;
  let rSquared = NaN;
  let residualDof = NaN;
  const paramRe = kind === 'nls'
    ? new RegExp(`^\\s*(b\\d+)\\s*=\\s*${NUM}\\s+${NUM}\\s+${NUM}\\s+${NUM}`)
    : new RegExp(`^\\s*(B\\d+)\\s+${NUM}\\s+${NUM}`);
  for (let i = 0; i < block.length; i++) {
    const l = block[i];
    const m = paramRe.exec(l);
    if (m && kind === 'nls') {
      parameters.push({ name: m[1], starts: [Number(m[2]), Number(m[3])], certified: Number(m[4]), certifiedSd: Number(m[5]), digits: significantDigits(m[4]) });
      continue;
    }
    if (m) {
      parameters.push({ name: m[1], starts: null, certified: Number(m[2]), certifiedSd: Number(m[3]), digits: significantDigits(m[2]) });
      continue;
    }
    let k = new RegExp(`Residual Sum of Squares:\\s*${NUM}`).exec(l);
    if (k) { rss = Number(k[1]); rssText = k[1]; continue; }
    k = new RegExp(`Residual Standard Deviation:\\s*${NUM}`).exec(l);
    if (k) { residualSd = Number(k[1]); continue; }
    k = new RegExp(`^\\s*Standard Deviation\\s+${NUM}`).exec(l);
    if (k && /Residual/.test(block[i - 1] ?? '')) { residualSd = Number(k[1]); continue; }
    k = new RegExp(`^Residual\\s+(\\d+)\\s+${NUM}\\s+${NUM}`).exec(l);
    if (k) { residualDof = Number(k[1]); rss = Number(k[2]); rssText = k[2]; continue; }
    k = new RegExp(`R-Squared\\s+${NUM}`).exec(l);
    if (k) { rSquared = Number(k[1]); continue; }
  }
  // Column names from the "Data:" header line just before the data rows.
  const header = lines[dataRange[0] - 2] ?? '';
  const columns = header.replace(/^Data:\s*/, '').trim().split(/\s+/);
  const rows = lines.slice(dataRange[0] - 1, dataRange[1]).filter((l) => l.trim() !== '');
  const n = rows.length;
  const data = columns.map(() => new Float64Array(n));
  rows.forEach((row, i) => {
    const cells = row.trim().split(/\s+/).map(Number);
    if (cells.length !== columns.length || cells.some((v) => !Number.isFinite(v))) throw new Error(`${name}: bad data row ${i + 1}`);
    cells.forEach((v, j) => { data[j][i] = v; });
  });
  if (parameters.length === 0 || !Number.isFinite(rss)) throw new Error(`${name}: certified values not found`);
  return { name, kind, parameters, rss, rssDigits: significantDigits(rssText), residualSd, rSquared, residualDof, columns, data, n };
}

export function readStrd(kind: StrdKind, name: string, dir = strdDir()): StrdDataset {
  return parseStrd(readFileSync(join(dir, kind, `${name}.dat`), 'latin1'), name, kind);
}

/** A linear StRD problem with one predictor (Norris, Pontius, …) in the shape the statistics tests use. */
export interface LinearStrd {
  name: string;
  estimates: number[];
  stderrs: number[];
  residualSd: number;
  rSquared: number;
  residualSs: number;
  residualDof: number;
  y: number[];
  x: number[];
}

export function readLinear(name: string, dir = strdDir()): LinearStrd {
  const d = readStrd('lls', name, dir);
  return {
    name,
    estimates: d.parameters.map((p) => p.certified),
    stderrs: d.parameters.map((p) => p.certifiedSd),
    residualSd: d.residualSd,
    rSquared: d.rSquared,
    residualSs: d.rss,
    residualDof: d.residualDof,
    y: Array.from(d.data[0]),
    x: Array.from(d.data[1]),
  };
}
