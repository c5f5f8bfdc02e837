/**
 * Invented per-group data for the parallel tests: batches of a decaying
 * signal y = amp·exp(−k·t) + base with per-batch constants and small
 * deterministic noise, written as CSV into a temporary folder, plus the spec.
 */
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { analyze } from '../../parser/index';
import type { Plan } from '../../parser/plan';

export interface GroupFixture {
  dir: string;
  plan: Plan;
  spec: string;
  /** Group labels written, in file order (not sorted). */
  labels: string[];
}

export interface FixtureOptions {
  groups: number;
  /** Rows per group. Default 12. */
  rows?: number;
  /** Extra CSV lines appended verbatim (e.g. a one-row group). */
  extra?: string[];
}

/** Labels deliberately out of order in the file: B007, A003, ... so sorting is visible. */
function label(i: number, groups: number): string {
  const j = (i * 7 + 3) % groups;
  return `${String.fromCharCode(65 + (j % 3))}${String(j).padStart(3, '0')}`;
}

export function writeGroupFixture(dir: string, options: FixtureOptions): GroupFixture {
  const rows = options.rows ?? 12;
  const lines = ['batch,t,y'];
  const labels: string[] = [];
  for (let i = 0; i < options.groups; i++) {
    const g = label(i, options.groups);
    labels.push(g);
    const amp = 3 + (i % 5);
    const k = 0.15 + 0.05 * (i % 7);
    const base = 0.5 + 0.1 * (i % 3);
    for (let r = 0; r < rows; r++) {
      const noise = 0.02 * Math.sin(13.7 * (i + 1) * (r + 1));
      lines.push(`${g},${r},${(amp * Math.exp(-k * r) + base + noise).toFixed(6)}`);
    }
  }
  lines.push(...(options.extra ?? []));
  writeFileSync(path.join(dir, 'batches.csv'), lines.join('\n') + '\n');
  const spec = [
    'data batches = "batches.csv"',
    'fit decay on batches {',
    '  model y = amp * exp(-k * t) + base',
    '  param amp = 4',
    '  param k = 0.3 in [0, 10]',
    '  param base = 0',
    '  per batch',
    '}',
    '',
  ].join('\n');
  const analysis = analyze(spec);
  const errors = analysis.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length > 0) throw new Error(`fixture spec does not check: ${errors.map((e) => e.message).join('; ')}`);
  return { dir, plan: analysis.plan, spec, labels };
}
