/**
 * Parser speed benchmark (a script, not a test): builds a 1,000-line spec of
 * many small fits and times analyze() on it. Target: median <= 20 ms.
 *
 *   node build.mjs && node dist/parse-bench.js
 */
import { analyze } from '../../parser/index';

const TARGET_LINES = 1000;
const RUNS = 50;
const WARMUP = 10;

/** An invented multi-rig lab spec: one data table and constant per rig, one fit with queries per rig. */
export function benchSpec(lines: number): string {
  const out: string[] = ['# Parser benchmark: batch of invented oven rigs'];
  for (let i = 0; ; i++) {
    const block = [
      `data rig${i} = "rigs/rig${i}.csv" where time_min >= 0 and not (flag == 1) delimiter ";"`,
      `const ambient${i} = ${20 + (i % 7) * 0.5} [degC]`,
      `fit cool${i} on rig${i} {`,
      `  # two-stage cooling with a small drift term`,
      `  model temp_C = ambient${i} + rise * exp(-time_min / tau) + slow * exp(-time_min / tau2) + drift * time_min`,
      `  param rise = 60 in [0, 200] [degC]`,
      `  param tau = 10 in [0.1, 1000] [min]`,
      `  param slow = 5 in [0, 50] [degC]`,
      `  param tau2 = 120 in [1, inf] [min]`,
      `  param drift = 0 in [-1, 1]`,
      `  sigma max(temp_sd, 0.05)`,
      `  loss huber scale 1.5`,
      `  level 0.9`,
      `  iterations 400`,
      `}`,
      `predict cool${i} at time_min = 5, 10, 30, 60`,
      `expect cool${i}.tau within 5 .. 15`,
      `expect cool${i}.r2 above 0.99`,
      ``,
    ];
    if (out.length + block.length > lines) break;
    out.push(...block);
  }
  while (out.length < lines) out.push('# (padding)');
  return out.join('\n') + '\n';
}

function main(): void {
  const text = benchSpec(TARGET_LINES);
  const lineCount = text.split('\n').length - 1;
  for (let i = 0; i < WARMUP; i++) analyze(text);
  const times: number[] = [];
  let diagnostics = 0;
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now();
    const r = analyze(text);
    times.push(performance.now() - t0);
    diagnostics = r.diagnostics.length;
  }
  times.sort((a, b) => a - b);
  const median = times.length % 2 ? times[(times.length - 1) / 2] : (times[times.length / 2 - 1] + times[times.length / 2]) / 2;
  console.log(`parse-bench: ${lineCount} lines, ${text.length} chars, ${RUNS} runs after ${WARMUP} warm-up runs`);
  console.log(`analyze(): median ${median.toFixed(2)} ms, min ${times[0].toFixed(2)} ms, max ${times[times.length - 1].toFixed(2)} ms (target <= 20 ms median)`);
  console.log(`diagnostics on the generated spec: ${diagnostics}`);
}

main();
