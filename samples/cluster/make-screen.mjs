#!/usr/bin/env node
// Invented screening data for the cluster example: N compounds (default 2400),
// each tested at 8 concentrations (1 nM to 10 µM, half-log steps), one
// response per well: a four-parameter logistic with its own potency and
// slope, plus noise. Deterministic (a fixed seed), so every run of the
// example fits the same file.
//   node samples/cluster/make-screen.mjs [N] > screen.csv
const n = Number(process.argv[2] ?? 2400);
if (!(Number.isInteger(n) && n >= 1)) {
  process.stderr.write('usage: make-screen.mjs [N compounds, a whole number]\n');
  process.exit(2);
}
let state = 0x5eed2026;
const uniform = () => {
  // mulberry32 (public domain; common practice for test data)
  state = (state + 0x6d2b79f5) >>> 0;
  let t = state;
  t = Math.imul(t ^ (t >>> 15), t | 1);
  t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
};
const normal = () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
const doses = Array.from({ length: 8 }, (_, i) => 10 ** (-3 + 0.5 * i)); // µM
const out = ['compound,dose_um,inhibition_pct'];
for (let c = 0; c < n; c++) {
  const id = `CPD-${String(c + 1).padStart(6, '0')}`;
  const ec50 = 10 ** (-2.5 + 3 * uniform());
  const hill = 0.7 + 1.0 * uniform();
  const top = 95 + 10 * uniform();
  const bottom = -3 + 6 * uniform();
  for (const d of doses) {
    const y = bottom + (top - bottom) / (1 + (ec50 / d) ** hill) + 2.5 * normal();
    out.push(`${id},${d.toPrecision(6)},${y.toFixed(2)}`);
  }
}
process.stdout.write(out.join('\n') + '\n');
