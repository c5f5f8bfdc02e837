/**
 * Spec cases for the fuzzer, each a pure function of its Rand: specs written
 * from the grammar over a small generated data file, mutated corpus specs
 * (samples/ and test/parser/specs/), expressions nested around and far past
 * the nesting limit, huge expressions and value lists, odd Unicode and
 * random bytes. Every case comes with the data files its spec names (a
 * sample's own CSV, or one generated with the columns the spec reads).
 */
import { readdirSync, readFileSync, existsSync } from 'node:fs';
import { basename, join } from 'node:path';
import { analyze } from '../../parser/index';
import { FUNCTIONS } from '../../parser/plan';
import { LOSSES } from '../../parser/registry/losses';
import { MAX_NESTING } from '../../parser/limits';
import { Rand } from './random';
import { csvField } from '../fixtures/hostile-names';

export interface FuzzFile {
  name: string;
  text: string;
}

export interface SpecCase {
  /** Which generator made it (for the tally). */
  shape: string;
  spec: string;
  files: FuzzFile[];
}

/** Sizes of the generated pieces: `small` for the test suite, `full` for campaigns. */
export interface Sizes {
  /** Longest sum in a huge-expression case (terms). */
  maxTerms: number;
  /** Longest predict list. */
  maxValues: number;
  /** Deepest nesting far past the limit. */
  maxDepth: number;
}
export const SMALL: Sizes = { maxTerms: 2000, maxValues: 5000, maxDepth: 1500 };
export const FULL: Sizes = { maxTerms: 10_000, maxValues: 200_000, maxDepth: 6000 };

// ---- the corpus -------------------------------------------------------------

export interface CorpusSpec {
  name: string;
  text: string;
  /** CSV files beside it, by file name. */
  csv: Map<string, string>;
}

/** Sample specs with their CSVs and the parser's test specs (whose data files the generator invents). */
export function loadCorpus(root: string): CorpusSpec[] {
  const out: CorpusSpec[] = [];
  const samples = join(root, 'samples');
  for (const d of readdirSync(samples, { withFileTypes: true })) {
    if (!d.isDirectory()) continue;
    const dir = join(samples, d.name);
    const csv = new Map<string, string>();
    for (const f of readdirSync(dir)) if (f.endsWith('.csv')) csv.set(f, readFileSync(join(dir, f), 'utf8'));
    for (const f of readdirSync(dir)) if (f.endsWith('.lsq')) out.push({ name: `samples/${d.name}/${f}`, text: readFileSync(join(dir, f), 'utf8'), csv });
  }
  const specs = join(root, 'test', 'parser', 'specs');
  if (existsSync(specs)) for (const f of readdirSync(specs)) if (f.endsWith('.lsq')) out.push({ name: `test/parser/specs/${f}`, text: readFileSync(join(specs, f), 'utf8'), csv: new Map() });
  return out;
}

// ---- data files ---------------------------------------------------------------

/** A CSV with the given columns: numbers near a line in the first column, a few group labels, rare missing cells. */
export function generatedCsv(r: Rand, columns: readonly string[], groupColumns: ReadonlySet<string> = new Set()): string {
  const n = r.logInt(3, 60);
  const labels = ['A', 'B', 'c 1', r.chance(0.2) ? r.oddChar() : 'D'];
  const lines = [columns.map(csvField).join(',')];
  for (let i = 0; i < n; i++) {
    const x = i * (r.chance(0.9) ? 0.5 : r.float() * 10);
    lines.push(columns.map((c, k) => {
      if (groupColumns.has(c)) return csvField(labels[i % r.int(1, labels.length)]);
      if (r.chance(0.01)) return r.pick(['', 'NA', 'n/a', 'x']);
      if (k === 0) return String(x);
      return (0.5 + k + 0.8 * x + 0.3 * Math.sin(i * 1.7 + k) + (r.chance(0.03) ? 50 : 0)).toPrecision(r.int(3, 12));
    }).join(','));
  }
  return lines.join(r.chance(0.1) ? '\r\n' : '\n') + (r.chance(0.9) ? '\n' : '');
}

const SIMPLE_PATH = /^[A-Za-z0-9_ .-]+$/;

