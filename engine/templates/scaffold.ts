/**
 * Writes a new .lsq spec from a template, a CSV header and the data's values.
 * Pure: the caller reads the CSV and writes the file.
 */
import { FUNCTIONS } from '../../parser/plan';
import { StringLiteral } from '../../parser/tokens';
import { cleanPairs } from './heuristics';
import type { Template } from './types';
import { scaffoldText } from '../messages';
import { DIGITS, formatNumber } from '../format';

export interface ScaffoldInput {
  template: Template;
  /** Data path as written in the spec (relative to the spec's folder, forward slashes). */
  dataPath: string;
  /** All column names of the CSV (for name clashes). */
  headers: string[];
  x: string;
  y: string;
  xValues: ArrayLike<number>;
  yValues: ArrayLike<number>;
}

export type ScaffoldResult =
  | { ok: true; text: string; values: Record<string, number>; notes: string[] }
  | { ok: false; message: string };

/** Words that can never be names in .lsq (see parser/tokens.ts) plus the built-in constants. */
const RESERVED = new Set(['and', 'or', 'not', 'inf', 'pi', 'e']);
const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;

/**
 * Characters refused in quoted text written into a spec although the lexer
 * would take them: control characters (they reach terminals raw) and the
 * Unicode line and paragraph separators and NEL (editors show them as line
 * breaks and offer to remove them).
 */
const UNSAFE_IN_TEXT = /[\u0000-\u0008\u000b-\u001f\u007f\u0085\u2028\u2029]/;

/**
 * `text` as a double-quoted spec string, or null when the language cannot
 * represent it: spec text has no escapes, so a `"` or a line break cannot be
 * written (the StringLiteral token of parser/tokens.ts decides), and
 * UNSAFE_IN_TEXT is refused on top.
 */
export function specString(text: string): string | null {
  const quoted = `"${text}"`;
  const m = (StringLiteral.PATTERN as RegExp).exec(quoted);
  if (!m || m.index !== 0 || m[0].length !== quoted.length || UNSAFE_IN_TEXT.test(text)) return null;
  return quoted;
}

/** A column as it must be written in an expression: bare when a plain name, else "double-quoted". */
export function columnRef(name: string): string | null {
  if (IDENT.test(name) && !RESERVED.has(name) && !Object.prototype.hasOwnProperty.call(FUNCTIONS, name)) return name;
  return specString(name);
}

/** An identifier derived from free text (file names): `lab readings-2.csv` → `lab_readings_2`. */
export function identifierFrom(text: string, fallback: string): string {
  let s = text.replace(/\.[^.]*$/, '').replace(/[^A-Za-z0-9_]+/g, '_').replace(/^_+|_+$/g, '');
  if (!s) s = fallback;
  if (/^[0-9]/.test(s)) s = `d_${s}`;
  if (RESERVED.has(s) || Object.prototype.hasOwnProperty.call(FUNCTIONS, s)) s = `${s}_data`;
  return s;
}

/** 4 significant digits by the one policy (engine/format.ts; exponent form `5.729e+8` outside [1e-4, 1e6)), `1` for a value that is not finite. */
function formatStart(v: number): string {
  return Number.isFinite(v) ? formatNumber(v, DIGITS.statistic) : '1';
}

function boundText(lower?: number, upper?: number): string {
  if (lower === undefined && upper === undefined) return '';
  const b = (v: number | undefined, inf: string): string => (v === undefined ? inf : String(v));
  return ` in [${b(lower, '-inf')}, ${b(upper, 'inf')}]`;
}

/** The spec text, or a message saying why the data do not suit the template. */
export function scaffoldSpec(input: ScaffoldInput): ScaffoldResult {
  const t = input.template;
  const xRef = columnRef(input.x);
  const yRef = columnRef(input.y);
  if (xRef === null || yRef === null) return { ok: false, message: scaffoldText.unwritableColumn(xRef === null ? input.x : input.y) };
  const dataRef = specString(input.dataPath);
  if (dataRef === null) {
    return { ok: false, message: scaffoldText.unwritablePath(input.dataPath) };
  }

  const original = cleanPairs(input.xValues, input.yValues);
  let d = original;
  const need = t.parameters.length + 1;
  if (d.x.length < need) return { ok: false, message: scaffoldText.tooFewRows(t.title, t.parameters.length, need, input.x, input.y, d.x.length) };
  let predictor = xRef;
  const header: string[] = [];
  if (t.prepare) {
    const p = t.prepare(d, xRef);
    d = p.d;
    predictor = p.x;
    if (p.note) header.push(p.note);
  }
  if (t.requires.includes('positive_x') && d.x.some((v) => !(v > 0))) return { ok: false, message: scaffoldText.positiveX(t.title, input.x) };
  if (t.requires.includes('nonnegative_x') && d.x.some((v) => !(v >= 0))) return { ok: false, message: scaffoldText.nonnegativeX(t.title, input.x) };
  if (t.requires.includes('two_positive_x') && new Set(d.x.filter((v) => v > 0)).size < 2) return { ok: false, message: scaffoldText.twoPositiveX(t.title, input.x) };
  if (t.requires.includes('positive_y') && d.y.some((v) => !(v > 0))) return { ok: false, message: scaffoldText.positiveY(t.title, input.y) };

  // Parameter names must not clash with column names or constants.
  const taken = new Set([...input.headers, ...(t.constants ?? []).map((c) => c.name)]);
  const names: Record<string, string> = {};
  for (const p of t.parameters) {
    let n = p.name;
    while (taken.has(n)) n = `${n}_p`;
    names[p.name] = n;
    taken.add(n);
  }
  const start = t.start(d);
  const dataName = identifierFrom(input.dataPath.split('/').pop() ?? 'data', 'data');
  const fitName = taken.has(t.fitName) || t.fitName === dataName ? `${t.fitName}_fit` : t.fitName;

  const lines: string[] = [
    `# ${t.title}: ${input.y} against ${input.x} (${input.dataPath})`,
    `# Model: ${t.formula}`,
    '# Scaffolded by `leastwise new`. Review the model, the bounds and the units before relying on the fit.',
  ];
  if (t.note) lines.push(`# ${t.note}`);
  for (const h of header) lines.push(`# ${h}`);
  lines.push('# Starting values were computed from the data:');
  for (const n of start.notes) lines.push(`#   ${n}`);
  lines.push('', `data ${dataName} = ${dataRef}`);
  for (const c of t.constants ?? []) lines.push(`const ${c.name} = ${c.value}   # ${c.comment}`);
  lines.push('', `fit ${fitName} on ${dataName} {`, `  model ${yRef} = ${t.model(predictor, names)}`);
  const width = Math.max(...t.parameters.map((p) => names[p.name].length));
  for (const p of t.parameters) {
    const unit = p.unit ? ` [${p.unit}]` : '';
    lines.push(`  param ${names[p.name].padEnd(width)} = ${formatStart(start.values[p.name])}${boundText(p.lower, p.upper)}${unit}   # ${p.meaning}`);
  }
  lines.push('}', '');
  lines.push('# Next steps, for example:');
  lines.push(`#   predict ${fitName} at ${xRef} = ${formatStart(original.x[Math.floor(original.x.length / 2)])}`);
  lines.push(`#   expect ${fitName}.r2 above 0.99`, '');
  return { ok: true, text: lines.join('\n'), values: start.values, notes: start.notes };
}
