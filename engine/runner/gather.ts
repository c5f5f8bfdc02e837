/**
 * Gathering the shards of a run (`leastwise gather`): the result JSON of
 * each `fit --shard I/N` run is read back (engine/run/json-revive.ts), the
 * shards are checked to belong together and to cover the work once, their
 * fits are put in the order one run gives (plan order; the groups of a
 * per-group fit by shard, which is group order since each shard holds a
 * contiguous run of them, engine/groups/shards.ts), and the stages after
 * fitting (queries, derived quantities, expectations) run on them as they do
 * in one run (run-plan.ts `finishRun`). The result equals that of the
 * unsharded run apart from timing (`startedAt`, the earliest shard's, and
 * each fit's `elapsedMs`); test/runner/gather.test.ts compares the JSON.
 *
 * Every problem is a message naming the shard (its file and index): a shard
 * missing or given twice, shards of different counts, specs, data, fit
 * selections or engine versions, group ranges that do not tile.
 */
import { createHash } from 'node:crypto';
import type { FitPlan, Plan } from '../../parser/plan';
import { RESULT_VERSION, type DerivedResult, type FitResult, type Provenance, type RunError, type RunResult, type ShardInfo } from '../result';
import { TOOL_NAME, TOOL_VERSION } from '../run/version';
import { reviveResult } from '../run/json-revive';
import { finishRun } from './run-plan';

/** One shard's result JSON as read: a name for messages (its path as the user wrote it) and the parsed value. */
export interface ShardFile {
  name: string;
  value: unknown;
}

export type GatherOutcome = { ok: true; result: RunResult } | { ok: false; problems: string[] };

interface Shard {
  file: string;
  result: RunResult;
  info: ShardInfo;
}

/** How a user reruns shard `index` (for the message of a missing one). */
export type RerunHint = (index: number, count: number) => string;

/**
 * Join `files` into the result of one run of `plan` (the plan of the spec
 * whose text is `specText`; `specPath` as the unsharded run would record it).
 */
