/**
 * "New Spec from CSV": pick a CSV, then the x column, the y column and a
 * model template (QuickPicks), and for the polynomial its degree (an input
 * box, logic/new-spec-degree.ts); the spec is written by the shared scaffolder
 * (engine/templates `scaffoldSpec`, the same as the CLI's `new`) into a NEW
 * file next to the CSV (`<csv name>.lsq`, or `-2`, `-3`… when taken) and
 * opened. Needs a trusted workspace (it reads a data file and writes a
 * file). The CSV is only read, and only when it is a regular file, and only
 * its start: the header and the first rows (engine/data `sampleFromBytes`,
 * the same sample as the CLI's `new`), read asynchronously, so a CSV of any
 * size works. A local spec is written through engine/io (checked against the
 * CSV by file identity, staged, linked into place only while the name is free).
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import { sampleFromBytes, SAMPLE_MAX_BYTES, SAMPLE_ROWS } from '../engine/data';
import { clashMessage, OutputGuard, readInputHead, writeAllOrNothing } from '../engine/io';
import { polynomial, scaffoldSpec, TEMPLATES, type Template } from '../engine/templates';
import { DIGITS, formatNumber } from '../engine/format';
import { degreeInputError, degreePrompt, maxDegreeFor, polynomialFor } from './logic/new-spec-degree';
import type { LwContext } from './context';
import { requireTrust } from './trust';

/** Largest CSV read whole from a file system other than the local one (vscode.workspace.fs reads only whole files). */
const MAX_REMOTE_CSV_BYTES = 200 * 1024 * 1024;

/**
 * The first bytes of the CSV (at most SAMPLE_MAX_BYTES) and whether the file
 * goes on after them: local files through engine/io (regular files only,
 * asynchronous), others through vscode.workspace.fs.
 */
async function readCsvStart(csv: vscode.Uri): Promise<{ bytes: Uint8Array; more: boolean }> {
  if (csv.scheme === 'file') {
    const head = await readInputHead(csv.fsPath, { maxBytes: SAMPLE_MAX_BYTES, chunkBytes: 1 << 20 });
    return { bytes: head.bytes, more: head.capped };
  }
  const stat = await vscode.workspace.fs.stat(csv);
  if (!(stat.type & vscode.FileType.File)) throw new Error('it is not a regular file (only regular files are read)');
  if (stat.size > MAX_REMOTE_CSV_BYTES) throw new Error(`it is larger than ${MAX_REMOTE_CSV_BYTES / 1024 / 1024} MB; write the spec by hand`);
  const all = await vscode.workspace.fs.readFile(csv);
  return { bytes: all.subarray(0, SAMPLE_MAX_BYTES), more: all.length > SAMPLE_MAX_BYTES };
}

