/**
 * The between-groups comparison of a joint fit (a `per` fit with `shared`
 * parameters, engine/run/joint.ts) for the results panel: the same blocks as
 * the CLI summary and the Markdown report (engine/front/views/joint.ts
 * `jointBlocks`: the joint solve, the shared estimates, the shared-versus-
 * separate F tests, the pairwise differences and ratios with Fieller's
 * interval, the readings and the caution), so the three views read one
 * source and show the same digits. The panel adds only what it draws
 * differently: which columns hold numbers (aligned on the decimal point,
 * extension/logic/panel-align.ts), and the caution set apart from the readings.
 *
 * Pure: runs in the fit worker, in tests and in the extension host.
 */
import type { RunResult } from '../../engine/result';
import { JOINT_CAUTION, jointBlocks } from '../../engine/front/views/joint';

export interface PanelJointTable {
  title: string;
  headers: string[];
  rows: string[][];
  /** Column indices drawn as numbers (the view's right-aligned columns). */
  numeric: number[];
}

export interface PanelJoint {
  /** The per-group fit the comparison belongs to (its group entry shows it). */
  fit: string;
  heading: string;
  /** The joint solve converged (else the lead says NOT converged and the section is marked). */
  converged: boolean;
  lead: string[];
  tables: PanelJointTable[];
  /** The readings of the tests and the parallelism note, in the views' order. */
  readings: string[];
  /** The caution of every comparison (engine/front/views/joint.ts `JOINT_CAUTION`). */
  caution: string;
}

export function panelJoint(run: RunResult): PanelJoint[] {
  const joint = run.joint ?? [];
  return jointBlocks(joint).map((b, i) => ({
    fit: joint[i].fit,
    heading: b.heading,
    converged: joint[i].stop.converged,
    lead: b.lead,
    tables: b.tables.map((t) => ({ title: t.title, headers: t.headers, rows: t.rows, numeric: t.align.flatMap((a, j) => (a === 'right' ? [j] : [])) })),
    readings: b.notes.filter((n) => n !== JOINT_CAUTION),
    caution: JOINT_CAUTION,
  }));
}
