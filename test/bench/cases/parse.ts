/**
 * (6) Parse + check of a 1,000-line spec with `analyze` (the parser's
 * public entry). The spec is generated here: an invented greenhouse network
 * with one data table, constants and two fits per bench, queries and
 * expectations, so that every statement kind appears.
 */
import { analyze } from '../../../parser/index';
import { measure } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

export function greenhouseSpec(lines: number): string {
  const out: string[] = ['# Greenhouse sensor network: invented calibration batch for the parser benchmark', ''];
  for (let i = 0; ; i++) {
    const block = [
      `data bench${i} = "benches/bench${i}.csv" where hour >= 0 and hour < 48`,
      `const offset${i} = ${(0.1 * (i % 9)).toFixed(1)} [degC]`,
      `fit warm${i} on bench${i} {`,
      `  # daily warming with a saturating approach`,
      `  model air_C = offset${i} + base + gain * (1 - exp(-hour / lag)) + swing * sin(2 * pi * hour / 24 + phase)`,
      `  param base = 12 in [-10, 40] [degC]`,
      `  param gain = 8 in [0, 30] [degC]`,
      `  param lag = 6 in [0.5, 48] [h]`,
      `  param swing = 2 in [0, 10]`,
      `  param phase = 0 in [-pi, pi]`,
      `  sigma max(air_sd, 0.1)`,
      `  level 0.95`,
      `}`,
      `fit soil${i} on bench${i} {`,
      `  model ln(moisture) = ln(m0) - hour / dry`,
      `  param m0 = 40 in [1, 100]`,
      `  param dry = 30 in [1, inf] [h]`,
      `  weight 1 / (1 + hour)`,
      `  method levenberg_marquardt`,
      `}`,
      `predict warm${i} at hour = 6, 12, 18 sigma 0.4`,
      `invert soil${i} at moisture = 20`,
      `expect warm${i}.lag within 2 .. 12`,
      `expect soil${i}.r2 above 0.95`,
      ``,
    ];
    if (out.length + block.length > lines) break;
    out.push(...block);
  }
  while (out.length < lines) out.push('# spare line');
  return out.join('\n') + '\n';
}

export async function benchParse(ctx: BenchContext): Promise<BenchRow> {
  const text = greenhouseSpec(1000);
  const lineCount = text.split('\n').length - 1;
  const first = analyze(text);
  const errors = first.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length > 0) throw new Error(`generated spec has errors: ${errors.slice(0, 3).map((e) => e.message).join('; ')}`);
  const runs = ctx.quick ? 3 : 51;
  const t = await measure(() => analyze(text), runs, ctx.quick ? 1 : 10);
  return {
    id: 6,
    name: `Parse + check of a ${lineCount}-line spec (analyze)`,
    value: t.median,
    unit: 'ms',
    spread: [t.min, t.max],
    text: `${fmt(t.median)} ms (${first.plan.fits.length} fits, ${text.length} characters)`,
    goal: '≤ 20 ms',
    met: t.median <= 20,
    details: { lines: lineCount, characters: text.length, fits: first.plan.fits.length, analyzeMs: t, diagnostics: first.diagnostics.length },
  };
}
