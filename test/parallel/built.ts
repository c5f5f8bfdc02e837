/**
 * Builds the bundles (`node build.mjs`) once per test file and copies the
 * engine worker and the benchmark script to a private temporary folder, so a
 * concurrent rebuild of dist/ by another test file cannot hand us a half-written
 * file. Builds are serialised across test files by a lock directory.
 */
import { execFileSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

const LOCK = path.join(os.tmpdir(), 'leastwise-build.lock');
/** A lock older than this is taken as left behind by a killed run, in ms. */
const STALE_MS = 180_000;

async function withLock<T>(fn: () => T): Promise<T> {
  for (;;) {
    try {
      mkdirSync(LOCK);
      break;
    } catch {
      try {
        if (Date.now() - statSync(LOCK).mtimeMs > STALE_MS) rmSync(LOCK, { recursive: true, force: true });
      } catch {
        // the holder removed it meanwhile
      }
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  try {
    return fn();
  } finally {
    rmSync(LOCK, { recursive: true, force: true });
  }
}

export interface Built {
  dir: string;
  worker: string;
  bench: string;
}

/** Runs `node build.mjs` and copies dist/worker.js, dist/bench.js, dist/cli.js and the panel bundle (when built) to a fresh temp folder. */
export async function buildBundles(): Promise<Built> {
  return withLock(() => {
    execFileSync(process.execPath, ['build.mjs'], { cwd: REPO_ROOT, stdio: 'pipe' });
    const dir = mkdtempSync(path.join(os.tmpdir(), 'leastwise-dist-'));
    const copy = (name: string) => {
      const from = path.join(REPO_ROOT, 'dist', name);
      const to = path.join(dir, name);
      if (existsSync(from)) copyFileSync(from, to);
      return to;
    };
    copy('panel.js'); // benchmark 10 serves the page bundle from beside bench.js
    copy('panel.css');
    copy('cli.js'); // benchmarks 14-17 run the CLI as a whole process (it finds worker.js beside it)
    return { dir, worker: copy('worker.js'), bench: copy('bench.js') };
  });
}

export function removeBuilt(b: Built | undefined): void {
  if (b) rmSync(b.dir, { recursive: true, force: true });
}

export function tempDir(prefix: string): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), prefix));
  mkdirSync(dir, { recursive: true });
  return dir;
}
