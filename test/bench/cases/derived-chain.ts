/**
 * (19) Chained derived quantities: `analyze` and `runPlan` of a spec with a
 * line fit on 20 invented calibration points and N `derive` statements, each
 * reading the one above (`derive c1 = c0 + 1`, …), for N = 10,000 and
 * 20,000. Each quantity reads the one above through its value and gradient
 * (engine/run/derived.ts), so the cost grows linearly: the figure is the
 * time for 20,000 and the goal bounds the ratio of the two sizes (2 for
 * linear cost, 4 for quadratic). Before (2026-12-03, this machine under
 * load), each quantity was expanded into the ones it reads: `leastwise fit`
 * took 5.1 s for 5,000 and 8.6 s for 10,000, and every quantity past the
 * 400th of the chain was refused as nested too deeply.
 */
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { runPlan } from '../../../engine/runner';
import { analyze } from '../../../parser/index';
import { measure } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/** The spec: a line fit of `d.csv` and `n` chained derive statements. */
export function derivedChainSpec(n: number): string {
  const lines = ['data d = "d.csv"', 'fit cal on d {', '  model signal = offset + slope * conc', '  param offset', '  param slope', '}', 'derive c0 = cal.slope'];
  for (let k = 1; k < n; k++) lines.push(`derive c${k} = c${k - 1} + 1`);
  return lines.join('\n') + '\n';
}

export async function benchDerivedChain(ctx: BenchContext): Promise<BenchRow> {
  const sizes = ctx.quick ? [500, 1000] : [10_000, 20_000];
  const csv = ['conc,signal', ...Array.from({ length: 20 }, (_, i) => `${i * 0.5},${(0.12 + 0.84 * i * 0.5 + 0.01 * Math.sin(7 * i)).toFixed(4)}`)].join('\n') + '\n';
  writeFileSync(path.join(ctx.tmp, 'd.csv'), csv);
  const once = async (n: number) => {
    const spec = derivedChainSpec(n);
    const result = await runPlan(analyze(spec).plan, { baseDir: ctx.tmp, specText: spec });
    const last = result.derived?.[n - 1];
    if (!last || last.value === null || last.stderr === null) throw new Error(`derive c${n - 1} has no value: ${last?.note}`);
    return last;
  };
  const runs = ctx.quick ? 1 : 3;
  const small = await measure(() => once(sizes[0]), runs, ctx.quick ? 0 : 1);
  const large = await measure(() => once(sizes[1]), runs, 0);
  const ratio = large.median / small.median;
  return {
    id: 19,
    name: `Chained derive statements: ${sizes[1]} (parse, check, fit, derived)`,
    value: large.median,
    unit: 'ms',
    spread: [large.min, large.max],
    text: `${fmt(large.median)} ms; ${sizes[0]}: ${fmt(small.median)} ms (ratio ${ratio.toFixed(2)}, linear 2)`,
    goal: 'ratio ≤ 2.5',
    met: ratio <= 2.5,
    details: { sizes, smallMs: small, largeMs: large, ratio },
  };
}
