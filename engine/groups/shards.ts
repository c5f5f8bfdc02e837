/**
 * Shards of a per-group run: which groups shard I of N fits, and where I and
 * N come from (the `--shard I/N` option, or the environment of a Slurm array
 * task or a Kubernetes indexed job).
 *
 * The split. The groups of a per-group fit, in group order (the order of
 * `prepareFitData`: sorted labels), are cut into N contiguous runs balanced
 * by rows: group g, whose rows start after R_g rows of the groups before it
 * and number n_g, goes to shard ⌊N·(R_g + n_g/2)/R⌋ + 1 (R all rows), the
 * shard its middle row falls in. So
 *   - every group is in exactly one shard, and shard I's groups come before
 *     shard I+1's (gathering the shards in order restores the group order);
 *   - the rows of a shard differ from R/N by less than the largest group
 *     (its first and last group each stick out of its share by at most half);
 *   - the split depends only on the group labels and their row counts, which
 *     the data file and the spec fix: it is the same on every machine, for
 *     every thread count, and in every shard of a run.
 * A shard may have no groups (more shards than groups): it writes outputs
 * with none, and gathering still works.
 *
 * Fits without groups are fitted by shard 1 only (the others skip them).
 */
import { shardText } from '../messages';

/** A shard: `index` 1…`count`. */
export interface Shard {
  index: number;
  count: number;
}

/** Which scheduler's environment gave the shard, and its variables (said on stderr). */
export type ShardSource = { kind: 'slurm'; variables: string } | { kind: 'kubernetes'; variables: string };

/** The most shards a run may be cut into (a Slurm array is at most MaxArraySize, 1001 by default; far beyond any useful count). */
export const MAX_SHARDS = 1_000_000;

/**
 * For groups with `rows[g]` rows each (group order), the half-open range
 * [from, to) of group indices of each shard 1…count (entry k-1 for shard k).
 */
export function shardRanges(rows: readonly number[], count: number): Array<[number, number]> {
  const total = rows.reduce((s, n) => s + n, 0);
  const out: Array<[number, number]> = Array.from({ length: count }, () => [0, 0]);
  let before = 0;
  let g = 0;
  for (let k = 0; k < count; k++) {
    const from = g;
    // group g belongs to the first shard k with N·(R_g + n_g/2) < (k+1)·R (integers doubled: exact)
    while (g < rows.length && (total === 0 ? (g * count) < (k + 1) * rows.length : count * (2 * before + rows[g]) < 2 * (k + 1) * total)) {
      before += rows[g];
      g++;
    }
    out[k] = [from, g];
  }
  out[count - 1][1] = rows.length;
  return out;
}

/** `I/N` with 1 ≤ I ≤ N ≤ MAX_SHARDS, or a message saying what is wrong. */
export function parseShard(text: string): { ok: true; shard: Shard } | { ok: false; message: string } {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m) return { ok: false, message: shardText.notIOfN(text) };
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || count > MAX_SHARDS) return { ok: false, message: shardText.countRange(text, MAX_SHARDS) };
  if (index < 1 || index > count) return { ok: false, message: shardText.indexRange(text, count) };
  return { ok: true, shard: { index, count } };
}

type Env = Readonly<Record<string, string | undefined>>;

const wholeNumber = (s: string | undefined): number | undefined => (s !== undefined && /^\d+$/.test(s.trim()) ? Number(s.trim()) : undefined);

/**
 * The shard of this process from its environment, when it runs as a task of
 * a Slurm job array or a Kubernetes indexed job:
 *   - Slurm: `SLURM_ARRAY_TASK_ID` with `SLURM_ARRAY_TASK_MIN`/`_MAX` (shard
 *     = ID − MIN + 1 of MAX − MIN + 1); `SLURM_ARRAY_TASK_COUNT` must agree
 *     when set, and a step other than 1 (`--array=0-15:4`) or a list with
 *     gaps is refused, since the shards would not cover every group;
 *   - Kubernetes: `JOB_COMPLETION_INDEX` (0-based) with the count given by
 *     `--shards N` (the indexed job's `completions`), which Kubernetes does
 *     not put in the environment.
 * `undefined` when neither is present; a message when they are inconsistent.
 */
export function shardFromEnvironment(env: Env, shardsOption?: number): { ok: true; shard: Shard; source: ShardSource } | { ok: false; message: string } | undefined {
  const id = env.SLURM_ARRAY_TASK_ID;
  if (id !== undefined && id !== '') {
    const task = wholeNumber(id);
    const min = wholeNumber(env.SLURM_ARRAY_TASK_MIN);
    const max = wholeNumber(env.SLURM_ARRAY_TASK_MAX);
    const count = wholeNumber(env.SLURM_ARRAY_TASK_COUNT);
    const step = wholeNumber(env.SLURM_ARRAY_TASK_STEP);
    const shown = shardText.slurmVariables(id, env.SLURM_ARRAY_TASK_MIN, env.SLURM_ARRAY_TASK_MAX, env.SLURM_ARRAY_TASK_COUNT);
    if (task === undefined || min === undefined || max === undefined || max < min || task < min || task > max) {
      return { ok: false, message: shardText.slurmNoShard(shown) };
    }
    const span = max - min + 1;
    if ((step !== undefined && step !== 1) || (count !== undefined && count !== span)) {
      return { ok: false, message: shardText.slurmNotConsecutive(shown, step, span) };
    }
    if (shardsOption !== undefined && shardsOption !== span) {
      return { ok: false, message: shardText.slurmDisagrees(shardsOption, span, shown) };
    }
    return { ok: true, shard: { index: task - min + 1, count: span }, source: { kind: 'slurm', variables: shardText.slurmSource(id, env.SLURM_ARRAY_TASK_MIN, env.SLURM_ARRAY_TASK_MAX) } };
  }
  const k8s = env.JOB_COMPLETION_INDEX;
  if (k8s !== undefined && k8s !== '') {
    const index = wholeNumber(k8s);
    if (index === undefined) return { ok: false, message: shardText.k8sNotWhole(k8s) };
    if (shardsOption === undefined) return { ok: false, message: shardText.k8sNeedsShards(k8s) };
    if (index >= shardsOption) return { ok: false, message: shardText.k8sTooLarge(k8s, shardsOption) };
    return { ok: true, shard: { index: index + 1, count: shardsOption }, source: { kind: 'kubernetes', variables: shardText.k8sSource(k8s) } };
  }
  return undefined;
}
