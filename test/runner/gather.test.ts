/**
 * Shards and their gathering (engine/groups/shards.ts, engine/runner/gather.ts):
 * the shards of a run cover every group once, and gathering their result JSON
 * gives the unsharded run's result byte for byte (JSON aside from the timing
 * fields `startedAt` and `elapsedMs`), its summary text and its report; every
 * way the shards can fail to belong together is a message naming the shard.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { gatherShards, runPlanSync, type ShardFile } from '../../engine/runner';
import { resultToJson } from '../../engine/run/json';
import { shardFromEnvironment, shardRanges, parseShard } from '../../engine/groups/shards';
import { runText } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import { toCsv } from '../../engine/front/views/group-csv';
import { fitSections } from '../../engine/front/views/groups';
import type { RunResult } from '../../engine/result';
import { gaussian, rng } from '../fixtures/random';

/** Invented: decay of a tracer in 37 sealed vials read at 3–20 times each (uneven groups), plus one line fit of a standard. */
function writeData(dir: string): void {
  const u = rng(20261203);
  const z = gaussian(u);
  const lines = ['vial,hours,counts'];
  for (let v = 0; v < 37; v++) {
    const reads = 3 + Math.floor(u() * 18);
    const a = 800 + 400 * u();
    const k = 0.05 + 0.3 * u();
    for (let i = 0; i < reads; i++) {
      const t = i * 1.5;
      lines.push(`V${String(v).padStart(2, '0')},${t},${(a * Math.exp(-k * t) + 40 + 6 * z()).toFixed(2)}`);
    }
  }
  // a vial that cannot be fitted (two reads for three parameters): its failure must travel through the shards too
  lines.push('V99,0,500', 'V99,1,400');
  writeFileSync(path.join(dir, 'vials.csv'), lines.join('\n') + '\n');
  const std = ['level,reading', ...Array.from({ length: 8 }, (_, i) => `${i},${(2.1 + 3.05 * i + 0.05 * z()).toFixed(3)}`)];
  writeFileSync(path.join(dir, 'standard.csv'), std.join('\n') + '\n');
}

const SPEC = `data vials = "vials.csv"
data standard = "standard.csv"

fit decay on vials {
  model counts = background + initial * exp(-rate * hours)
  param background
  param initial
  param rate in [0, inf]
  per vial
}

fit line on standard {
  model reading = offset + slope * level
  param offset
  param slope
}

predict decay at hours = 2, 10
predict line at level = 3.5
derive half_life = log(2) / decay.rate
derive sensitivity = line.slope
expect decay.rate above 0
expect line.r2 above 0.99
`;

let dir: string;
let whole: RunResult;
const plan = () => analyze(SPEC).plan;
const untimed = (json: string) => json.replace(/"startedAt": "[^"]*"/g, '"startedAt": "-"').replace(/"elapsedMs": [0-9.e+-]+/g, '"elapsedMs": 0');

function shardFiles(count: number): ShardFile[] {
  return Array.from({ length: count }, (_, k) => {
    const r = runPlanSync(plan(), { baseDir: dir, specText: SPEC, specPath: 'vials.lsq', shard: { index: k + 1, count }, now: () => new Date(0) });
    return { name: `shard-${k + 1}.json`, value: JSON.parse(resultToJson(r)) };
  });
}
const rerun = (k: number, n: number) => `leastwise fit vials.lsq --shard ${k}/${n} --json shard-${k}.json`;

beforeAll(() => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'lw-gather-'));
  writeData(dir);
  whole = runPlanSync(plan(), { baseDir: dir, specText: SPEC, specPath: 'vials.lsq', now: () => new Date(0) });
});

