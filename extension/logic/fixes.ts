/**
 * Quick fixes as plain data: each is a title and text edits on the analysed
 * spec (offset spans with the text they replace, so the adapter can refuse an
 * edit once the document has changed under it).
 *
 * - "did you mean": a diagnostic with `suggestions` gets one fix per name,
 *   replacing the diagnostic's range (quoted when the name is no plain
 *   identifier or the written one was quoted); the first is preferred.
 * - a start value outside its bounds (`initial_outside_bounds`): move the
 *   start inside (preferred), or widen the bound it crosses.
 * - `predict … at NAME` against a model that reads a near spelling of NAME,
 *   with the data's header not read: either name may be the typo, so the fix
 *   in each direction, neither preferred.
 */
import type { Diagnostic } from '../../parser/plan';
import type { EditorAnalysis } from './analysis';
import { paramAsts } from './declarations';
import { formatWritten } from '../../engine/format';
import { mapLeaves } from '../../parser/plan-expr';
import { suggest } from '../../parser/suggest';
import { spanOf, type Span } from './text';

export interface LsqEdit extends Span {
  newText: string;
  /** The text the edit replaces in the analysed spec. */
  oldText: string;
}

export interface LsqFix {
  title: string;
  edits: LsqEdit[];
  preferred?: boolean;
}

const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** The fixes offered for one parser or checker diagnostic of `a`. */
export function fixesFor(a: EditorAnalysis, d: Diagnostic): LsqFix[] {
  const at = spanOf(d.range);
  const current = a.text.slice(at.start, at.end);
  const out: LsqFix[] = (d.suggestions ?? []).map((s, i) => ({
    title: `Change to '${s}'`,
    edits: [{ ...at, oldText: current, newText: current.startsWith('"') || !IDENT.test(s) ? `"${s}"` : s }],
    preferred: i === 0,
  }));
  if (d.code === 'initial_outside_bounds') out.push(...boundsFixes(a, at));
  if (d.code === 'predictor_mismatch' && out.length === 1) return predictorFixes(a, at, current, out[0]);
  return out;
}

/**
 * `predict FIT at NAME` where the fit's model reads a near spelling of NAME. With the header read, the checker
 * reports a misspelt model column on the model line and never this (parser/check-queries.ts), so the model's
 * name is a real column and the fix toward it stands. With the header not read, either name may be the typo:
 * both directions are offered, neither preferred: this line to the model's name, or the model's name (each
 * place the model reads it) to this one.
 */
function predictorFixes(a: EditorAnalysis, at: Span, written: string, toModel: LsqFix): LsqFix[] {
  const fitName = /^\s*predict\s+([A-Za-z_]\w*)/.exec(lineOf(a.text, at.start))?.[1];
  const fit = a.plan.fits.find((f) => f.name === fitName);
  const block = fit?.blocks[0];
  const modelName = toModel.edits[0].newText.replace(/^"|"$/g, '');
  const read = a.data.find((x) => x.name === block?.data)?.state === 'found';
  const name = written.replace(/^"|"$/g, '');
  if (!fit || !block || read || suggest(name, [modelName]).length === 0) return [toModel];
  const uses: LsqEdit[] = [];
  mapLeaves(block.model, (e) => {
    if (e.kind === 'column' && e.name === modelName && e.range) {
      const span = spanOf(e.range);
      const old = a.text.slice(span.start, span.end);
      uses.push({ ...span, oldText: old, newText: old.startsWith('"') || !IDENT.test(name) ? `"${name}"` : name });
    }
    return e;
  });
  if (!uses.length) return [toModel];
  return [{ ...toModel, preferred: false }, { title: `Change '${modelName}' in the model of ${fit.name} to '${name}'`, edits: uses }];
}

function lineOf(text: string, offset: number): string {
  const start = text.lastIndexOf('\n', offset - 1) + 1;
  const end = text.indexOf('\n', offset);
  return text.slice(start, end < 0 ? text.length : end);
}

