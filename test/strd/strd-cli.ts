/**
 * `npm run strd`: fits every NIST StRD regression dataset (nonlinear from
 * both starts, linear once) and prints the LRE table. `--solver
 * lm|reflective|projection` and `--bounds none|sign` choose the nonlinear
 * solver variant (test/strd/run-strd.ts; default lm, none); `--json` prints
 * `[{dataset, start, minLreParams, minLreSE, lreRSS, iterations, stop}]`.
 * Exit code 0 when every case meets its target (nonlinear: parameters ≥ 7,
 * SE and RSS ≥ 6; linear: parameters ≥ 9, SE and RSS ≥ 6), 1 otherwise,
 * 2 when the data folder is missing (STRD_DIR, default ../shared/strd).
 */
import { strdDir, strdAvailable, listDatasets } from './read-strd';
import { runAll, meetsTargets, NLS_ORDER, LLS_ORDER, TARGETS, type StrdRow, type StrdVariant } from './run-strd';

function table(rows: StrdRow[]): string {
  const head = ['dataset', 'start', 'LRE params', 'LRE SE', 'LRE RSS', 'iter', 'stop', 'target'];
  const body = rows.map((r) => [
    r.dataset,
    r.start === null ? 'linear' : String(r.start),
    r.minLreParams.toFixed(1),
    r.minLreSE.toFixed(1),
    r.lreRSS.toFixed(1) + (r.floor ? '*' : ''),
    String(r.iterations),
    r.stop,
    meetsTargets(r) ? 'ok' : 'BELOW',
  ]);
  const widths = head.map((h, k) => Math.max(h.length, ...body.map((b) => b[k].length)));
  const line = (cells: string[]) => cells.map((c, k) => (k >= 2 && k <= 5 ? c.padStart(widths[k]) : c.padEnd(widths[k]))).join('  ');
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...body.map(line)].join('\n');
}

function main(argv: string[]): number {
  const dir = strdDir();
  if (!strdAvailable(dir)) {
    process.stderr.write(`NIST StRD data not found at ${dir} (set STRD_DIR)\n`);
    return 2;
  }
  const present = { nls: new Set(listDatasets('nls', dir)), lls: new Set(listDatasets('lls', dir)) };
  const flag = (name: string, allowed: string[], fallback: string): string => {
    const k = argv.indexOf(name);
    const v = k >= 0 ? argv[k + 1] : fallback;
    if (!allowed.includes(v)) throw new Error(`${name} must be one of ${allowed.join(', ')}`);
    return v;
  };
  const variant = { solver: flag('--solver', ['lm', 'reflective', 'projection'], 'lm'), bounds: flag('--bounds', ['none', 'sign'], 'none') } as StrdVariant;
  const rows = runAll({ nls: NLS_ORDER.filter((d) => present.nls.has(d)), lls: LLS_ORDER.filter((d) => present.lls.has(d)) }, dir, variant);
  const failing = rows.filter((r) => !meetsTargets(r));
  if (argv.includes('--json')) {
    const out = rows.map(({ dataset, start, minLreParams, minLreRelabelled, minLreSE, lreRSS, iterations, stop }) => ({ dataset, start, minLreParams, minLreRelabelled, minLreSE, lreRSS, iterations, stop }));
    process.stdout.write(JSON.stringify(out, null, 2) + '\n');
  } else {
    process.stdout.write(`NIST StRD (${dir}); nonlinear solver ${variant.solver}, bounds ${variant.bounds}\n\n${table(rows)}\n\n`);
    process.stdout.write(`LRE = -log10(relative error), capped at the certified digits; minimum over parameters.\n`);
    process.stdout.write(`Targets: nonlinear params >= ${TARGETS.nls.params}, SE/RSS >= ${TARGETS.nls.se}; linear params >= ${TARGETS.lls.params}, SE/RSS >= ${TARGETS.lls.se}.\n`);
    process.stdout.write(`* rounding-level RSS (Lanczos1): RSS floor rule, SE compared as SE/s (see test/strd/run-strd.ts).\n`);
    process.stdout.write(`${rows.length - failing.length}/${rows.length} cases meet their targets.\n`);
  }
  return failing.length === 0 ? 0 : 1;
}

process.exitCode = main(process.argv.slice(2));