export async function newSpecFromCsv(ctx: LwContext, arg?: unknown): Promise<vscode.Uri | undefined> {
  if (!(await requireTrust('newSpec'))) return undefined;
  const csv = await pickCsv(arg);
  if (!csv) return undefined;
  let start: { bytes: Uint8Array; more: boolean };
  try {
    start = await readCsvStart(csv);
  } catch (e) {
    void vscode.window.showErrorMessage(`Leastwise: cannot read ${path.posix.basename(csv.path)}: ${e instanceof Error ? e.message : String(e)}`);
    return undefined;
  }
  const parsed = sampleFromBytes(start.bytes, start.more, { file: path.posix.basename(csv.path) });
  if (!parsed.ok) {
    void vscode.window.showErrorMessage(`Leastwise: cannot read ${path.posix.basename(csv.path)}: ${parsed.errors[0]?.message ?? 'unknown error'}`);
    return undefined;
  }
  const table = parsed.table;
  const numeric = table.columns.filter((c) => c.nonNumeric === 0 || c.nonNumeric < table.rowCount / 2);
  if (numeric.length < 2) {
    void vscode.window.showErrorMessage('Leastwise: the CSV needs at least two numeric columns.');
    return undefined;
  }
  const col = (c: (typeof numeric)[number]) => ({ label: c.name, description: summarize(c.values) });
  const x = await vscode.window.showQuickPick(numeric.map(col), { title: 'New spec (1/3): predictor column (x)', placeHolder: 'the column the response varies with', ignoreFocusOut: true });
  if (!x) return undefined;
  const y = await vscode.window.showQuickPick(numeric.filter((c) => c.name !== x.label).map(col), { title: 'New spec (2/3): response column (y)', placeHolder: 'the measured column to model', ignoreFocusOut: true });
  if (!y) return undefined;
  const t = await vscode.window.showQuickPick(TEMPLATES.map((tp) => ({ label: tp.id === 'polynomial' ? 'polynomial' : tp.title, description: tp.id === 'polynomial' ? 'c0 + c1·x + … + cn·x^n, degree n chosen next' : tp.formula, id: tp.id })), { title: 'New spec (3/3): model', matchOnDescription: true, ignoreFocusOut: true });
  if (!t) return undefined;
  const xs = table.columns.find((c) => c.name === x.label)!.values;
  const ys = table.columns.find((c) => c.name === y.label)!.values;
  const template = t.id === 'polynomial' ? await pickDegree(xs, ys) : TEMPLATES.find((tp) => tp.id === t.id)!;
  if (!template) return undefined;
  const result = scaffoldSpec({ template, dataPath: path.posix.basename(csv.path), headers: table.headers, x: x.label, y: y.label, xValues: xs, yValues: ys });
  if (!result.ok) {
    void vscode.window.showErrorMessage(`Leastwise: ${result.message}`);
    return undefined;
  }
  const target = await freeName(csv);
  if (target.scheme === 'file') {
    const clashes = new OutputGuard([{ role: 'file', path: csv.fsPath }]).check([{ path: target.fsPath, what: 'the new spec' }]);
    if (clashes.length) {
      void vscode.window.showErrorMessage(`Leastwise: ${clashMessage(clashes[0], (p) => path.basename(p))}`);
      return undefined;
    }
    writeAllOrNothing([{ path: target.fsPath, content: result.text, exclusive: true }]);
  } else await vscode.workspace.fs.writeFile(target, Buffer.from(result.text, 'utf8'));
  ctx.log.info(`new spec ${target.fsPath} (${template.id}, ${y.label} against ${x.label}; starting values from ${parsed.complete ? 'every row' : `the first ${SAMPLE_ROWS} rows`})`);
  await vscode.window.showTextDocument(target);
  return target;
}

/** The polynomial of the degree typed in an input box (logic/new-spec-degree.ts); undefined when cancelled. */
async function pickDegree(xs: Float64Array, ys: Float64Array): Promise<Template | undefined> {
  const max = maxDegreeFor(xs, ys);
  // too few rows even for a line: the scaffolder says how many are needed
  if (max < 1) return polynomial(1);
  const text = await vscode.window.showInputBox({ ...degreePrompt(max), ignoreFocusOut: true, validateInput: (v) => degreeInputError(v, max) });
  return text === undefined ? undefined : polynomialFor(text, max) ?? undefined;
}

async function pickCsv(arg?: unknown): Promise<vscode.Uri | undefined> {
  if (arg instanceof vscode.Uri) return arg;
  const active = vscode.window.activeTextEditor?.document.uri;
  if (active && /\.(csv|tsv|txt)$/i.test(active.path)) return active;
  const picked = await vscode.window.showOpenDialog({ canSelectMany: false, filters: { 'CSV data': ['csv', 'tsv', 'txt'] }, title: 'New spec from a CSV file' });
  return picked?.[0];
}

/** `<base>.lsq` next to the CSV, or `<base>-2.lsq`, … — never an existing file. */
async function freeName(csv: vscode.Uri): Promise<vscode.Uri> {
  const dir = vscode.Uri.joinPath(csv, '..');
  const base = path.posix.basename(csv.path).replace(/\.[^.]*$/, '');
  for (let i = 1; ; i++) {
    const candidate = vscode.Uri.joinPath(dir, `${base}${i === 1 ? '' : `-${i}`}.lsq`);
    try {
      await vscode.workspace.fs.stat(candidate);
    } catch {
      return candidate;
    }
  }
}

function summarize(v: Float64Array): string {
  let lo = Infinity;
  let hi = -Infinity;
  let n = 0;
  for (const x of v) {
    if (!Number.isFinite(x)) continue;
    lo = Math.min(lo, x);
    hi = Math.max(hi, x);
    n++;
  }
  return n ? `${n} values, ${formatNumber(lo, DIGITS.statistic)} … ${formatNumber(hi, DIGITS.statistic)}` : 'no numbers';
}