/** "Move the start inside" and "widen the bound" for the start value written at `at`. */
function boundsFixes(a: EditorAnalysis, at: Span): LsqFix[] {
  for (const st of a.ast.statements) {
    if (st.kind !== 'fit' || !st.name) continue;
    const p = paramAsts(st).find((x) => x.initial && x.initial.range.start.offset === at.start);
    if (!p?.name || !p.initial || !p.bounds) continue;
    const plan = a.plan.fits.find((f) => f.name === st.name!.name)?.parameters.find((x) => x.name === p.name!.name);
    if (plan?.initial === undefined) return [];
    // the plan omits an infinite bound; a bound it lacks that is written finite could not be read (no fix then)
    const lo = plan.lower ?? (p.bounds.low.kind === 'inf' ? -Infinity : undefined);
    const hi = plan.upper ?? (p.bounds.high.kind === 'inf' ? Infinity : undefined);
    if (lo === undefined || hi === undefined) return [];
    const x = plan.initial;
    const inside = startInside(x, lo, hi);
    const wide = widenedBound(x, lo, hi);
    if (inside === undefined || wide === undefined) return [];
    const side = x < lo ? p.bounds.low : p.bounds.high;
    const edit = (span: Span, newText: string): LsqEdit => ({ ...span, oldText: a.text.slice(span.start, span.end), newText });
    return [
      { title: `Move the start of ${p.name.name} inside its bounds: ${inside}`, edits: [edit(at, inside)], preferred: true },
      { title: `Widen the ${x < lo ? 'lower' : 'upper'} bound of ${p.name.name} to ${wide}`, edits: [edit(spanOf(side.range), wide)] },
    ];
  }
  return [];
}

/**
 * A start strictly inside (lo, hi) for a start `x` outside it, as spec text: the start mirrored in the bound it
 * crosses (as far inside as it was outside: -1 with [0, inf] becomes 1, 150 with [0, 100] becomes 50); for a
 * quantity of one sign, when that mirror leaves the bounds, the mirror on a ratio scale (b²/x: 10 with
 * [0.0005, 5] becomes 2.5); else the middle of the bounds. Undefined when x is inside.
 */
export function startInside(x: number, lo: number, hi: number): string | undefined {
  if (!(x < lo || x > hi) || !(lo < hi) || !Number.isFinite(x)) return undefined;
  const b = x < lo ? lo : hi;
  const candidates = [2 * b - x];
  if (b !== 0 && Math.sign(b) === Math.sign(x)) candidates.push((b * b) / x);
  if (Number.isFinite(lo) && Number.isFinite(hi)) candidates.push(lo + (hi - lo) / 2);
  for (const c of candidates) {
    const text = shortest(c, (v) => v > lo && v < hi);
    if (text !== undefined) return text;
  }
  return undefined;
}

/**
 * The crossed bound moved past the start `x`, as spec text: the bound mirrored in the start (the start then lies
 * as far inside the new bound as it lay outside the old one: 150 with [0, 100] gives the upper bound 200); for
 * a bound and start of one sign whose mirror would change sign, the ratio mirror x²/b (0.01 with [0.1, 10] gives
 * the lower bound 0.001), so a positive bound stays positive. Undefined when x is inside.
 */
export function widenedBound(x: number, lo: number, hi: number): string | undefined {
  if (!(x < lo || x > hi) || !(lo < hi) || !Number.isFinite(x)) return undefined;
  const lower = x < lo;
  const b = lower ? lo : hi;
  let w = 2 * x - b;
  if (b !== 0 && Math.sign(b) === Math.sign(x) && Math.sign(w) !== Math.sign(x)) w = (x * x) / b;
  return shortest(w, (v) => (lower ? v < x : v > x));
}

/**
 * The shortest text of `v` (2 to 12 significant digits, so a mirrored 2.5 stays 2.5) whose value still passes
 * `ok`: a number a person would write, rounded by the one policy (engine/format.ts `formatWritten`) and
 * spelled as JavaScript writes a number (`0.19`, `1.5e-7`), which the spec's number syntax reads back.
 */
function shortest(v: number, ok: (x: number) => boolean): string | undefined {
  if (!Number.isFinite(v)) return undefined;
  for (let digits = 2; digits <= 17; digits++) {
    // (read back and written by JavaScript's shortest round trip: `1.0e+2` at two digits becomes `100`)
    const n = Number(formatWritten(v, digits));
    if (ok(n)) return String(n);
  }
  return undefined;
}
