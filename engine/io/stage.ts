/**
 * All-or-nothing writing of a run's outputs. Each output is first written in
 * full to a temporary file in its target's folder (`stage`), flushed to disk;
 * only when every output of the run is staged are they renamed into place
 * (`commit`). A failure before the commit (`abort`, also on an exception)
 * removes the temporary files and the folders staging created, so earlier
 * files stay as they were and nothing partial is left. A rename within one
 * folder replaces the target atomically (POSIX rename(2)): a reader, or a
 * process killed mid-write, sees the old file or the new one, never half of
 * one.
 *
 * Temporary files are named `.<target name>.leastwise-<pid>-<random>.tmp`
 * and created exclusively (they can never replace a file). A process killed
 * before its commit leaves its temporary file behind; the next stage into the
 * same folder removes such files of processes that no longer run.
 *
 * Targets are written where they really are: a target that is a symbolic
 * link is replaced at the link's destination, so the link stays. A target
 * that is a device or a named pipe (`/dev/null`, `/dev/stdout`) is never
 * renamed over: it is opened and written at commit, after the renames.
 *
 * The caller checks the targets against the run's inputs first (guard.ts).
 */
import { randomBytes } from 'node:crypto';
import { closeSync, existsSync, fchmodSync, fsyncSync, linkSync, mkdirSync, openSync, readdirSync, renameSync, rmdirSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { realLocation } from './identity';

/** Content of a staged file: text, bytes, or a writer that hands out text in chunks (e.g. `writeJson`). */
export type StagedContent = string | Uint8Array | ((write: (chunk: string) => void) => void);

export interface StageHooks {
  /**
   * Test hook: called once, synchronously, when a staged file has received at
   * least `afterBytes` bytes (the CLI's kill-mid-write test pauses here).
   */
  pause?: { afterBytes: number; onPause: (tempPath: string) => void };
}

/** A file or folder of the stage could not be written: `path` is the target (never the temporary name), `code` the system's. */
export class OutputError extends Error {
  readonly code: string;
  constructor(readonly path: string, cause: unknown) {
    const code = (cause as NodeJS.ErrnoException).code ?? 'EIO';
    super(`cannot write ${path}: ${code}`);
    this.code = code;
  }
}

/** Raised when an exclusive target (`exclusive: true`) already exists at commit. */
export class TargetExistsError extends Error {
  readonly code = 'EEXIST';
  constructor(readonly path: string) {
    super(`${path} already exists`);
  }
}

interface Staged {
  temp: string;
  target: string;
  exclusive: boolean;
}

/** Errors of link(2) on file systems that have no hard links (FAT, some network and FUSE file systems). */
const NO_HARD_LINKS = new Set(['EPERM', 'ENOTSUP', 'EOPNOTSUPP', 'ENOSYS', 'EXDEV']);

const TEMP_PATTERN = /^\..+\.leastwise-(\d+)-[0-9a-f]+\.tmp$/;

function processRuns(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** What an existing target is, when it is not a regular file (or nothing there). */
function specialTarget(target: string): 'directory' | 'stream' | null {
  try {
    const st = statSync(target);
    return st.isFile() ? null : st.isDirectory() ? 'directory' : 'stream';
  } catch {
    return null;
  }
}

function writeContent(fd: number, content: StagedContent, onBytes: (total: number) => void): void {
  let bytes = 0;
  const write = (chunk: string | Uint8Array): void => {
    bytes += writeAll(fd, typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk);
    onBytes(bytes);
  };
  if (typeof content === 'function') content(write);
  else write(content);
}

export class OutputStage {
  private readonly staged: Staged[] = [];
  /** Devices and named pipes, written directly at commit. */
  private readonly streams: { target: string; content: StagedContent }[] = [];
  /** Folders created by this stage, deepest last (removed on abort when empty). */
  private readonly created: string[] = [];
  private readonly swept = new Set<string>();
  private paused = false;

  constructor(private readonly hooks: StageHooks = {}) {}

  /** Create `dir` (and missing parents) for outputs; removed again on abort if it stays empty. */
  folder(dir: string): string {
    const real = realLocation(dir);
    let first: string | undefined;
    try {
      first = mkdirSync(real, { recursive: true });
    } catch (e) {
      throw new OutputError(dir, e);
    }
    if (first !== undefined) {
      const made: string[] = [];
      for (let d = real; ; d = dirname(d)) {
        made.push(d);
        if (d === first || dirname(d) === d) break;
      }
      this.created.push(...made.reverse());
    }
    return real;
  }

  /**
   * Write `content` to a temporary file beside `target`. `exclusive`: the
   * commit fails (TargetExistsError) instead of replacing an existing file.
   * Returns the real target path.
   */
  file(target: string, content: StagedContent, options: { exclusive?: boolean } = {}): string {
    const special = specialTarget(target);
    if (special === 'directory') throw new OutputError(target, Object.assign(new Error('is a folder'), { code: 'EISDIR' }));
    if (special === 'stream' && !options.exclusive) {
      this.streams.push({ target, content });
      return target;
    }
    const real = realLocation(target);
    const dir = this.folder(dirname(real));
    this.sweep(dir);
    const temp = join(dir, `.${basename(real)}.leastwise-${process.pid}-${randomBytes(6).toString('hex')}.tmp`);
    let fd: number;
    try {
      fd = openSync(temp, 'wx', 0o666);
    } catch (e) {
      throw new OutputError(target, e);
    }
    this.staged.push({ temp, target: real, exclusive: options.exclusive === true });
    try {
      // keep the permissions of a file being replaced
      if (!options.exclusive && existsSync(real)) {
        try {
          fchmodSync(fd, statSync(real).mode & 0o7777);
        } catch {
          /* a file system without modes: the default ones */
        }
      }
      writeContent(fd, content, (bytes) => {
        const pause = this.hooks.pause;
        if (pause && !this.paused && bytes >= pause.afterBytes) {
          this.paused = true;
          pause.onPause(temp);
        }
      });
      fsyncSync(fd);
    } catch (e) {
      // a system error writing the file; anything else (a renderer's exception) passes as it is
      throw (e as NodeJS.ErrnoException).syscall !== undefined ? new OutputError(target, e) : e;
    } finally {
      closeSync(fd);
    }
    return real;
  }

  /** Move every staged file into place; returns the real target paths in staging order. */
  commit(): string[] {
    try {
      // exclusive targets first: a taken name fails the commit before anything was replaced
      for (const s of this.staged.filter((x) => x.exclusive)) {
        try {
          linkSync(s.temp, s.target);
        } catch (e) {
          const code = (e as NodeJS.ErrnoException).code;
          if (code === 'EEXIST') throw new TargetExistsError(s.target);
          if (!NO_HARD_LINKS.has(code ?? '')) throw new OutputError(s.target, e);
          // file systems without hard links: an existence check, then the rename
          if (existsSync(s.target)) throw new TargetExistsError(s.target);
          renameSync(s.temp, s.target);
          continue;
        }
        unlinkSync(s.temp);
      }
      for (const s of this.staged.filter((x) => !x.exclusive)) {
        try {
          renameSync(s.temp, s.target);
        } catch (e) {
          throw new OutputError(s.target, e);
        }
      }
    } catch (e) {
      this.abort();
      throw e;
    }
    const done = [...this.staged.map((s) => s.target), ...this.streams.map((s) => s.target)];
    this.staged.length = 0;
    this.created.length = 0;
    for (const s of this.streams.splice(0)) {
      let fd: number | undefined;
      try {
        fd = openSync(s.target, 'w');
        writeContent(fd, s.content, () => {});
      } catch (e) {
        throw (e as NodeJS.ErrnoException).syscall !== undefined ? new OutputError(s.target, e) : e;
      } finally {
        if (fd !== undefined) closeSync(fd);
      }
    }
    return done;
  }

  /** Remove every temporary file and the folders this stage created (when empty). */
  abort(): void {
    this.streams.length = 0;
    for (const s of this.staged.splice(0)) {
      try {
        unlinkSync(s.temp);
      } catch {
        /* already moved or gone */
      }
    }
    for (const d of this.created.splice(0).reverse()) {
      try {
        rmdirSync(d);
      } catch {
        /* not empty (or gone): keep it */
      }
    }
  }

  /** Remove temporary files that killed runs left in `dir` (once per folder and stage). */
  private sweep(dir: string): void {
    if (this.swept.has(dir)) return;
    this.swept.add(dir);
    let names: string[];
    try {
      names = readdirSync(dir);
    } catch {
      return;
    }
    for (const name of names) {
      const m = TEMP_PATTERN.exec(name);
      if (!m || Number(m[1]) === process.pid || processRuns(Number(m[1]))) continue;
      try {
        unlinkSync(join(dir, name));
      } catch {
        /* someone else removed it */
      }
    }
  }
}

function writeAll(fd: number, bytes: Uint8Array): number {
  let off = 0;
  while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
  return bytes.length;
}

/** Stage `files` and commit them, or nothing (convenience for one-shot writers such as the editor's export). */
export function writeAllOrNothing(files: { path: string; content: StagedContent; exclusive?: boolean }[], hooks?: StageHooks): string[] {
  const stage = new OutputStage(hooks);
  try {
    for (const f of files) stage.file(f.path, f.content, { exclusive: f.exclusive });
  } catch (e) {
    stage.abort();
    throw e;
  }
  return stage.commit();
}
