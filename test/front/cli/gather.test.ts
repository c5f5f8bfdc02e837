/**
 * `leastwise fit --shard I/N` and `leastwise gather` on the command line: the
 * shards' JSON joined gives the unsharded run's JSON (timing aside), group
 * table and summary; the shard from a Slurm array task's or a Kubernetes
 * indexed job's environment, said on stderr; a missing shard named with the
 * command that reruns it; a shard file never overwritten; the result schema
 * holds for a shard's JSON.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../../engine/front/cli/main';
import { EXIT, memoryIo } from '../../../engine/front/cli/io';
import { cleanTemp, cli, tempDir, validateResult } from './helpers';

afterAll(cleanTemp);

/** Invented: leak-down test of 23 valve bodies, pressure decaying to a floor; 6–14 reads per body. */
function valves(): string {
  const lines = ['body,seconds,kpa'];
  for (let b = 0; b < 23; b++) {
    const reads = 6 + (b * 5) % 9;
    const drop = 60 + 3 * (b % 5);
    const tau = 20 + 4 * (b % 7);
    for (let i = 0; i < reads; i++) {
      const t = 5 * i;
      lines.push(`B${String(b + 1).padStart(2, '0')},${t},${(300 + drop * Math.exp(-t / tau) + 0.2 * Math.sin(7.7 * (b + 1) * (i + 1))).toFixed(3)}`);
    }
  }
  return lines.join('\n') + '\n';
}

const SPEC = `# Leak-down per valve body (invented)
data rig = "leak.csv"

fit leak on rig {
  model kpa = floor + drop * exp(-seconds / tau)
  param floor = 300 [kPa]
  param drop = 50 [kPa]
  param tau = 25 in [0.1, 1000] [s]
  per body
}

derive leak_rate = leak.drop / leak.tau [kPa/s]
expect leak.tau above 1
`;

let dir: string;
const untimed = (json: string) => json.replace(/"startedAt": "[^"]*"/g, '"startedAt": "-"').replace(/"elapsedMs": [0-9.e+-]+/g, '"elapsedMs": 0');

async function withEnv(env: Record<string, string>, ...argv: string[]) {
  const io = memoryIo(dir);
  io.env = env;
  const code = await runCli(argv, io);
  return { code, stdout: io.stdoutText(), stderr: io.stderrText() };
}

beforeAll(() => {
  dir = tempDir('lw-gather-');
  writeFileSync(join(dir, 'leak.csv'), valves());
  writeFileSync(join(dir, 'leak.lsq'), SPEC);
});

