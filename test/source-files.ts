/** The product's source files, for the tests that check rules on the tree itself (architecture.test.ts, homes.test.ts). */
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/** Every .ts file under the folders `tops` (repo-relative, forward slashes), in directory order. */
export function tsFilesUnder(tops: readonly string[]): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(path.join(ROOT, dir))) {
      const rel = `${dir}/${name}`;
      if (statSync(path.join(ROOT, rel)).isDirectory()) walk(rel);
      else if (name.endsWith('.ts')) out.push(rel);
    }
  };
  for (const top of tops) walk(top);
  return out;
}