describe('shardRanges', () => {
  it('cuts the groups into contiguous runs that hold every group exactly once, balanced by rows', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 500 }), { minLength: 0, maxLength: 300 }), fc.integer({ min: 1, max: 64 }), (rows, count) => {
        const ranges = shardRanges(rows, count);
        expect(ranges).toHaveLength(count);
        let at = 0;
        const total = rows.reduce((s, n) => s + n, 0);
        const largest = Math.max(0, ...rows);
        for (const [from, to] of ranges) {
          expect(from).toBe(at);
          expect(to).toBeGreaterThanOrEqual(from);
          const mine = rows.slice(from, to).reduce((s, n) => s + n, 0);
          // a shard's first and last group stick out of its share by at most half a group each
          if (to > from) expect(Math.abs(mine - total / count)).toBeLessThanOrEqual(largest);
          at = to;
        }
        expect(at).toBe(rows.length);
      }),
    );
  });

  it('does not depend on anything but the row counts (the same split in every shard and on every machine)', () => {
    const rows = [5, 9, 1, 30, 2, 2, 2, 17, 8];
    expect(shardRanges(rows, 3)).toEqual(shardRanges([...rows], 3));
    // 76 rows, shares of 25⅓: the middle rows 2.5, 9.5, 14.5 | 30, 46, 48, 50 | 59.5, 72 (×3/76: below 1 | below 2 | the rest)
    expect(shardRanges(rows, 3)).toEqual([[0, 3], [3, 7], [7, 9]]);
  });
});

describe('the shard of a run', () => {
  it('reads I/N and refuses what is not a shard', () => {
    expect(parseShard('2/4')).toEqual({ ok: true, shard: { index: 2, count: 4 } });
    expect(parseShard('0/4').ok).toBe(false);
    expect(parseShard('5/4').ok).toBe(false);
    expect(parseShard('2').ok).toBe(false);
    expect(parseShard('1/0').ok).toBe(false);
  });

  it('takes a Slurm array task as a shard: the id counted from the lowest id of the array', () => {
    const env = { SLURM_ARRAY_TASK_ID: '12', SLURM_ARRAY_TASK_MIN: '10', SLURM_ARRAY_TASK_MAX: '13', SLURM_ARRAY_TASK_COUNT: '4' };
    expect(shardFromEnvironment(env)).toMatchObject({ ok: true, shard: { index: 3, count: 4 }, source: { kind: 'slurm' } });
    // an array with a step or with gaps would not cover every group
    expect(shardFromEnvironment({ ...env, SLURM_ARRAY_TASK_STEP: '2' })).toMatchObject({ ok: false });
    expect(shardFromEnvironment({ ...env, SLURM_ARRAY_TASK_COUNT: '3' })).toMatchObject({ ok: false });
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '3' })).toMatchObject({ ok: false });
  });

  it('takes a Kubernetes indexed job as a shard when the count is given', () => {
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '0' }, 8)).toMatchObject({ ok: true, shard: { index: 1, count: 8 }, source: { kind: 'kubernetes' } });
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '0' })).toMatchObject({ ok: false });
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '8' }, 8)).toMatchObject({ ok: false });
    expect(shardFromEnvironment({})).toBeUndefined();
  });
});

