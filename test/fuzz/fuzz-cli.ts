/**
 * Fuzz campaigns (a script, not a test):
 *
 *   npm run fuzz -- [--cases N] [--seed S] [--kind spec|csv] [--workers W]
 *                   [--budget MS] [--out DIR] [--svg-every K] [--only I] [--json]
 *
 * Generates N cases of the kind (default: 1000 spec cases, seed 1) and runs
 * each like `leastwise check` then `fit` with every view of the result
 * (test/fuzz/run-case.ts), in W worker threads (default 2). A case that
 * spends more than its budget (default 20,000 ms) is a hang: its worker is
 * stopped and replaced. The budget is CPU time of the case's own thread
 * (test/fuzz/thread-cpu.ts), so a busy machine does not turn slow
 * cases into hangs; a case whose thread has not run for 3 s past its budget
 * of wall time (a blocked read, a promise that never settles), or that takes
 * 10 times its budget in wall time, is a hang too. Where the thread's CPU
 * time cannot be read, the budget is wall time. Every case that is not ok or located (internal,
 * unlocated, parity, hang) is saved to DIR/<kind>-<seed>-<index>/ (default
 * ./fuzz-cases) with its spec, its data files and what happened, and listed
 * at the end; `--only I` reruns case I alone. Prints a tally by outcome and
 * by case shape; exit code 0 when no case was internal, unlocated, parity or
 * hang, else 1.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { loadCorpus, specCase, FULL, type SpecCase } from './specs';
import { csvCase, CSV_FULL } from './csv';
import { Rand } from './random';
import { OUTCOMES, runCase, type CaseResult, type Outcome } from './run-case';
import { threadCpu, threadFolder } from './thread-cpu';

type Kind = 'spec' | 'csv';

interface Args {
  cases: number;
  seed: number;
  kind: Kind;
  workers: number;
  budget: number;
  out: string;
  svgEvery: number;
  only: number | null;
  json: boolean;
}

const ROOT = path.resolve(__dirname, '..');

function parseArgs(argv: string[]): Args | string {
  const a: Args = { cases: 1000, seed: 1, kind: 'spec', workers: Math.min(2, os.availableParallelism?.() ?? 2), budget: 20_000, out: 'fuzz-cases', svgEvery: 50, only: null, json: false };
  for (let i = 0; i < argv.length; i++) {
    const k = argv[i];
    const v = argv[i + 1];
    const num = (name: string): number | string => (v !== undefined && /^\d+$/.test(v) ? (i++, Number(v)) : `${name} needs a whole number`);
    let r: number | string | undefined;
    if (k === '--cases') r = a.cases = num(k) as number;
    else if (k === '--seed') r = a.seed = num(k) as number;
    else if (k === '--workers') r = a.workers = Math.max(1, num(k) as number);
    else if (k === '--budget') r = a.budget = num(k) as number;
    else if (k === '--svg-every') r = a.svgEvery = num(k) as number;
    else if (k === '--only') r = a.only = num(k) as number;
    else if (k === '--kind' && (v === 'spec' || v === 'csv')) { a.kind = v; i++; }
    else if (k === '--out' && v !== undefined) { a.out = v; i++; }
    else if (k === '--json') a.json = true;
    else return `unknown or incomplete option ${k}; see the comment at the top of test/fuzz/fuzz-cli.ts`;
    if (typeof r === 'string') return r;
    if (typeof r === 'number' && Number.isNaN(r)) return `${k} needs a number`;
  }
  return a;
}

/** The case `index` of a campaign: a pure function of kind, seed and index. */
function makeCase(kind: Kind, seed: number, index: number, corpus: ReturnType<typeof loadCorpus>): SpecCase {
  const r = Rand.forCase(seed, index, kind === 'csv' ? 0x51 : 0);
  return kind === 'csv' ? csvCase(r, CSV_FULL) : specCase(r, corpus, FULL);
}

interface Job { kind: Kind; seed: number; index: number; svg: boolean }
interface Done { index: number; result: CaseResult; shape: string }
/** The first message of a worker: its thread's folder under /proc (null where there is none). */
interface Hello { thread: string | null }

/** Wall time, in budgets, after which a case is a hang whatever its CPU time. */
const WALL_FACTOR = 10;
/** Polls, a second apart, that find the thread not running and its CPU time unchanged before a case is called blocked. */
const BLOCKED_POLLS = 3;

// ---- worker --------------------------------------------------------------------

