/**
 * The degree step of the editor's "New Spec from CSV" (extension/new-spec.ts)
 * when the model is the polynomial: which degrees the data allow, the input
 * box's first value, prompt and validation, and the template for the answer.
 * Pure (no `vscode`), so vitest checks it. A degree is a whole number from 1
 * to MAX_POLY_DEGREE, the CLI's rule for `new --degree`; the data bound it
 * further: degree d has d + 1 coefficients, which need d + 1 distinct
 * predictor values, and the scaffolder needs one row more than coefficients
 * (engine/templates/scaffold.ts).
 */
import { DEFAULT_POLY_DEGREE, MAX_POLY_DEGREE, polynomial, type Template } from '../../engine/templates';

/** Highest degree the rows with a number in both columns allow (0 when not even a line fits). */
export function maxDegreeFor(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const distinct = new Set<number>();
  let rows = 0;
  for (let i = 0; i < Math.min(x.length, y.length); i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    rows++;
    distinct.add(x[i]);
  }
  return Math.max(0, Math.min(MAX_POLY_DEGREE, distinct.size - 1, rows - 2));
}

export interface DegreePrompt {
  title: string;
  /** First value of the input box: the default degree, or the highest the data allow when lower. */
  value: string;
  prompt: string;
}

export function degreePrompt(max: number): DegreePrompt {
  return {
    title: 'New spec: degree of the polynomial',
    value: String(Math.max(1, Math.min(DEFAULT_POLY_DEGREE, max))),
    prompt: `a whole number from 1 to ${max} (${max} is the most these data allow: one row more than coefficients, and as many distinct x values as coefficients)`,
  };
}

/** The whole number in `text` (surrounding blanks allowed), or NaN. */
function degreeOf(text: string): number {
  const t = text.trim();
  return /^\d+$/.test(t) ? Number(t) : NaN;
}

/** The input box's message for `text`: undefined when it is a degree from 1 to `max`, else what is wrong. */
export function degreeInputError(text: string, max: number): string | undefined {
  const d = degreeOf(text);
  if (!Number.isInteger(d)) return `the degree is a whole number from 1 to ${max}`;
  if (d < 1) return 'a polynomial has degree 1 or more';
  if (d > MAX_POLY_DEGREE) return `the template writes degrees up to ${MAX_POLY_DEGREE}`;
  if (d > max) return `these data allow degree ${max} at most`;
  return undefined;
}

/** The polynomial template of the degree typed in `text`, or null when it is not valid for `max`. */
export function polynomialFor(text: string, max: number): Template | null {
  return degreeInputError(text, max) === undefined ? polynomial(degreeOf(text)) : null;
}