describe('gathering shards', () => {
  it('the unsharded run has what the comparison needs: groups, a failed group, a single fit, queries, derived quantities, expectations', () => {
    expect(whole.fits.filter((f) => f.name === 'decay')).toHaveLength(38);
    expect(whole.fits.some((f) => f.name === 'decay' && !f.stop.converged)).toBe(true);
    expect(whole.fits.filter((f) => f.name === 'line')).toHaveLength(1);
    expect(whole.queries.length).toBeGreaterThan(38);
    expect(whole.derived!.length).toBeGreaterThan(38);
    expect(whole.expectations.length).toBeGreaterThan(38);
  });

  for (const count of [1, 2, 3, 5, 40]) {
    it(`gives the unsharded result from ${count} shard${count > 1 ? 's' : ''} (JSON byte for byte apart from timing, summary, report, group table)`, () => {
      const files = shardFiles(count).reverse(); // any order on the command line
      const out = gatherShards(plan(), { text: SPEC, path: 'vials.lsq' }, files, rerun);
      if (!out.ok) throw new Error(out.problems.join('\n'));
      expect(untimed(resultToJson(out.result))).toBe(untimed(resultToJson(whole)));
      const strip = (t: string) => t.replace(/\d+(\.\d+)? ?ms\b/g, '- ms');
      expect(strip(runText(out.result))).toBe(strip(runText(whole)));
      expect(strip(markdownReport(out.result))).toBe(strip(markdownReport(whole)));
      const table = (r: RunResult) => fitSections(r).flatMap((s) => (s.kind === 'groups' ? [toCsv(s.table)] : []));
      expect(table(out.result)).toEqual(table(whole));
    });
  }

  it('a shard after the first fits only its groups and leaves the fits without groups to shard 1', () => {
    const [one, two] = shardFiles(2).map((f) => f.value as RunResult);
    expect(one.fits.some((f) => f.name === 'line')).toBe(true);
    expect(two.fits.some((f) => f.name === 'line')).toBe(false);
    expect(two.provenance.data.map((d) => d.name)).toEqual(['vials']);
    const sum = one.provenance.shard!.fits[0].to - one.provenance.shard!.fits[0].from + two.provenance.shard!.fits[0].to - two.provenance.shard!.fits[0].from;
    expect(sum).toBe(38);
  });

  it('names a missing shard with the command that reruns it', () => {
    const files = shardFiles(4).filter((f) => f.name !== 'shard-3.json');
    const out = gatherShards(plan(), { text: SPEC }, files, rerun);
    expect(out).toEqual({ ok: false, problems: [expect.stringMatching(/^shard 3 of 4 is missing .*--shard 3\/4/)] });
  });

  it('names a shard given twice', () => {
    const files = shardFiles(2);
    const out = gatherShards(plan(), { text: SPEC }, [...files, { ...files[1], name: 'copy.json' }], rerun);
    expect(out.ok ? [] : out.problems).toEqual([expect.stringMatching(/^shard 2 of 2 is given twice: shard-2\.json and copy\.json/)]);
  });

  it('refuses shards of another spec text, another count, other data, another version, or a result that is not a shard', () => {
    const files = shardFiles(2);
    const edited = SPEC.replace('above 0.99', 'above 0.98');
    const other = gatherShards(analyze(edited).plan, { text: edited }, files, rerun);
    expect(other.ok ? [] : other.problems[0]).toMatch(/^shard-1\.json: shard 1 was fitted from another text of the spec/);

    const three = shardFiles(3);
    const mixed = gatherShards(plan(), { text: SPEC }, [files[0], three[1], three[2]], rerun);
    expect(mixed.ok ? [] : mixed.problems[0]).toMatch(/shard 2 of 3, but shard-1\.json is shard 1 of 2/);

    const changed = JSON.parse(JSON.stringify(files[1].value));
    changed.provenance.data[0].sha256 = '0'.repeat(64);
    const data = gatherShards(plan(), { text: SPEC }, [files[0], { name: 'changed.json', value: changed }], rerun);
    expect(data.ok ? [] : data.problems[0]).toMatch(/^changed\.json: shard 2 read data vials .*the file changed between the shards/);

    const old = JSON.parse(JSON.stringify(files[1].value));
    old.provenance.toolVersion = '0.0.1';
    const version = gatherShards(plan(), { text: SPEC }, [files[0], { name: 'old.json', value: old }], rerun);
    expect(version.ok ? [] : version.problems[0]).toMatch(/^old\.json: shard 2 was written by leastwise 0\.0\.1/);

    const plain = JSON.parse(resultToJson(whole));
    const notShard = gatherShards(plan(), { text: SPEC }, [{ name: 'whole.json', value: plain }], rerun);
    expect(notShard.ok ? [] : notShard.problems[0]).toMatch(/^whole\.json: not the result of a shard/);
    const junk = gatherShards(plan(), { text: SPEC }, [{ name: 'junk.json', value: [1, 2] }], rerun);
    expect(junk.ok ? [] : junk.problems[0]).toMatch(/^junk\.json: not a result JSON/);
  });

  it('refuses shards whose group ranges do not tile the groups', () => {
    const files = shardFiles(2);
    const bent = JSON.parse(JSON.stringify(files[1].value));
    bent.provenance.shard.fits[0].from += 1;
    const out = gatherShards(plan(), { text: SPEC }, [files[0], { name: 'bent.json', value: bent }], rerun);
    expect(out.ok ? [] : out.problems[0]).toMatch(/^bent\.json: shard 2 of 2 does not hold the groups of fit decay that follow shard 1's/);
  });
});