/**
 * The data files a spec names, written so that its fits can run: a corpus CSV
 * of that name, else one generated with the columns the spec reads (found by
 * checking it without headers, when every unknown name counts as a column).
 */
export function dataFor(r: Rand, spec: string, corpus: ReadonlyMap<string, string> = new Map()): FuzzFile[] {
  let plan;
  try {
    plan = analyze(spec).plan;
  } catch {
    return [];
  }
  const files: FuzzFile[] = [];
  const seen = new Set<string>();
  for (const d of plan.data) {
    if (!SIMPLE_PATH.test(d.path) || d.path.startsWith('.') || seen.has(d.path)) continue;
    seen.add(d.path);
    const known = corpus.get(basename(d.path));
    if (known !== undefined && r.chance(0.8)) {
      files.push({ name: d.path, text: known });
      continue;
    }
    const cols = new Set<string>();
    const groups = new Set<string>();
    for (const f of plan.fits) {
      if (f.blocks[0]?.data !== d.name) continue;
      for (const c of f.blocks[0].columns) cols.add(c);
      if (f.groupBy !== undefined) groups.add(f.groupBy);
    }
    for (const g of groups) cols.add(g);
    if (cols.size === 0) cols.add('x').add('y');
    files.push({ name: d.path, text: generatedCsv(r, [...cols], groups) });
  }
  return files;
}

// ---- specs from the grammar ------------------------------------------------------

const COLUMNS = ['x', 'y', 'z', 'sd', 'w'];
const FUNCS = Object.keys(FUNCTIONS) as (keyof typeof FUNCTIONS)[];

class SpecWriter {
  constructor(private readonly r: Rand, private readonly params: string[], private readonly columns: string[]) {}

  /** A numeric expression of about `size` nodes. */
  expr(size: number): string {
    const r = this.r;
    if (size <= 1) {
      return r.weighted<() => string>([
        [4, () => r.pick(this.params)],
        [4, () => r.pick(this.columns)],
        [3, () => r.number()],
        [1, () => r.pick(['pi', 'e', 'k'])],
        [1, () => `"${r.pick(this.columns)}"`],
      ])();
    }
    return r.weighted<() => string>([
      [6, () => `${this.expr(size >> 1)} ${r.pick(['+', '-', '*', '/'])} ${this.expr(size - (size >> 1))}`],
      [2, () => `(${this.expr(size - 1)})`],
      [1, () => `${this.expr(1)} ^ ${r.pick(['2', '0.5', '-1', '3', this.expr(1)])}`],
      [1, () => `-${this.expr(size - 1)}`],
      [3, () => {
        const fn = r.pick(FUNCS);
        const arity = FUNCTIONS[fn];
        const args = fn === 'when' ? [this.cond(), this.expr(size >> 1), this.expr(size >> 1)] : Array.from({ length: r.chance(0.05) ? arity + 1 : arity }, () => this.expr(Math.max(1, (size - 1) >> 1)));
        return `${fn}(${args.join(', ')})`;
      }],
    ])();
  }

  cond(): string {
    const r = this.r;
    const c = `${this.expr(2)} ${r.pick(['<', '<=', '>', '>=', '==', '!='])} ${r.number()}`;
    return r.chance(0.3) ? `${r.chance(0.3) ? 'not ' : ''}${c} ${r.pick(['and', 'or'])} ${r.pick(this.columns)} > ${r.number()}` : c;
  }

  value(allowInf = false): string {
    const r = this.r;
    return r.weighted<() => string>([
      [8, () => `${r.chance(0.2) ? '-' : ''}${r.number()}`],
      [1, () => (allowInf ? r.pick(['inf', '-inf']) : 'k')],
      [1, () => r.pick(['pi', 'e', 'k', 'nope'])],
    ])();
  }
}

/**
 * A spec written from the grammar over the generated data file. Most specs
 * use only valid choices (so they check clean and their fits run, where
 * check/fit differences show); a sloppy third also draws invalid ones
 * (bad bounds, unknown options, mismatched queries).
 */
