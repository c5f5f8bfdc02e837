/**
 * Rows of the benchmark report and their text, Markdown and JSON forms.
 */
import type { Machine } from './harness';

export interface BenchRow {
  /** 1…21, the order of the benchmark list. */
  id: number;
  name: string;
  /** The headline figure compared with the goal, in `unit`. */
  value: number | null;
  unit: string;
  /** Spread of the headline figure over the runs (min, max), when it was measured more than once. */
  spread: [number, number] | null;
  /** Human text of the result, e.g. `ratio 0.62 (4.1 ms vs 6.6 ms)`. */
  text: string;
  goal: string;
  /** Whether the goal is met; null when it could not be measured. */
  met: boolean | null;
  /** Sub-measurements, machine-readable. */
  details: Record<string, unknown>;
  note?: string;
}

export interface BenchReport {
  /** Described at the start of the run. */
  machine: Machine;
  /** Load averages at the end of the run. */
  loadAverageAtEnd: number[];
  quick: boolean;
  rows: BenchRow[];
}

export function fmt(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '-';
  const a = Math.abs(x);
  if (a !== 0 && (a >= 1e6 || a < 1e-3)) return x.toExponential(digits - 1);
  return Number(x.toPrecision(digits)).toString();
}

const metText = (m: boolean | null) => (m === null ? 'n/a' : m ? 'yes' : 'NO');
const spreadText = (r: BenchRow) => (r.spread ? `${fmt(r.spread[0])}–${fmt(r.spread[1])}` : '-');

function machineLine(r: BenchReport): string {
  const m = r.machine;
  const load = (l: number[]) => l.map((v) => v.toFixed(2)).join('/');
  return `${m.cpu}, ${m.cores} cores (available parallelism ${m.availableParallelism}), ${m.memoryGB} GB, ${m.os}, Node ${m.node}, ${m.date}; load average ${load(m.loadAverage)} at start, ${load(r.loadAverageAtEnd)} at end`;
}

/** Plain text table for the terminal. */
export function textReport(report: BenchReport): string {
  const head = ['#', 'benchmark', 'result', 'spread', 'goal', 'met'];
  const body = report.rows.map((r) => [String(r.id), r.name, r.text, spreadText(r), r.goal, metText(r.met)]);
  const widths = head.map((h, j) => Math.max(h.length, ...body.map((b) => b[j].length)));
  const line = (cells: string[]) => cells.map((c, j) => c.padEnd(widths[j])).join('  ').trimEnd();
  const out = [`Leastwise benchmarks${report.quick ? ' (quick smoke run: small sizes, figures not meaningful)' : ''}`, machineLine(report), ''];
  out.push(line(head), line(widths.map((w) => '-'.repeat(w))), ...body.map(line));
  const notes = report.rows.filter((r) => r.note);
  if (notes.length > 0) out.push('', ...notes.map((r) => `(${r.id}) ${r.note}`));
  return out.join('\n') + '\n';
}

const mdCell = (s: string) => s.replace(/\|/g, '\\|');

/** Markdown table with the machine and date above it. */
export function markdownReport(report: BenchReport): string {
  const out = [`Machine: ${machineLine(report)}${report.quick ? ' (quick run)' : ''}`, ''];
  out.push('| # | benchmark | result | spread (min–max) | goal | met |', '|---|---|---|---|---|---|');
  for (const r of report.rows) out.push(`| ${r.id} | ${mdCell(r.name)} | ${mdCell(r.text)} | ${spreadText(r)} | ${mdCell(r.goal)} | ${metText(r.met)} |`);
  const notes = report.rows.filter((r) => r.note);
  if (notes.length > 0) out.push('', ...notes.map((r) => `- (${r.id}) ${r.note}`));
  return out.join('\n') + '\n';
}

export function jsonReport(report: BenchReport): string {
  return JSON.stringify(report, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}