describe('fit --shard and gather', () => {
  it('three shards gathered give the unsharded JSON, group table and summary', async () => {
    const whole = await cli(dir, 'fit', 'leak.lsq', '--json', 'whole.json', '--groups', 'whole.csv', '--threads', '1');
    expect(whole.code).toBe(EXIT.ok);
    for (const k of [1, 2, 3]) {
      const r = await cli(dir, 'fit', 'leak.lsq', '--shard', `${k}/3`, '--json', `s${k}.json`, '--threads', '1');
      expect(r.code).toBe(EXIT.ok);
      expect(r.stderr).toMatch(new RegExp(`shard ${k} of 3: groups \\d+–\\d+ of 23 of fit leak`));
      const value = JSON.parse(readFileSync(join(dir, `s${k}.json`), 'utf8'));
      expect(validateResult(value).errors).toBe('');
      expect(value.provenance.shard).toMatchObject({ index: k, count: 3 });
    }
    const g = await cli(dir, 'gather', 'leak.lsq', 's3.json', 's1.json', 's2.json', '--json', 'gathered.json', '--groups', 'gathered.csv');
    expect(g.stderr).not.toMatch(/error/);
    expect(g.code).toBe(EXIT.ok);
    expect(untimed(readFileSync(join(dir, 'gathered.json'), 'utf8'))).toBe(untimed(readFileSync(join(dir, 'whole.json'), 'utf8')));
    expect(readFileSync(join(dir, 'gathered.csv'), 'utf8')).toBe(readFileSync(join(dir, 'whole.csv'), 'utf8'));
    const strip = (t: string) => t.replace(/\d+(\.\d+)? ?ms\b/g, '- ms');
    expect(strip(g.stdout)).toBe(strip(whole.stdout));
  });

  it('names a missing shard with the command that reruns it, and exits 2', async () => {
    for (const k of [1, 2]) await cli(dir, 'fit', 'leak.lsq', '--shard', `${k}/4`, '--json', `q${k}.json`, '--quiet');
    await cli(dir, 'fit', 'leak.lsq', '--shard', '4/4', '--json', 'q4.json', '--quiet');
    const g = await cli(dir, 'gather', 'leak.lsq', 'q1.json', 'q2.json', 'q4.json');
    expect(g.code).toBe(EXIT.inputError);
    expect(g.stderr).toContain('error: shard 3 of 4 is missing (did its task fail or time out?): rerun it with leastwise fit leak.lsq --shard 3/4 --json …, then gather again');
    // rerunning only that shard and gathering again works
    await cli(dir, 'fit', 'leak.lsq', '--shard', '3/4', '--json', 'q3.json', '--quiet');
    const again = await cli(dir, 'gather', 'leak.lsq', 'q1.json', 'q2.json', 'q3.json', 'q4.json', '--quiet');
    expect(again.code).toBe(EXIT.ok);
  });

  it('never writes over a shard file, and reports unreadable or broken shard files', async () => {
    await cli(dir, 'fit', 'leak.lsq', '--shard', '1/1', '--json', 'only.json', '--quiet');
    const before = readFileSync(join(dir, 'only.json'), 'utf8');
    const g = await cli(dir, 'gather', 'leak.lsq', 'only.json', '--json', 'only.json');
    expect(g.code).toBe(EXIT.inputError);
    expect(readFileSync(join(dir, 'only.json'), 'utf8')).toBe(before);
    writeFileSync(join(dir, 'broken.json'), '{"version": 1, ');
    const broken = await cli(dir, 'gather', 'leak.lsq', 'broken.json', 'absent.json');
    expect(broken.code).toBe(EXIT.inputError);
    expect(broken.stderr).toMatch(/cannot read shard result absent\.json/);
    expect(broken.stderr).toMatch(/shard result broken\.json is not valid JSON/);
    expect((await cli(dir, 'gather', 'leak.lsq')).stderr).toMatch(/gather needs the spec and the result JSON of every shard/);
  });

  it('takes the shard from a Slurm array task and says so; --shard 1/1 fits everything', async () => {
    const env = { SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_MAX: '1', SLURM_ARRAY_TASK_COUNT: '2' };
    const r = await withEnv(env, 'fit', 'leak.lsq', '--json', 'slurm-1.json', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stderr).toContain('fitting shard 2 of 2 (from the Slurm array task: SLURM_ARRAY_TASK_ID=1 of 0–1');
    expect(JSON.parse(readFileSync(join(dir, 'slurm-1.json'), 'utf8')).provenance.shard).toMatchObject({ index: 2, count: 2 });
    const all = await withEnv(env, 'fit', 'leak.lsq', '--shard', '1/1', '--json', 'slurm-all.json', '--quiet');
    expect(all.stderr).not.toContain('fitting shard');
    expect(JSON.parse(readFileSync(join(dir, 'slurm-all.json'), 'utf8')).fits).toHaveLength(23);
    const stepped = await withEnv({ ...env, SLURM_ARRAY_TASK_STEP: '2' }, 'fit', 'leak.lsq', '--quiet');
    expect(stepped.code).toBe(EXIT.inputError);
    expect(stepped.stderr).toMatch(/not one run of consecutive task ids/);
  });

  it('takes the shard from a Kubernetes indexed job with --shards N', async () => {
    const r = await withEnv({ JOB_COMPLETION_INDEX: '0' }, 'fit', 'leak.lsq', '--shards', '3', '--json', 'k8s-0.json', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stderr).toContain('fitting shard 1 of 3 (from the Kubernetes indexed job: JOB_COMPLETION_INDEX=0');
    const none = await withEnv({ JOB_COMPLETION_INDEX: '0' }, 'fit', 'leak.lsq', '--quiet');
    expect(none.code).toBe(EXIT.inputError);
    expect(none.stderr).toMatch(/pass --shards N/);
    expect((await cli(dir, 'fit', 'leak.lsq', '--shards', '3')).stderr).toMatch(/--shards N goes with a Kubernetes indexed job/);
  });

  it('refuses a bad --shard, and sharding a spec without per-group fits', async () => {
    expect((await cli(dir, 'fit', 'leak.lsq', '--shard', '4/3')).stderr).toMatch(/--shard 4\/3: the shard must be 1 to 3/);
    writeFileSync(join(dir, 'single.lsq'), 'data rig = "leak.csv"\nfit one on rig {\n  model kpa = a + b * seconds\n  param a\n  param b\n}\n');
    const r = await cli(dir, 'fit', 'single.lsq', '--shard', '1/2');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toMatch(/nothing to share out among shards/);
    const env = await withEnv({ SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_MAX: '1' }, 'fit', 'single.lsq', '--quiet');
    expect(env.code).toBe(EXIT.ok);
    expect(env.stderr).toMatch(/note: this is a Slurm array task, but no fit of this run is fitted per group/);
  });
});
