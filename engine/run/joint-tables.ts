/**
 * Fits over several tables (`fit NAME on A, B, C { … }`): each table is one
 * curve of the fit, as a group of a `per COLUMN` fit is, and the runner fits
 * them as it fits groups - separately first (the groups' shared start and
 * retries), then, when parameters are marked `shared`, jointly by the block
 * Levenberg–Marquardt of engine/run/joint.ts, each table one block.
 *
 * Here: the rows of each table read as that table's group (its label the
 * table's name), and the fit as its groups are fitted (one block, the
 * `shared` parameters marked across groups). Each table is read on its own,
 * so every data problem (a column missing from one file, a cell that is not
 * a number, a table without rows) is an error of that table, placed at its
 * name in the `on` list when it is about a column, at its file line or its
 * `data` statement otherwise; a table with fewer usable rows than its own
 * (not shared) parameters is an error at its name. A table that cannot be read stops the fit: a
 * joint fit that silently lost one of its curves would report other numbers
 * than the spec asks for.
 */
import type { FitPlan } from '../../parser/plan';
import type { RunError } from '../result';
import type { LoadedSources } from './datasets';
import { prepareFitData, type ColumnCompiler, type FitData } from './fit-data';
import { errorText, jointText } from '../messages';

/** The plan the tables' curves are fitted with: the first block, `shared` parameters across groups, no grouping column. */
export function tablesFitPlan(fit: FitPlan): FitPlan {
  const { groupBy: _g, ...rest } = fit;
  void _g;
  return {
    ...rest,
    blocks: [fit.blocks[0]],
    parameters: fit.parameters.map((p) => (p.scope === 'shared' ? { ...p, acrossGroups: 'shared' as const } : (({ acrossGroups: _a, ...q }) => q)(p))),
  };
}

export type TablesData = { ok: true; plan: FitPlan; data: FitData[] } | { ok: false; errors: RunError[] };

/** Each table's rows as one group (module comment), in the order of the `on` list. */
export function prepareTables(fit: FitPlan, loaded: LoadedSources, compile: ColumnCompiler): TablesData {
  const errors: RunError[] = [];
  const data: FitData[] = [];
  for (const block of fit.blocks) {
    const src = loaded.tables.get(block.data);
    if (!src) {
      if (!loaded.failed.has(block.data)) errors.push({ code: 'unknown_data', message: errorText.unknownData(fit.name, block.data), range: block.range, fit: fit.name });
      continue;
    }
    // rows are counted against the table's own parameters: the shared ones are fitted from every table
    const own = fit.parameters.filter((p) => !p.fixed && p.scope !== 'shared').length;
    // (every parameter held for reading the rows, so the count below is the one that applies)
    const one: FitPlan = { ...tablesFitPlan(fit), blocks: [block], parameters: fit.parameters.map((p) => ({ ...p, fixed: true })) };
    let prepared;
    try {
      prepared = prepareFitData(one, src.source, src.table, compile);
    } catch (e) {
      prepared = { ok: false as const, errors: [{ code: 'internal', message: errorText.internal(fit.name, e instanceof Error ? e.message : String(e)), range: fit.range, fit: fit.name }] };
    }
    if (!prepared.ok) {
      // a column this table lacks: at the table's name in the `on` list (the model's column is right for the other tables)
      for (const e of prepared.errors) {
        if (e.code === 'missing_column') errors.push({ ...e, range: block.range });
        else errors.push(e);
      }
      continue;
    }
    for (const d of prepared.data) {
      if (d.n < own) errors.push({ code: 'too_few_rows', message: jointText.tableTooFewRows(fit.name, block.data, src.source.path, d.n, own), file: src.source.path, range: block.range, fit: fit.name });
      else data.push({ ...d, group: block.data });
    }
  }
  if (errors.length || loaded.failed.size && fit.blocks.some((b) => loaded.failed.has(b.data))) return { ok: false, errors };
  return { ok: true, plan: tablesFitPlan(fit), data };
}

/** A fit over tables (its plan from `tablesFitPlan`) with a free shared parameter: fitted jointly. */
export function isJointOverTables(plan: FitPlan): boolean {
  return plan.parameters.some((p) => p.acrossGroups === 'shared' && !p.fixed);
}
