/**
 * "Export Report": the last run of a spec as Markdown (the CLI's report,
 * engine/front/views/markdown.ts), JSON (the engine's `resultToJson`) or SVG charts
 * (engine/front/views/charts.ts specs, rendered in the SVG worker with the CLI's
 * renderer; file names from `chartFileName`). The user picks the output
 * files; the spec and the data are never written: local targets are
 * checked against the spec and every data file it declares (engine/io's
 * output guard, logic/export-guard.ts) and written all-or-nothing through
 * temporary files (engine/io stage.ts).
 */
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import * as vscode from 'vscode';
import type { RunResult } from '../../engine/result';
import { writeAllOrNothing, type StagedContent } from '../../engine/io';
import { outputText } from '../../engine/messages';
import { writeJson } from '../../engine/run/json';
import { chartFileName, chartSpecs } from '../../engine/front/views/charts';
import { markdownReport } from '../../engine/front/views/markdown';
import type { LwContext } from '../context';
import { exportRefusal, type ExportInputs } from '../logic/export-guard';
import type { ExportFormat } from '../logic/panel-protocol';
import { isSvgResponse, type SvgRequest, type SvgResponse } from './svg-protocol';

const FORMAT_PICKS: { label: string; description: string; format: ExportFormat }[] = [
  { label: 'Markdown report', description: 'tables, warnings, expectations, provenance', format: 'markdown' },
  { label: 'JSON result', description: 'the full result, machine-readable', format: 'json' },
  { label: 'SVG charts', description: 'every chart of every fit, one file each', format: 'svg' },
];

export async function exportReport(ctx: LwContext, specUri: vscode.Uri, format?: ExportFormat): Promise<vscode.Uri[]> {
  const stored = ctx.runs.get(specUri);
  const name = path.posix.basename(specUri.path);
  if (!stored) {
    void vscode.window.showInformationMessage(`Leastwise: no results for ${name} yet; fit it first.`);
    return [];
  }
  const fmt = format ?? (await vscode.window.showQuickPick(FORMAT_PICKS, { title: `Export the results of ${name}` }))?.format;
  if (!fmt) return [];
  const dir = vscode.Uri.joinPath(specUri, '..');
  const base = name.replace(/\.lsq$/i, '');
  if (fmt === 'svg') return exportSvg(ctx, specUri, stored.run, dir);
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.joinPath(dir, fmt === 'markdown' ? `${base}-report.md` : `${base}-result.json`),
    filters: fmt === 'markdown' ? { Markdown: ['md'] } : { JSON: ['json'] },
    title: `Export ${fmt === 'markdown' ? 'Markdown report' : 'JSON result'}`,
  });
  if (!target) return [];
  const content: StagedContent =
    fmt === 'markdown'
      ? markdownReport(stored.run)
      : (write) => {
          writeJson(stored.run, write);
          write('\n');
        };
  if (!(await writeChecked(ctx, specUri, stored.run, [{ uri: target, content }]))) return [];
  void vscode.window.showInformationMessage(`Leastwise: wrote ${path.posix.basename(target.path)}`, 'Open').then((pick) => {
    if (pick) void vscode.window.showTextDocument(target);
  });
  return [target];
}

/** Saves one chart the results page drew (SVG text, or a PNG data URL) where the user picks, never over an input. */
export async function saveChartImage(ctx: LwContext, specUri: vscode.Uri, format: 'png' | 'svg', name: string, data: string): Promise<vscode.Uri | undefined> {
  const stored = ctx.runs.get(specUri);
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.joinPath(specUri, '..', name),
    filters: format === 'png' ? { 'PNG image': ['png'] } : { 'SVG image': ['svg'] },
    title: `Save chart as ${format.toUpperCase()}`,
  });
  if (!target) return undefined;
  const content = format === 'png' ? Buffer.from(data.slice(data.indexOf(',') + 1), 'base64') : `${data.trimEnd()}\n`;
  const run: RunResult = stored?.run ?? ({ provenance: { data: [] } } as unknown as RunResult);
  if (!(await writeChecked(ctx, specUri, run, [{ uri: target, content }]))) return undefined;
  void vscode.window.showInformationMessage(`Leastwise: wrote ${path.posix.basename(target.path)}`);
  return target;
}