if (!isMainThread && (workerData as { role?: string })?.role === 'fuzz-worker') {
  const corpus = loadCorpus(ROOT);
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leastwise-fuzz-'));
  parentPort!.postMessage({ thread: threadFolder() } satisfies Hello); // null (not Linux): the driver falls back to wall time
  parentPort!.on('message', async (job: Job | 'stop') => {
    if (job === 'stop') {
      rmSync(dir, { recursive: true, force: true });
      process.exit(0);
    }
    let c: SpecCase;
    try {
      c = makeCase(job.kind, job.seed, job.index, corpus);
    } catch (e) {
      // a fault of the generator, not of the product: reported, the campaign goes on
      const result: CaseResult = { outcome: 'internal', notes: [`internal: the fuzz generator failed: ${(e as Error).message}`], elapsed: 0, checkedClean: false };
      parentPort!.postMessage({ index: job.index, result, shape: 'generator' } satisfies Done);
      return;
    }
    const result = await runCase(c, { dir, svg: job.svg, loader: job.kind === 'csv' });
    parentPort!.postMessage({ index: job.index, result, shape: c.shape } satisfies Done);
  });
}

// ---- driver ----------------------------------------------------------------------

class Slot {
  private worker!: Worker;
  private pending: { job: Job; resolve: (d: Done) => void; timer: NodeJS.Timeout } | null = null;
  /** The worker's thread under /proc, once it said hello. */
  private thread: Promise<string | null> = Promise.resolve(null);

  constructor(private readonly budget: number) {
    this.spawn();
  }

  private spawn(): void {
    this.worker = new Worker(__filename, { workerData: { role: 'fuzz-worker' } });
    let hello!: (t: string | null) => void;
    this.thread = new Promise((r) => (hello = r));
    this.worker.on('message', (d: Done | Hello) => {
      if ('thread' in d) return hello(d.thread);
      const p = this.pending;
      if (!p) return;
      clearTimeout(p.timer);
      this.pending = null;
      p.resolve(d);
    });
    this.worker.on('error', (e) => {
      hello(null); // a worker that died before its hello: the next case runs against wall time
      const p = this.pending;
      if (!p) return;
      clearTimeout(p.timer);
      this.pending = null;
      p.resolve({ index: p.job.index, shape: '?', result: { outcome: 'internal', notes: [`worker crashed: ${e.stack ?? e.message}`], elapsed: 0, checkedClean: false } });
      this.spawn();
    });
  }

  async run(job: Job): Promise<Done> {
    const thread = await this.thread;
    const cpu0 = thread ? threadCpu(thread) : null;
    const t0 = Date.now();
    return new Promise((resolve) => {
      const hang = (why: string): void => {
        this.pending = null;
        void this.worker.terminate();
        this.spawn();
        const elapsed = Date.now() - t0;
        resolve({ index: job.index, shape: '?', result: { outcome: 'hang', notes: [`hang: ${why} (${elapsed} ms wall time)`], elapsed, checkedClean: false } });
      };
      let lastMs = -1;
      let idle = 0;
      const watch = (): void => {
        if (this.pending?.job !== job) return;
        const now = thread && cpu0 ? threadCpu(thread) : null;
        if (!now || !cpu0) return hang(`over the ${this.budget} ms budget of wall time`);
        const used = Math.round(now.ms - cpu0.ms);
        if (used >= this.budget) return hang(`over the ${this.budget} ms budget: ${used} ms of CPU time`);
        if (Date.now() - t0 >= WALL_FACTOR * this.budget) return hang(`over ${WALL_FACTOR} times the ${this.budget} ms budget in wall time (${used} ms of CPU time)`);
        idle = !now.running && now.ms === lastMs ? idle + 1 : 0;
        if (idle >= BLOCKED_POLLS) return hang(`blocked: its thread has not run for ${BLOCKED_POLLS} s past the ${this.budget} ms budget (${used} ms of CPU time)`);
        lastMs = now.ms;
        this.pending.timer = setTimeout(watch, 1000);
      };
      this.pending = { job, resolve, timer: setTimeout(watch, this.budget) };
      this.worker.postMessage(job);
    });
  }

  async stop(): Promise<void> {
    this.worker.postMessage('stop');
    await new Promise((r) => this.worker.once('exit', r));
  }
}

function saveCase(out: string, kind: Kind, seed: number, d: Done, c: SpecCase): string {
  const dir = path.resolve(out, `${kind}-${seed}-${d.index}`);
  mkdirSync(dir, { recursive: true });
  writeFileSync(path.join(dir, 's.lsq'), c.spec);
  for (const f of c.files) if (path.dirname(path.join(dir, f.name)) === dir) writeFileSync(path.join(dir, f.name), f.text);
  writeFileSync(path.join(dir, 'outcome.txt'), `${d.result.outcome} (${c.shape}, ${d.result.elapsed} ms)\n${d.result.notes.join('\n')}\nrerun: npm run fuzz -- --kind ${kind} --seed ${seed} --only ${d.index}\n`);
  return dir;
}