export function gatherShards(plan: Plan, spec: { text: string; path?: string }, files: readonly ShardFile[], rerun: RerunHint): GatherOutcome {
  const problems: string[] = [];
  const shards: Shard[] = [];
  const specSha256 = createHash('sha256').update(spec.text).digest('hex');
  for (const f of files) {
    const v = f.value as Partial<RunResult> | null;
    const prov = v && typeof v === 'object' ? (v.provenance as Partial<Provenance> | undefined) : undefined;
    if (!v || typeof v !== 'object' || !prov || typeof prov !== 'object' || !Array.isArray(v.fits)) {
      problems.push(`${f.name}: not a result JSON of leastwise fit`);
      continue;
    }
    if (v.version !== RESULT_VERSION) {
      problems.push(`${f.name}: result version ${String(v.version)}, this leastwise reads version ${RESULT_VERSION}`);
      continue;
    }
    if (!prov.shard) {
      problems.push(`${f.name}: not the result of a shard (it has no provenance.shard; write it with leastwise fit --shard I/N --json)`);
      continue;
    }
    if (prov.tool !== TOOL_NAME || prov.toolVersion !== TOOL_VERSION) {
      problems.push(`${f.name}: shard ${prov.shard.index} was written by ${prov.tool} ${prov.toolVersion}; this is ${TOOL_NAME} ${TOOL_VERSION} (run every shard and the gathering with one version)`);
      continue;
    }
    if (prov.specSha256 !== specSha256) {
      problems.push(`${f.name}: shard ${prov.shard.index} was fitted from another text of the spec (SHA-256 ${prov.specSha256?.slice(0, 12)}…, this spec ${specSha256.slice(0, 12)}…); rerun it with this spec`);
      continue;
    }
    shards.push({ file: f.name, result: reviveResult(v) as RunResult, info: prov.shard });
  }
  if (problems.length) return { ok: false, problems };
  if (shards.length === 0) return { ok: false, problems: ['no shard results given'] };

  // one count, each index once
  const count = shards[0].info.count;
  for (const s of shards.slice(1)) {
    if (s.info.count !== count) problems.push(`${s.file}: shard ${s.info.index} of ${s.info.count}, but ${shards[0].file} is shard ${shards[0].info.index} of ${count}`);
  }
  if (problems.length) return { ok: false, problems };
  const byIndex = new Map<number, Shard>();
  for (const s of shards) {
    const first = byIndex.get(s.info.index);
    if (first) problems.push(`shard ${s.info.index} of ${count} is given twice: ${first.file} and ${s.file}`);
    else byIndex.set(s.info.index, s);
  }
  for (let k = 1; k <= count; k++) {
    if (!byIndex.has(k)) problems.push(`shard ${k} of ${count} is missing (did its task fail or time out?): ${rerun(k, count)}, then gather again`);
  }
  if (problems.length) return { ok: false, problems };
  const ordered = Array.from({ length: count }, (_, k) => byIndex.get(k + 1)!);
  const lead = ordered[0];

  // the same fit selection and the same data
  const onlyText = (s: Shard) => JSON.stringify(s.info.only ?? null);
  for (const s of ordered.slice(1)) {
    if (onlyText(s) !== onlyText(lead)) problems.push(`${s.file}: shard ${s.info.index} was run with ${s.info.only ? `--fit ${s.info.only.join(', ')}` : 'every fit'}, shard 1 with ${lead.info.only ? `--fit ${lead.info.only.join(', ')}` : 'every fit'}`);
    for (const d of s.result.provenance.data) {
      const d1 = lead.result.provenance.data.find((x) => x.name === d.name);
      if (d1 && d1.sha256 !== d.sha256) problems.push(`${s.file}: shard ${s.info.index} read data ${d.name} (${d.path}) with SHA-256 ${d.sha256.slice(0, 12)}…, shard 1 with ${d1.sha256.slice(0, 12)}… (the file changed between the shards; rerun them all)`);
    }
  }
  if (problems.length) return { ok: false, problems };

  // the groups of each per-group fit tiled by the shards in order
  const only = lead.info.only ? new Set(lead.info.only) : null;
  const fits = plan.fits.filter((f) => !only || only.has(f.name));
  const results = new Map<string, FitResult[]>();
  for (const fit of fits) {
    if (fit.groupBy === undefined) {
      results.set(fit.name, lead.result.fits.filter((r) => r.name === fit.name));
      continue;
    }
    const parts = ordered.map((s) => s.info.fits.find((x) => x.fit === fit.name));
    const list: FitResult[] = [];
    if (parts.every((p) => p === undefined)) {
      results.set(fit.name, list); // not fitted in any shard (its data failed to load): its errors say why
      continue;
    }
    let at = 0;
    for (let k = 0; k < count; k++) {
      const p = parts[k];
      const s = ordered[k];
      const groups = parts.find((x) => x !== undefined)!.groups;
      if (!p || p.groups !== groups || p.from !== at || p.to < p.from) {
        problems.push(`${s.file}: shard ${k + 1} of ${count} does not hold the groups of fit ${fit.name} that follow shard ${k}'s (${p ? `groups ${p.from + 1}–${p.to} of ${p.groups}` : 'none'}, expected from group ${at + 1} of ${groups})`);
        break;
      }
      const mine = s.result.fits.filter((r) => r.name === fit.name);
      if (mine.length !== p.to - p.from) {
        problems.push(`${s.file}: shard ${k + 1} of ${count} has ${mine.length} results of fit ${fit.name}, but says it fitted ${p.to - p.from} groups`);
        break;
      }
      list.push(...mine);
      at = p.to;
      if (k === count - 1 && at !== groups) problems.push(`${s.file}: the shards hold ${at} of the ${groups} groups of fit ${fit.name}`);
    }
    results.set(fit.name, list);
  }
  if (problems.length) return { ok: false, problems };

  const { shard: _shard, ...leadProvenance } = lead.result.provenance;
  const startedAt = ordered.map((s) => s.result.provenance.startedAt).sort()[0];
  const provenance: Provenance = {
    ...leadProvenance,
    ...(spec.path !== undefined ? { specPath: spec.path } : {}),
    startedAt,
  };
  if (spec.path === undefined) delete provenance.specPath;
  const errors: RunError[] = lead.result.errors.slice(0, lead.info.fitErrors);
  const fitPlans = new Map<string, FitPlan>(fits.map((f) => [f.name, f]));
  const result = finishRun(plan, { fitPlans, results, errors, provenance: orderedProvenance(provenance) });
  return { ok: true, result: { ...result, derived: carriedIntervals(result.derived ?? [], ordered.map((s) => s.result)) } };
}

/**
 * The profile and bootstrap intervals of derived quantities (engine/run/derived-intervals.ts) need the rows of
 * the single fit they read, which only the shard that fitted it had: they are taken from that shard's result,
 * in the order the runner writes them, so the gathered JSON equals one run's.
 */
function carriedIntervals(derived: readonly DerivedResult[], shards: readonly RunResult[]): DerivedResult[] {
  return derived.map((d) => {
    for (const r of shards) {
      const src = (r.derived ?? []).find((x) => x.name === d.name && x.group === d.group && (x.profile || x.bootstrap));
      if (src) return { ...d, ...(src.profile ? { profile: src.profile } : {}), ...(src.bootstrap ? { bootstrap: src.bootstrap } : {}), ...(src.warnings ? { warnings: src.warnings } : {}) };
    }
    return d;
  });
}

/** Provenance with its keys in the order the runner writes them (the JSON of a gathered run is byte-equal to one run's). */
function orderedProvenance(p: Provenance): Provenance {
  return {
    tool: p.tool,
    toolVersion: p.toolVersion,
    ...(p.specPath !== undefined ? { specPath: p.specPath } : {}),
    specSha256: p.specSha256,
    data: p.data,
    startedAt: p.startedAt,
  };
}
