/**
 * (11) "Did you mean" at scale: `analyze` of a spec whose model reads 1,000
 * names that are not columns, checked against a 10,000-column header (the
 * editor runs this on every keystroke). Column names are all 11 characters
 * (`sensor_0000` … `sensor_9999`), so a length filter alone cannot skip
 * them; half of the unknown names are one-letter typos of real columns
 * (each has suggestions), half are unrelated names of assorted lengths.
 * The second figure is the same with 3,000 unknown names.
 */
import { analyze } from '../../../parser/index';
import { measure } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

export const HEADER_10K = Array.from({ length: 10_000 }, (_, i) => `sensor_${String(i).padStart(4, '0')}`);

/** The spec and its header: `unknown` names in one model over a 10,000-column table. */
export function unknownNamesSpec(unknown: number): string {
  const names: string[] = [];
  for (let i = 0; i < unknown; i++) {
    const col = HEADER_10K[(i * 7919) % HEADER_10K.length];
    // typo: drop one letter of "sensor"; unrelated: a probe name of 4-20 characters
    names.push(i % 2 === 0 ? col.slice(0, 1 + (i % 5)) + col.slice(2 + (i % 5)) : `probe${'x'.repeat(i % 16)}${i}`);
  }
  return `data d = "wide.csv"\nfit f on d {\n  model sensor_0000 = a * (${names.join(' + ')})\n  param a = 1\n}\n`;
}

export async function benchSuggest(ctx: BenchContext): Promise<BenchRow> {
  const headers = { headers: () => HEADER_10K };
  const sizes = ctx.quick ? [100, 300] : [1000, 3000];
  const texts = sizes.map(unknownNamesSpec);
  const first = analyze(texts[0], headers);
  const unknown = first.diagnostics.filter((d) => d.code === 'undefined_name').length;
  const withSuggestions = first.diagnostics.filter((d) => d.code === 'undefined_name' && d.suggestions?.length).length;
  if (unknown !== sizes[0]) throw new Error(`expected ${sizes[0]} unknown names, got ${unknown}`);
  const runs = ctx.quick ? 1 : 7;
  const t = await measure(() => analyze(texts[0], headers), runs, ctx.quick ? 0 : 1);
  const t3 = await measure(() => analyze(texts[1], headers), ctx.quick ? 1 : 3, 0);
  return {
    id: 18,
    name: `"Did you mean": ${sizes[0]} unknown names, 10,000-column header (analyze)`,
    value: t.median,
    unit: 'ms',
    spread: [t.min, t.max],
    text: `${fmt(t.median)} ms (${withSuggestions} of ${unknown} with suggestions); ${sizes[1]} names: ${fmt(t3.median)} ms`,
    goal: '≤ 300 ms',
    met: t.median <= 300,
    details: { unknown, withSuggestions, analyzeMs: t, [`analyzeMs${sizes[1]}`]: t3 },
  };
}
