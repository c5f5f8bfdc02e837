/**
 * Timing helpers for the benchmark script (not a test): medians of repeated
 * runs with their spread (min-max), side-by-side comparisons measured in
 * alternating rounds (A, B, B, A, ...) so that drift of the machine hits both
 * sides alike, and the description of the machine.
 */
import os from 'node:os';
import { performance } from 'node:perf_hooks';

export interface Stats {
  median: number;
  min: number;
  max: number;
  runs: number;
}

export function statsOf(samples: readonly number[]): Stats {
  const s = [...samples].sort((a, b) => a - b);
  const n = s.length;
  if (n === 0) return { median: NaN, min: NaN, max: NaN, runs: 0 };
  const median = n % 2 === 1 ? s[(n - 1) / 2] : (s[n / 2 - 1] + s[n / 2]) / 2;
  return { median, min: s[0], max: s[n - 1], runs: n };
}

/** Milliseconds taken by one call of `fn` (awaited when it returns a promise). */
export async function timeOnce(fn: () => unknown): Promise<number> {
  const t0 = performance.now();
  await fn();
  return performance.now() - t0;
}

/** Times `fn` `runs` times after `warmup` untimed calls. */
export async function measure(fn: () => unknown, runs: number, warmup = 1): Promise<Stats> {
  for (let i = 0; i < warmup; i++) await fn();
  const samples: number[] = [];
  for (let i = 0; i < runs; i++) samples.push(await timeOnce(fn));
  return statsOf(samples);
}

export interface Comparison {
  ours: Stats;
  other: Stats;
  /** Per-round ratio ours/other: median and spread. */
  ratio: Stats;
}

/** Times `ours` and `other` side by side in alternating order; ratio = ours / other per round. */
export async function compare(ours: () => unknown, other: () => unknown, runs: number, warmup = 1): Promise<Comparison> {
  for (let i = 0; i < warmup; i++) {
    await ours();
    await other();
  }
  const a: number[] = [];
  const b: number[] = [];
  const r: number[] = [];
  for (let i = 0; i < runs; i++) {
    let ta: number;
    let tb: number;
    if (i % 2 === 0) {
      ta = await timeOnce(ours);
      tb = await timeOnce(other);
    } else {
      tb = await timeOnce(other);
      ta = await timeOnce(ours);
    }
    a.push(ta);
    b.push(tb);
    r.push(ta / tb);
  }
  return { ours: statsOf(a), other: statsOf(b), ratio: statsOf(r) };
}

export interface Machine {
  cpu: string;
  cores: number;
  availableParallelism: number;
  memoryGB: number;
  os: string;
  node: string;
  date: string;
  /** 1, 5 and 15-minute load averages when described (other processes compete for the cores). */
  loadAverage: number[];
}

export function describeMachine(): Machine {
  const cpus = os.cpus();
  return {
    cpu: cpus[0]?.model.trim() ?? 'unknown',
    cores: cpus.length,
    availableParallelism: os.availableParallelism(),
    memoryGB: Math.round((os.totalmem() / 2 ** 30) * 10) / 10,
    os: `${os.type()} ${os.release()} ${os.arch()}`,
    node: process.version,
    date: new Date().toISOString(),
    loadAverage: os.loadavg().map((v) => Math.round(v * 100) / 100),
  };
}

/** Least-squares slope of log(y) on log(x): the exponent a in y ≈ c·xᵃ. */
export function logLogSlope(x: readonly number[], y: readonly number[]): number {
  const lx = x.map(Math.log);
  const ly = y.map(Math.log);
  const n = lx.length;
  const mx = lx.reduce((s, v) => s + v, 0) / n;
  const my = ly.reduce((s, v) => s + v, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (lx[i] - mx) * (ly[i] - my);
    sxx += (lx[i] - mx) ** 2;
  }
  return sxy / sxx;
}
