/**
 * Leastwise benchmarks (a script, not a test):
 *
 *   node build.mjs && node dist/bench.js [--quick] [--json] [--markdown FILE] [--only 1,4,7]
 *
 * Prints one row per benchmark (1-21, see the cases/ modules) with the
 * headline figure, its spread over the runs (min-max), the goal and whether
 * it is met, after a line describing the machine and date. Comparisons are
 * measured side by side in one run and given as ratios. `--json` prints the
 * report as JSON instead of the table; `--markdown FILE` also writes a
 * Markdown table; `--quick` uses small sizes (a smoke run whose figures mean
 * nothing). A case that throws still gets its row, with the error.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describeMachine } from './harness';
import { jsonReport, markdownReport, textReport, type BenchReport, type BenchRow } from './report';
import type { BenchContext } from './cases/context';
import { benchDescent } from './cases/descent';
import { benchPolynomial } from './cases/polynomial';
import { benchKernel } from './cases/kernel';
import { benchEndToEnd } from './cases/end-to-end';
import { benchCsv } from './cases/csv';
import { benchParse } from './cases/parse';
import { benchGroups, benchGroupStarts } from './cases/groups';
import { benchSearch } from './cases/search';
import { benchScaling } from './cases/scaling';
import { benchMemory, isMemoryJob, memoryChild } from './cases/memory';
import { benchPanelPaint } from './cases/panel-paint';
import { benchJsonOutput, benchVersusCubic, benchVersusGroups, benchVersusLogistic } from './cases/versus-script';
import { benchRobustness } from './cases/robustness';
import { benchSuggest } from './cases/suggest';
import { benchDerivedChain } from './cases/derived-chain';
import { benchShards } from './cases/shards';
import { benchBootstrap } from './cases/bootstrap';
import { benchJoint } from './cases/joint';

const CASES: { id: number; name: string; run: (ctx: BenchContext) => Promise<BenchRow> }[] = [
  { id: 1, name: 'LM vs gradient descent', run: benchDescent },
  { id: 2, name: 'Cubic linear LS vs ml-matrix', run: benchPolynomial },
  { id: 3, name: 'Compiled kernel vs hand-written loop', run: benchKernel },
  { id: 4, name: '1e6-point nonlinear fit', run: benchEndToEnd },
  { id: 5, name: 'CSV ingest', run: benchCsv },
  { id: 6, name: 'Parse + check', run: benchParse },
  { id: 7, name: 'Per-group fits', run: benchGroups },
  { id: 8, name: 'Scaling in n and p', run: benchScaling },
  { id: 9, name: 'Peak memory', run: benchMemory },
  { id: 10, name: 'Results panel first paint', run: benchPanelPaint },
  { id: 11, name: 'Robustness suite', run: benchRobustness },
  { id: 12, name: 'Per-group automatic starts', run: benchGroupStarts },
  { id: 13, name: 'Multi-start search', run: benchSearch },
  { id: 14, name: '4PL from CSV vs general-purpose script', run: benchVersusLogistic },
  { id: 15, name: 'Cubic from CSV vs general-purpose script', run: benchVersusCubic },
  { id: 16, name: '--json cost and peak memory', run: benchJsonOutput },
  { id: 17, name: 'Per-group fits vs general-purpose loop', run: benchVersusGroups },
  { id: 18, name: 'Did you mean at scale', run: benchSuggest },
  { id: 19, name: 'Chained derive statements', run: benchDerivedChain },
  { id: 20, name: 'Shards side by side', run: benchShards },
  { id: 21, name: 'Bootstrap refits', run: benchBootstrap },
  { id: 22, name: 'Joint fit, shared parameters', run: benchJoint },
];

interface Args {
  quick: boolean;
  json: boolean;
  markdown: string | null;
  only: Set<number> | null;
}

function parseArgs(argv: string[]): Args | string {
  const args: Args = { quick: false, json: false, markdown: null, only: null };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--quick') args.quick = true;
    else if (a === '--json') args.json = true;
    else if (a === '--markdown' && argv[i + 1]) args.markdown = argv[++i];
    else if (a === '--only' && argv[i + 1]) args.only = new Set(argv[++i].split(',').map(Number));
    else return `unknown or incomplete option ${a}; use --quick, --json, --markdown FILE, --only 1,2,...`;
  }
  return args;
}

function failedRow(id: number, name: string, e: unknown): BenchRow {
  const message = e instanceof Error ? e.message : String(e);
  return { id, name, value: null, unit: '', spread: null, text: `error: ${message}`, goal: '-', met: null, details: { error: message } };
}

async function main(argv: string[]): Promise<number> {
  if (argv[0] === '--child-memory') {
    if (!isMemoryJob(argv[1])) return 2;
    await memoryChild(argv[1], Number(argv[2]), argv[3]);
    return 0;
  }
  const args = parseArgs(argv);
  if (typeof args === 'string') {
    process.stderr.write(args + '\n');
    return 2;
  }
  const machine = describeMachine();
  const tmp = mkdtempSync(path.join(os.tmpdir(), 'leastwise-bench-'));
  const ctx: BenchContext = { quick: args.quick, tmp, log: (m) => process.stderr.write(m + '\n') };
  const rows: BenchRow[] = [];
  try {
    for (const c of CASES) {
      if (args.only && !args.only.has(c.id)) continue;
      ctx.log(`(${c.id}) ${c.name}...`);
      try {
        rows.push({ ...(await c.run(ctx)), id: c.id }); // the list above numbers the rows
      } catch (e) {
        rows.push(failedRow(c.id, c.name, e));
      }
    }
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
  const report: BenchReport = { machine, loadAverageAtEnd: os.loadavg().map((v) => Math.round(v * 100) / 100), quick: args.quick, rows };
  process.stdout.write(args.json ? jsonReport(report) : textReport(report));
  if (args.markdown) writeFileSync(args.markdown, markdownReport(report));
  return 0;
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`bench: ${e instanceof Error ? e.stack ?? e.message : String(e)}\n`);
    process.exitCode = 1;
  },
);
