/**
 * "Export Report": the last run of a spec as Markdown (the CLI's report,
 * engine/views/markdown.ts), JSON (the engine's `resultToJson`) or SVG charts
 * (engine/views/charts.ts specs, rendered in the SVG worker with the CLI's
 * renderer; file names from `chartFileName`). The user picks the output
 * files; the spec and the data are never written.
 */
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import * as vscode from 'vscode';
import type { RunResult } from '../../engine/result';
import { resultToJson } from '../../engine/run/json';
import { chartFileName, chartSpecs } from '../../engine/views/charts';
import { markdownReport } from '../../engine/views/markdown';
import type { LwContext } from '../context';
import type { ExportFormat } from '../panel/protocol';
import { isSvgResponse, type SvgRequest, type SvgResponse } from './svgProtocol';

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
  if (fmt === 'svg') return exportSvg(ctx, stored.run, dir);
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.joinPath(dir, fmt === 'markdown' ? `${base}-report.md` : `${base}-result.json`),
    filters: fmt === 'markdown' ? { Markdown: ['md'] } : { JSON: ['json'] },
    title: `Export ${fmt === 'markdown' ? 'Markdown report' : 'JSON result'}`,
  });
  if (!target) return [];
  const text = fmt === 'markdown' ? markdownReport(stored.run) : `${resultToJson(stored.run)}\n`;
  await vscode.workspace.fs.writeFile(target, Buffer.from(text, 'utf8'));
  void vscode.window.showInformationMessage(`Leastwise: wrote ${path.posix.basename(target.path)}`, 'Open').then((pick) => {
    if (pick) void vscode.window.showTextDocument(target);
  });
  return [target];
}

async function exportSvg(ctx: LwContext, run: RunResult, dir: vscode.Uri): Promise<vscode.Uri[]> {
  const picked = await vscode.window.showOpenDialog({ canSelectFiles: false, canSelectFolders: true, defaultUri: dir, openLabel: 'Write SVG charts here', title: 'Folder for the SVG charts' });
  const folder = picked?.[0];
  if (!folder) return [];
  const charts = run.fits.flatMap((f) => chartSpecs(f).map((c) => ({ file: chartFileName(f, c.id), spec: c.spec as unknown as Record<string, unknown> })));
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
  const written: vscode.Uri[] = [];
  for (const f of answer.files) {
    if (f.svg === undefined) {
      ctx.log.error(`SVG export of ${f.file} failed: ${f.error}`);
      continue;
    }
    const uri = vscode.Uri.joinPath(folder, f.file);
    await vscode.workspace.fs.writeFile(uri, Buffer.from(f.svg, 'utf8'));
    written.push(uri);
  }
  const failed = answer.files.length - written.length;
  void vscode.window.showInformationMessage(`Leastwise: wrote ${written.length} SVG chart${written.length === 1 ? '' : 's'}${failed ? ` (${failed} failed, see the Leastwise output)` : ''}.`);
  return written;
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