export function grammarSpec(r: Rand): string {
  const sloppy = r.chance(0.3);
  /** A valid choice, or (in a sloppy spec, now and then) an invalid one. */
  const either = <T>(valid: readonly T[], invalid: readonly T[]): T => (sloppy && r.chance(0.25) ? r.pick(invalid) : r.pick(valid));
  const lines: string[] = [];
  if (!sloppy || r.chance(0.8)) lines.push(`const k = ${r.int(1, 9)}.${r.int(0, 9)}${r.chance(0.3) ? ' [mg/L]' : ''}`);
  const where = r.chance(0.2) ? ` where ${new SpecWriter(r, ['x'], ['x']).cond()}` : '';
  lines.push(`data d = "d.csv"${where}${r.chance(0.05) ? ' delimiter ","' : ''}`);
  const fits: { name: string; params: string[]; grouped: boolean; response: string }[] = [];
  for (let f = 0; f < r.int(1, 3); f++) {
    const name = `f${f}`;
    const params = ['a', 'b', 'c'].slice(0, r.int(1, 3));
    const cols = r.chance(0.85) ? ['x'] : ['x', 'z'];
    const w = new SpecWriter(r, params, cols);
    const shapeOf = new SpecWriter(r, ['k'], cols); // parameter-free pieces
    const grouped = r.chance(0.15);
    lines.push(`fit ${name} on d {`);
    const response = either(['y', 'y', 'y', 'y', 'ln(y)'], ['y - z', 'sd', 'x', '"y"', 'y + 1']);
    // mostly every parameter times a piece of the predictor; sometimes any expression
    const model = !sloppy || r.chance(0.6)
      ? params.map((p, i) => (i === 0 && r.chance(0.5) ? p : `${p} * ${r.chance(0.5) ? r.pick(cols) : `(${shapeOf.expr(r.logInt(1, 6))})`}`)).join(r.pick([' + ', ' + ', ' - ']))
      : w.expr(r.logInt(1, 12));
    lines.push(`  model ${response} = ${model}`);
    for (const p of params) {
      const parts: string[] = [];
      if (r.chance(0.6)) parts.push(`= ${either(['0', '1', '-1', '2', '0.5', '3'], ['k', 'inf', '1e400', 'nope'])}`);
      if (r.chance(0.25)) parts.push(`in [${either(['-inf', '-100', '-10', '-5'], ['10', 'inf', 'k'])}, ${either(['inf', '100', '10', '5'], ['-inf', '-10', '0'])}]`);
      if (r.chance(0.04)) parts.push('fixed');
      if (r.chance(0.1)) parts.push('[s]');
      lines.push(`  param ${p}${parts.length ? ' ' + parts.join(' ') : ''}`);
    }
    if (r.chance(0.15)) lines.push(`  sigma ${either(['sd', '0.1', 'sd * 2', 'sd + 0.01'], ['z - 1', 'a', '0'])}`);
    else if (r.chance(0.1)) lines.push(`  weight ${either(['w', '1 / (1 + x)', '2'], ['0', 'x - 3', 'b'])}`);
    const method = r.chance(0.4) ? either(['auto', 'linear', 'levenberg_marquardt', 'levenberg_marquardt', 'gradient_descent'], ['newton', 'linear']) : undefined;
    if (method) lines.push(`  method ${method}`);
    if (method === 'gradient_descent' && r.chance(0.7)) lines.push(`  rate ${either(['0.01', '0.1', '1e-4', '0.5'], ['0', '-1'])}`);
    if (r.chance(0.15)) lines.push(`  loss ${either([...LOSSES], ['l2', 'abs'])}${r.chance(0.5) ? ` scale ${either(['0.5', '1', '2', 'k'], ['0', '-1'])}` : ''}`);
    if (r.chance(0.1)) lines.push(`  level ${either(['0.9', '0.99', '0.5', '0.68'], ['1.5', '0', '1'])}`);
    // iteration limits stay small: a campaign case must finish within its time budget
    if (method === 'gradient_descent' || r.chance(0.1)) lines.push(`  iterations ${either(['1', '50', '200', '2000', '5000'], ['2.5', '0', '-3'])}`);
    if (r.chance(0.1)) lines.push(`  tolerance ${either(['1e-6', '1e-14', '1e-3'], ['0', '-1'])}`);
    if (grouped) lines.push(`  per ${either(['grp'], ['z', 'nope'])}`);
    lines.push('}');
    fits.push({ name, params, grouped, response });
  }
  const anyFit = () => r.pick(fits);
  for (let q = 0; q < r.int(0, 4); q++) {
    const f = anyFit();
    const values = (n: number) => Array.from({ length: r.int(1, n) }, () => either([String(r.int(0, 20)), (r.float() * 10).toFixed(2)], [r.number(), 'k', 'inf'])).join(', ');
    lines.push(r.weighted<() => string>([
      [3, () => `predict ${f.name} at ${either(['x'], ['z', 'y', 'nope'])} = ${values(5)}`],
      [2, () => `invert ${f.name} at ${either(['y'], ['x', 'z'])} = ${values(3)}`],
      [1, () => {
        const comparable = fits.filter((x) => !x.grouped && x.response === fits[0].response);
        return `compare ${(sloppy || comparable.length < 2 ? fits : comparable).map((x) => x.name).join(', ')}`;
      }],
      [2, () => `expect ${f.name}.${either([...f.params, 'r2', 'rmse', 'n', 'dof', 'aic'], ['chi2', 'nope', 'se'])}${r.chance(0.2) ? '.se' : ''} ${r.pick(['above', 'below'])} ${r.number()}`],
      [1, () => `expect ${f.name}.${r.pick(f.params)} within ${r.int(-10, 0)} .. ${either([String(r.int(1, 10))], ['-20'])}`],
      [2, () => `derive q${q} = ${f.name}.${r.pick(f.params)} * ${r.int(1, 9)}${r.chance(0.3) ? ` + ${anyFit().name}.rmse` : ''}${r.chance(0.2) ? ` / ${anyFit().name}.${r.pick(['n', 'dof', 'r2'])}` : ''}`],
    ])());
  }
  return lines.join(r.chance(0.05) ? '\r\n' : '\n') + '\n';
}

