/**
 * engine/io: file identity (links and spellings), the output guard, staged
 * all-or-nothing writes and regular-file-only reading.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, linkSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  declaredInputs,
  fileIdentity,
  InputError,
  inputStatus,
  OutputError,
  OutputGuard,
  OutputStage,
  readInputHead,
  readInputHeadSync,
  readInputSync,
  realLocation,
  sameFile,
  TargetExistsError,
  writeAllOrNothing,
} from '../../engine/io';

const made: string[] = [];
function temp(): string {
  const d = mkdtempSync(join(tmpdir(), 'lw-io-'));
  made.push(d);
  return realLocation(d);
}
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

const range = { start: { line: 3, column: 1, offset: 20 }, end: { line: 3, column: 20, offset: 39 } };

describe('engine/io identity', () => {
  it('sees one file through symbolic links, hard links and other spellings', () => {
    const d = temp();
    writeFileSync(join(d, 'data.csv'), 'x,y\n');
    symlinkSync('data.csv', join(d, 'soft.csv'));
    linkSync(join(d, 'data.csv'), join(d, 'hard.csv'));
    mkdirSync(join(d, 'sub'));
    symlinkSync('..', join(d, 'sub', 'up'));
    const id = fileIdentity(join(d, 'data.csv'));
    for (const p of ['soft.csv', 'hard.csv', 'sub/../data.csv', 'sub/up/data.csv', './sub/up/soft.csv']) expect(sameFile(fileIdentity(join(d, p)), id), p).toBe(true);
    writeFileSync(join(d, 'other.csv'), 'x,y\n');
    expect(sameFile(fileIdentity(join(d, 'other.csv')), id)).toBe(false);
  });

  it('identifies a missing file by where it would be, following dangling links and linked folders', () => {
    const d = temp();
    mkdirSync(join(d, 'real'));
    symlinkSync('real', join(d, 'alias'));
    symlinkSync('real/later.csv', join(d, 'dangling.csv'));
    const missing = fileIdentity(join(d, 'real', 'later.csv'));
    expect(missing.ino).toBeUndefined();
    expect(missing.real).toBe(join(d, 'real', 'later.csv'));
    expect(sameFile(fileIdentity(join(d, 'alias', 'later.csv')), missing)).toBe(true);
    expect(sameFile(fileIdentity(join(d, 'dangling.csv')), missing)).toBe(true);
    expect(sameFile(fileIdentity(join(d, 'alias', 'nope', '..', 'later.csv')), missing)).toBe(true);
    // a loop of links ends (no exception)
    symlinkSync('loop-b', join(d, 'loop-a'));
    symlinkSync('loop-a', join(d, 'loop-b'));
    expect(fileIdentity(join(d, 'loop-a')).ino).toBeUndefined();
  });
});

describe('engine/io guard', () => {
  it('lists the spec and every data statement, and refuses outputs that are one of them or each other', () => {
    const d = temp();
    writeFileSync(join(d, 's.lsq'), 'spec');
    writeFileSync(join(d, 'a.csv'), 'a');
    const inputs = declaredInputs(join(d, 's.lsq'), [
      { name: 'a', path: 'a.csv', range },
      { name: 'gone', path: 'gone.csv', range },
      { name: 'abs', path: join(d, 'abs.csv'), range },
    ]);
    expect(inputs.map((i) => i.path)).toEqual([join(d, 's.lsq'), join(d, 'a.csv'), join(d, 'gone.csv'), join(d, 'abs.csv')]);
    const guard = new OutputGuard(inputs);
    expect(guard.check([{ path: join(d, 'out.json'), what: '--json' }])).toEqual([]);
    const clash = guard.check([{ path: join(d, 'gone.csv'), what: '--report' }]);
    expect(clash).toMatchObject([{ kind: 'input', input: { role: 'data', name: 'gone', range }, alias: false }]);
    // accepted outputs are remembered: a later output of the same name clashes with the first
    expect(guard.check([{ path: join(d, '.', 'out.json'), what: 'a chart of --report' }])).toMatchObject([{ kind: 'same_target', first: { what: '--json' } }]);
    expect(guard.check([{ path: join(d, 's.lsq'), what: '--json' }])).toMatchObject([{ kind: 'input', input: { role: 'spec' } }]);
  });
});

describe('engine/io stage', () => {
  it('writes nothing until commit, then every file at once; abort leaves earlier files and removes what it made', () => {
    const d = temp();
    writeFileSync(join(d, 'keep.txt'), 'earlier');
    const stage = new OutputStage();
    stage.file(join(d, 'keep.txt'), 'new');
    stage.file(join(d, 'made', 'deep', 'b.txt'), (write) => {
      write('chunk 1, ');
      write('chunk 2');
    });
    expect(readFileSync(join(d, 'keep.txt'), 'utf8')).toBe('earlier');
    expect(readdirSync(join(d, 'made', 'deep')).every((f) => f.endsWith('.tmp'))).toBe(true);
    stage.abort();
    expect(readdirSync(d)).toEqual(['keep.txt']);
    expect(readFileSync(join(d, 'keep.txt'), 'utf8')).toBe('earlier');

    const again = new OutputStage();
    again.file(join(d, 'keep.txt'), 'new');
    again.file(join(d, 'made', 'b.txt'), (write) => write('chunked'));
    expect(again.commit()).toEqual([join(d, 'keep.txt'), join(d, 'made', 'b.txt')]);
    expect(readFileSync(join(d, 'keep.txt'), 'utf8')).toBe('new');
    expect(readFileSync(join(d, 'made', 'b.txt'), 'utf8')).toBe('chunked');
    expect(readdirSync(d).sort()).toEqual(['keep.txt', 'made']);
  });

  it('removes staged files when a writer throws, and never replaces an exclusive target', () => {
    const d = temp();
    const stage = new OutputStage();
    stage.file(join(d, 'first.json'), '{}');
    expect(() =>
      stage.file(join(d, 'second.md'), () => {
        throw new Error('renderer failed');
      }),
    ).toThrow('renderer failed');
    stage.abort();
    expect(readdirSync(d)).toEqual([]);

    writeFileSync(join(d, 'taken.lsq'), 'mine');
    expect(() => writeAllOrNothing([{ path: join(d, 'taken.lsq'), content: 'theirs', exclusive: true }])).toThrow(TargetExistsError);
    expect(readFileSync(join(d, 'taken.lsq'), 'utf8')).toBe('mine');
    expect(readdirSync(d)).toEqual(['taken.lsq']);
    writeAllOrNothing([{ path: join(d, 'free.lsq'), content: 'spec', exclusive: true }]);
    expect(readFileSync(join(d, 'free.lsq'), 'utf8')).toBe('spec');
  });

  it('writes a device target directly at commit, never renaming over it, and refuses a folder target', () => {
    const d = temp();
    const stage = new OutputStage();
    stage.file('/dev/null', (write) => write('discarded'));
    stage.file(join(d, 'regular.txt'), 'kept');
    expect(stage.commit()).toEqual([join(d, 'regular.txt'), '/dev/null']);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
    expect(readdirSync('/dev').some((f) => f.includes('.leastwise-'))).toBe(false);
    mkdirSync(join(d, 'folder'));
    expect(() => new OutputStage().file(join(d, 'folder'), 'x')).toThrow(OutputError);
    expect(readdirSync(join(d, 'folder'))).toEqual([]);
  });

  it('sweeps temporary files of processes that no longer run, and keeps those of running ones', () => {
    const d = temp();
    const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const deadPid = Number(gone.stdout);
    writeFileSync(join(d, `.out.json.leastwise-${deadPid}-abcdef.tmp`), 'partial');
    writeFileSync(join(d, `.out.json.leastwise-${process.ppid}-abcdef.tmp`), 'a live writer');
    writeFileSync(join(d, 'unrelated.tmp'), 'not ours');
    writeAllOrNothing([{ path: join(d, 'out.json'), content: '{}' }]);
    expect(readdirSync(d).sort()).toEqual([`.out.json.leastwise-${process.ppid}-abcdef.tmp`, 'out.json', 'unrelated.tmp']);
  });
});

describe('engine/io input', () => {
  it('reads regular files and refuses folders and devices before reading', () => {
    const d = temp();
    writeFileSync(join(d, 'f.csv'), 'x,y\n1,2\n');
    symlinkSync('f.csv', join(d, 'link.csv'));
    expect(readInputSync(join(d, 'link.csv')).toString()).toBe('x,y\n1,2\n');
    expect(readInputHeadSync(join(d, 'f.csv'), 3).toString()).toBe('x,y');
    expect(inputStatus(join(d, 'f.csv'))).toEqual({ ok: true, size: 8 });
    const refused = (p: string): InputError => {
      try {
        readInputSync(p);
      } catch (e) {
        return e as InputError;
      }
      throw new Error(`${p} was read`);
    };
    expect(refused(d)).toMatchObject({ code: 'EISDIR', kind: 'directory', message: 'it is a folder, not a regular file (only regular files are read)' });
    expect(refused('/dev/null')).toMatchObject({ code: 'ENOTREG', kind: 'device', message: 'it is a device, not a regular file (only regular files are read)' });
    expect(refused(join(d, 'nope.csv'))).toMatchObject({ code: 'ENOENT', message: 'no such file' });
  });

  it('refuses a named pipe asynchronously without blocking (a deadline fails the test instead of hanging)', async () => {
    const d = temp();
    execFileSync('mkfifo', [join(d, 'pipe.csv')]);
    const deadline = new Promise<never>((_, reject) => setTimeout(() => reject(new Error('reading a named pipe blocked')), 10_000));
    await expect(Promise.race([readInputHead(join(d, 'pipe.csv'), { maxBytes: 1024 }), deadline])).rejects.toMatchObject({ code: 'ENOTREG', kind: 'fifo' });
    expect(inputStatus(join(d, 'pipe.csv'))).toMatchObject({ ok: false, error: { kind: 'fifo' } });
  });

  it('reads a head in chunks until it has enough, never past the cap', async () => {
    const d = temp();
    const line = 'a'.repeat(100_000);
    writeFileSync(join(d, 'wide.csv'), `${line}\n1\n`);
    const whole = await readInputHead(join(d, 'wide.csv'), { maxBytes: 1 << 20, chunkBytes: 4096, enough: (b) => b.includes(10) });
    expect(whole.capped).toBe(false);
    expect(whole.bytes.length).toBeGreaterThan(100_000);
    expect(whole.bytes.length).toBeLessThanOrEqual(100_000 + 4096);
    const capped = await readInputHead(join(d, 'wide.csv'), { maxBytes: 50_000, chunkBytes: 4096, enough: (b) => b.includes(10) });
    expect(capped).toMatchObject({ capped: true });
    expect(capped.bytes.length).toBe(50_000);
    const small = await readInputHead(join(d, 'wide.csv'), { maxBytes: 1 << 20 });
    expect(small).toMatchObject({ capped: false });
    expect(small.bytes.length).toBe(100_003);
    expect(existsSync(join(d, 'wide.csv'))).toBe(true);
  });
});