async function exportSvg(ctx: LwContext, specUri: vscode.Uri, run: RunResult, dir: vscode.Uri): Promise<vscode.Uri[]> {
  const picked = await vscode.window.showOpenDialog({ canSelectFiles: false, canSelectFolders: true, defaultUri: dir, openLabel: 'Write SVG charts here', title: 'Folder for the SVG charts' });
  const folder = picked?.[0];
  if (!folder) return [];
  const charts = run.fits.flatMap((f) => chartSpecs(f).map((c) => ({ file: chartFileName(f, c.id), spec: c.spec as unknown as Record<string, unknown>, title: c.title })));
  const existing: string[] = [];
  for (const c of charts) {
    try {
      await vscode.workspace.fs.stat(vscode.Uri.joinPath(folder, c.file));
      existing.push(c.file);
    } catch {
      /* free */
    }
  }
  if (existing.length) {
    const ok = await vscode.window.showWarningMessage(`Replace ${existing.length} existing SVG file(s) in ${path.basename(folder.fsPath)}?`, { modal: true }, 'Replace');
    if (!ok) return [];
  }
  const answer = await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: `Leastwise: drawing ${charts.length} charts` }, () =>
    renderInWorker(ctx.ext.asAbsolutePath(path.join('dist', 'svg-worker.js')), { id: 1, charts }));
  const drawn: { uri: vscode.Uri; content: StagedContent }[] = [];
  for (const f of answer.files) {
    if (f.svg === undefined) ctx.log.error(`SVG export of ${f.file} failed: ${f.error}`);
    else drawn.push({ uri: vscode.Uri.joinPath(folder, f.file), content: f.svg });
  }
  if (!(await writeChecked(ctx, specUri, run, drawn))) return [];
  const written = drawn.map((d) => d.uri);
  const failed = answer.files.length - written.length;
  void vscode.window.showInformationMessage(`Leastwise: wrote ${written.length} SVG chart${written.length === 1 ? '' : 's'}${failed ? ` (${failed} failed, see the Leastwise output)` : ''}.`);
  return written;
}

/** The spec's inputs: its current data statements and those of the run being exported. */
async function exportInputs(ctx: LwContext, specUri: vscode.Uri, run: RunResult): Promise<ExportInputs> {
  let declared: ExportInputs['declared'] = [];
  try {
    declared = (await ctx.analyses.get(await vscode.workspace.openTextDocument(specUri))).plan.data;
  } catch {
    /* the spec cannot be opened: the run's record of its data remains */
  }
  return { specPath: specUri.fsPath, declared, recorded: run.provenance.data };
}

/**
 * Write `files` all at once after checking them against the spec's inputs
 * (local files); other file systems through vscode.workspace.fs, refusing a
 * target that is the spec or a data file by uri. False (with the message
 * shown) when refused.
 */
async function writeChecked(ctx: LwContext, specUri: vscode.Uri, run: RunResult, files: { uri: vscode.Uri; content: StagedContent }[]): Promise<boolean> {
  const inputs = await exportInputs(ctx, specUri, run);
  const local = files.every((f) => f.uri.scheme === 'file') && specUri.scheme === 'file';
  const refusal = local
    ? exportRefusal(inputs, files.map((f) => f.uri.fsPath))
    : files.some((f) => f.uri.toString() === specUri.toString() || [...inputs.declared, ...inputs.recorded].some((d) => vscode.Uri.joinPath(specUri, '..', d.path).toString() === f.uri.toString()))
      ? outputText.isInputUri
      : null;
  if (refusal) {
    void vscode.window.showErrorMessage(`Leastwise: ${refusal}`);
    return false;
  }
  if (local) writeAllOrNothing(files.map((f) => ({ path: f.uri.fsPath, content: f.content })));
  else {
    for (const f of files) {
      const text = typeof f.content === 'function' ? collect(f.content) : f.content;
      await vscode.workspace.fs.writeFile(f.uri, typeof text === 'string' ? Buffer.from(text, 'utf8') : text);
    }
  }
  ctx.log.info(`exported ${files.map((f) => f.uri.fsPath).join(', ')}`);
  return true;
}

function collect(content: (write: (chunk: string) => void) => void): string {
  const parts: string[] = [];
  content((c) => parts.push(c));
  return parts.join('');
}

function renderInWorker(workerPath: string, req: SvgRequest): Promise<SvgResponse> {
  return new Promise((resolve, reject) => {
    const w = new Worker(workerPath);
    w.on('message', (m: unknown) => {
      if (isSvgResponse(m) && m.id === req.id) {
        void w.terminate();
        resolve(m);
      }
    });
    w.on('error', reject);
    w.on('exit', (code) => reject(new Error(`SVG worker exited (code ${code})`)));
    w.postMessage(req);
  });
}