// ---- mutations --------------------------------------------------------------------

const VOCAB = [
  'data', 'const', 'fit', 'on', '{', '}', 'model', 'param', '=', 'in', '[', ']', ',', 'fixed', '[mg/L]', 'sigma', 'weight',
  'method', 'loss', 'scale', 'level', 'iterations', 'tolerance', 'rate', 'per', 'predict', 'invert', 'at', 'compare', 'expect',
  '.', '..', 'within', 'above', 'below', 'and', 'or', 'not', 'inf', 'pi', 'e', 'x', 'y', 'a', 'f', 'd', '"q.csv"', '"t (C)"',
  '(', ')', '+', '-', '*', '/', '^', '<', '<=', '==', '!=', '>=', '1', '0', '2.5', '1e400', 'when', 'exp', 'ln', 'se', 'r2',
  '\n', '# c\n', 'linear', 'huber', 'derive', 'rmse', 'f.a', 'f.rmse', 'gradient_descent', 'levenberg_marquardt', 'constructor', '__proto__',
];

/** `base` with one to six random edits: insert, delete or replace words or characters, duplicate or drop a line. */
export function mutate(r: Rand, base: string): string {
  let t = base;
  for (let m = r.int(1, 6); m > 0; m--) {
    const pos = r.int(0, t.length);
    const piece = r.weighted<() => string>([[6, () => r.pick(VOCAB)], [2, () => r.oddChar()], [1, () => r.bytes(r.int(1, 4))], [1, () => ` ${r.number()} `]])();
    t = r.weighted<() => string>([
      [4, () => t.slice(0, pos) + piece + t.slice(pos)],
      [3, () => t.slice(0, pos) + t.slice(pos + r.int(1, 8))],
      [3, () => t.slice(0, pos) + piece + t.slice(pos + piece.length)],
      [1, () => {
        const lines = t.split('\n');
        const i = r.int(0, Math.max(0, lines.length - 1));
        if (r.chance(0.5)) lines.splice(i, 0, lines[i] ?? '');
        else lines.splice(i, 1);
        return lines.join('\n');
      }],
    ])();
  }
  return t;
}

// ---- nesting and size -------------------------------------------------------------