async function main(argv: string[]): Promise<number> {
  const args = parseArgs(argv);
  if (typeof args === 'string') {
    process.stderr.write(args + '\n');
    return 2;
  }
  const corpus = loadCorpus(ROOT);
  const indices = args.only !== null ? [args.only] : Array.from({ length: args.cases }, (_, i) => i);
  const slots = Array.from({ length: Math.min(args.workers, indices.length) }, () => new Slot(args.budget));
  const byOutcome = new Map<Outcome, number>(OUTCOMES.map((o) => [o, 0]));
  const byShape = new Map<string, Map<Outcome, number>>();
  const bad: { index: number; outcome: Outcome; shape: string; dir: string; note: string }[] = [];
  const notesOfOnly: string[] = [];
  let clean = 0;
  let next = 0;
  let done = 0;
  let slowest = 0;
  const t0 = Date.now();
  const tick = () => {
    if (process.stderr.isTTY) process.stderr.write(`\r${done}/${indices.length} cases, ${bad.length} to look at`);
  };
  await Promise.all(slots.map(async (slot) => {
    while (next < indices.length) {
      const index = indices[next++];
      const d = await slot.run({ kind: args.kind, seed: args.seed, index, svg: args.svgEvery > 0 && index % args.svgEvery === 0 });
      const needCase = d.shape === '?' || (d.result.outcome !== 'ok' && d.result.outcome !== 'located');
      let c: SpecCase | undefined; // regenerated only to save it
      try {
        if (needCase) c = makeCase(args.kind, args.seed, index, corpus);
      } catch {
        c = { shape: 'generator', spec: '', files: [] };
      }
      const shape = c ? c.shape : d.shape;
      byOutcome.set(d.result.outcome, (byOutcome.get(d.result.outcome) ?? 0) + 1);
      const s = byShape.get(shape) ?? new Map<Outcome, number>();
      s.set(d.result.outcome, (s.get(d.result.outcome) ?? 0) + 1);
      byShape.set(shape, s);
      if (d.result.checkedClean) clean++;
      slowest = Math.max(slowest, d.result.elapsed);
      if (d.result.outcome !== 'ok' && d.result.outcome !== 'located') {
        const worst = d.result.notes.find((n) => n.startsWith(d.result.outcome)) ?? d.result.notes[0] ?? '';
        bad.push({ index, outcome: d.result.outcome, shape, dir: saveCase(args.out, args.kind, args.seed, d, c!), note: worst });
      }
      if (args.only !== null) notesOfOnly.push(...d.result.notes);
      done++;
      if (done % 200 === 0) tick();
    }
  }));
  await Promise.all(slots.map((s) => s.stop()));
  if (process.stderr.isTTY) process.stderr.write('\n');
  const seconds = (Date.now() - t0) / 1000;
  const report = {
    kind: args.kind, seed: args.seed, cases: indices.length, seconds, checkedClean: clean, slowestMs: slowest,
    outcomes: Object.fromEntries(byOutcome),
    shapes: Object.fromEntries([...byShape].map(([k, v]) => [k, Object.fromEntries(v)])),
    failures: bad,
  };
  if (args.only !== null) {
    const c = makeCase(args.kind, args.seed, args.only, corpus);
    process.stdout.write(`case ${args.only} (${c.shape}):\n${c.spec.slice(0, 3000)}\n`);
  }
  if (args.json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
  else {
    const lines = [
      `fuzz ${args.kind}: ${indices.length} cases, seed ${args.seed}, ${seconds.toFixed(0)} s (${clean} checked clean and were fitted; slowest case ${slowest} ms)`,
      `  ${OUTCOMES.map((o) => `${o} ${byOutcome.get(o)}`).join(', ')}`,
      ...[...byShape].sort().map(([k, v]) => `  ${k}: ${[...v].map(([o, n]) => `${o} ${n}`).join(', ')}`),
      ...bad.slice(0, 40).map((b) => `  ${b.outcome} #${b.index} (${b.shape}) ${b.dir}\n      ${b.note.split('\n')[0]}`),
      bad.length > 40 ? `  … ${bad.length - 40} more in ${path.resolve(args.out)}` : '',
    ];
    process.stdout.write(lines.filter(Boolean).join('\n') + '\n');
    if (notesOfOnly.length) process.stdout.write(notesOfOnly.map((n) => `  ${n}`).join('\n') + '\n');
  }
  return bad.length === 0 ? 0 : 1;
}

if (isMainThread) {
  main(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (e) => {
      process.stderr.write(`fuzz: ${(e as Error).stack ?? String(e)}\n`);
      process.exitCode = 2;
    },
  );
}
