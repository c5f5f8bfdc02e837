/**
 * The house rules of DEVELOPERS.md ("The shape of the house") checked on the
 * source tree itself: data flows one way, parser → engine → front ends →
 * editor, with no folder cycle, and file names are kebab-case. The rules and
 * the graph are computed from the import statements of every source file, so
 * a new import that breaks them turns this red with the offending edges.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { ROOT, tsFilesUnder } from './source-files';
const SOURCE_TOPS = ['parser', 'engine', 'extension'];

/** Every .ts source file (repo-relative, forward slashes) under the product's folders, plus cli.ts. */
function sourceFiles(): string[] {
  return ['cli.ts', ...tsFilesUnder(SOURCE_TOPS)];
}

/** Module specifiers of static imports, re-exports, dynamic imports and require calls. */
export function importsOf(source: string): string[] {
  const specs: string[] = [];
  const re = /(?:\bfrom\s*|\bimport\s*\(\s*|\brequire\s*\(\s*|^\s*import\s+)(['"])([^'"]+)\1/gm;
  for (const m of source.matchAll(re)) specs.push(m[2]);
  return specs;
}

function resolveRelative(from: string, spec: string): string | null {
  if (!spec.startsWith('.')) return null;
  const base = path.posix.normalize(path.posix.join(path.posix.dirname(from), spec));
  for (const c of [`${base}.ts`, `${base}/index.ts`, base]) {
    try {
      if (statSync(path.join(ROOT, c)).isFile()) return c;
    } catch {
      // not this candidate
    }
  }
  return base;
}

/** The unit of the folder graph: a file's folder; the loose files at the top of engine/ and extension/ (entries, shared types) count as their own units. */
export function unitOf(file: string): string {
  const dir = path.posix.dirname(file);
  return dir === '.' || dir === 'engine' || dir === 'extension' ? file : dir;
}

interface Edge {
  from: string;
  to: string;
  spec: string;
}

function edges(): Edge[] {
  const out: Edge[] = [];
  for (const f of sourceFiles()) {
    for (const spec of importsOf(readFileSync(path.join(ROOT, f), 'utf8'))) {
      const to = resolveRelative(f, spec);
      out.push({ from: f, to: to ?? spec, spec });
    }
  }
  return out;
}

/** Strongly connected components with more than one unit (Tarjan 1972). */
export function cycles(graph: Map<string, Set<string>>): string[][] {
  let index = 0;
  const idx = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const on = new Set<string>();
  const found: string[][] = [];
  const visit = (v: string) => {
    idx.set(v, index);
    low.set(v, index++);
    stack.push(v);
    on.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!idx.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (on.has(w)) low.set(v, Math.min(low.get(v)!, idx.get(w)!));
    }
    if (low.get(v) === idx.get(v)) {
      const comp: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        on.delete(w);
        comp.push(w);
      } while (w !== v);
      if (comp.length > 1) found.push(comp.sort());
    }
  };
  for (const v of graph.keys()) if (!idx.has(v)) visit(v);
  return found;
}

const all = edges();
const inside = (file: string, folder: string) => file === folder || file.startsWith(`${folder}/`);
const offending = (pred: (e: Edge) => boolean) => all.filter(pred).map((e) => `${e.from} imports ${e.spec}`);

describe('architecture (DEVELOPERS.md, the shape of the house)', () => {
  it('sees the source tree (a sanity check on the scanner)', () => {
    expect(all.length).toBeGreaterThan(500);
    expect(all.some((e) => e.from === 'engine/runner/run-plan.ts' && e.to === 'engine/run/fit.ts')).toBe(true);
  });

  it('the parser depends on nothing of the engine or the editor', () => {
    expect(offending((e) => inside(e.from, 'parser') && (inside(e.to, 'engine') || inside(e.to, 'extension') || e.to === 'cli.ts'))).toEqual([]);
  });

  it('only extension/ imports vscode', () => {
    expect(offending((e) => e.spec === 'vscode' && !inside(e.from, 'extension'))).toEqual([]);
  });

  it('the numerical engine does not reach the front ends or the editor', () => {
    expect(offending((e) => inside(e.from, 'engine') && !inside(e.from, 'engine/front') && (inside(e.to, 'engine/front') || inside(e.to, 'extension')))).toEqual([]);
  });

  it('the front ends (CLI, views) do not reach the editor, and the views do not reach the CLI', () => {
    expect(offending((e) => inside(e.from, 'engine/front') && inside(e.to, 'extension'))).toEqual([]);
    expect(offending((e) => inside(e.from, 'engine/front/views') && inside(e.to, 'engine/front/cli'))).toEqual([]);
  });

  it('one fit (engine/run) does not depend on the groups or the plan runner built on it', () => {
    expect(offending((e) => inside(e.from, 'engine/run') && (inside(e.to, 'engine/groups') || inside(e.to, 'engine/runner')))).toEqual([]);
    expect(offending((e) => inside(e.from, 'engine/groups') && inside(e.to, 'engine/runner'))).toEqual([]);
  });

  it('no folder cycle', () => {
    const graph = new Map<string, Set<string>>();
    const units = new Map<string, Set<string>>();
    for (const e of all) {
      if (!e.to.includes('/') && !e.to.endsWith('.ts')) continue; // a package
      const a = unitOf(e.from);
      const b = unitOf(e.to);
      if (a === b) continue;
      if (!graph.has(a)) graph.set(a, new Set());
      graph.get(a)!.add(b);
      const key = `${a} -> ${b}`;
      if (!units.has(key)) units.set(key, new Set());
      units.get(key)!.add(`${e.from} imports ${e.spec}`);
    }
    const found = cycles(graph).map((c) => ({ cycle: c, edges: [...units.entries()].filter(([k]) => c.includes(k.split(' -> ')[0]) && c.includes(k.split(' -> ')[1])).map(([, v]) => [...v][0]) }));
    expect(found).toEqual([]);
  });

  it('source file names are kebab-case', () => {
    const bad = sourceFiles().filter((f) => !/^[a-z0-9]+(?:-[a-z0-9]+)*(?:\.[a-z0-9]+)*\.ts$/.test(path.posix.basename(f)));
    expect(bad).toEqual([]);
  });

  it('the cycle finder finds a cycle and the folder rule catches one (the check can fail)', () => {
    const g = new Map([['a', new Set(['b'])], ['b', new Set(['c'])], ['c', new Set(['a'])], ['d', new Set(['a'])]]);
    expect(cycles(g)).toEqual([['a', 'b', 'c']]);
    expect(unitOf('engine/result.ts')).toBe('engine/result.ts');
    expect(unitOf('engine/run/fit.ts')).toBe('engine/run');
    expect(importsOf("import a from './x';\nexport { b } from \"../y\";\nconst c = require('./z');\nawait import('./w');\nimport './side.css';")).toEqual(['./x', '../y', './z', './w', './side.css']);
  });
});