/** An expression `depth` levels deep of one random kind of nesting (or a mix). */
export function nested(r: Rand, depth: number): string {
  const kind = r.pick(['parens', 'calls', 'signs', 'powers', 'nots', 'sums', 'mixed']);
  switch (kind) {
    case 'parens': return `${'('.repeat(depth)}a * x${')'.repeat(depth)}`;
    case 'calls': return `${'exp('.repeat(depth)}a * x${')'.repeat(depth)}`;
    case 'signs': return `${'-'.repeat(depth)}a * x`;
    case 'powers': return `a * ${Array.from({ length: depth + 1 }, () => 'x').join('^')}`;
    case 'nots': return `when(${'not '.repeat(depth)}x > 0, a, a * x)`;
    case 'sums': return `${'(a + '.repeat(depth)}x${')'.repeat(depth)}`;
    default: {
      let e = 'a * x';
      for (let i = 0; i < depth; i++) e = r.pick([`(${e})`, `sqrt(${e})`, `-${e}`, `(${e} + 1)`, `${e} ^ 1`, `abs(${e})`]);
      return e;
    }
  }
}

const fitOf = (model: string, extra = '') => `data d = "d.csv"\nfit f on d {\n  model y = ${model}\n  param a = 1\n${extra}}\n`;

/** One spec case of a random shape. */
export function specCase(r: Rand, corpus: readonly CorpusSpec[], sizes: Sizes): SpecCase {
  const shape = r.weighted<string>([[40, 'grammar'], [35, 'mutated'], [8, 'nesting'], [4, 'huge'], [7, 'unicode'], [6, 'bytes']]);
  const withData = (spec: string, csv: ReadonlyMap<string, string> = new Map()): SpecCase => ({ shape, spec, files: dataFor(r, spec, csv) });
  switch (shape) {
    case 'grammar':
      return withData(grammarSpec(r));
    case 'mutated': {
      if (r.chance(0.3)) return withData(mutate(r, grammarSpec(r)));
      const base = r.pick(corpus);
      const text = mutate(r, base.text);
      const c = withData(text, base.csv);
      // mutations may rename the files: keep the originals beside them
      for (const [name, csv] of base.csv) if (!c.files.some((f) => f.name === name)) c.files.push({ name, text: csv });
      return c;
    }
    case 'nesting': {
      const depth = r.chance(0.7) ? MAX_NESTING + r.int(-3, 3) : r.logInt(MAX_NESTING, sizes.maxDepth);
      return withData(fitOf(nested(r, depth)));
    }
    case 'huge': {
      const which = r.pick(['sum', 'values', 'statements', 'chain']);
      if (which === 'sum') {
        const n = r.logInt(100, sizes.maxTerms);
        return withData(fitOf(Array.from({ length: n }, (_, i) => `${(i % 7) + 1} * a * x`).join(' + ')));
      }
      if (which === 'values') {
        const n = r.logInt(100, sizes.maxValues);
        const vals = Array.from({ length: n }, (_, i) => String(i % 97)).join(', ');
        return withData(`${fitOf('a * x')}predict f at x = ${vals}\ninvert f at y = ${vals.slice(0, 2000).replace(/,\s*\d*$/, '')}\n`);
      }
      if (which === 'chain') {
        const n = r.logInt(100, sizes.maxTerms);
        return withData(`data d = "d.csv" where ${Array.from({ length: n }, (_, i) => `x > ${-i - 1}`).join(r.pick([' and ', ' or ']))}\nfit f on d {\n  model y = a * x\n  param a\n}\n`);
      }
      const n = r.logInt(10, Math.max(20, sizes.maxTerms / 10));
      const out = ['data d = "d.csv"'];
      for (let i = 0; i < n; i++) out.push(`const k${i} = ${i}`, `derive q${i} = ${i ? `q${i - 1}` : '1'} + k${i}`);
      return withData(out.join('\n') + '\n');
    }
    case 'unicode': {
      const base = r.chance(0.5) ? grammarSpec(r) : r.pick(corpus).text;
      let t = base;
      for (let i = r.int(1, 8); i > 0; i--) {
        const pos = r.int(0, t.length);
        t = t.slice(0, pos) + r.oddChar() + t.slice(pos);
      }
      if (r.chance(0.3)) t = `data d = "d.csv"\nfit f on d {\n  model "${r.oddChar()}${r.oddChar()}" = a * "${r.oddChar()}x"\n  param a\n}\n`;
      return withData(t);
    }
    default:
      return { shape, spec: r.bytes(r.logInt(1, 4000)), files: [] };
  }
}
