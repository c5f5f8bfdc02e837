/**
 * Parity of the results panel with the CLI: for the same fit, the panel's
 * model (extension/logic/panel-model.ts) shows the same text for every number
 * as the CLI summary (engine/front/views/text.ts) and the Markdown report —
 * the same digits (engine/format.ts), the same thresholds and the same
 * symbol (engine/thresholds.ts). Fits of invented data run through the real
 * engine: a calibration line far from x = 0 (a strongly correlated intercept
 * and slope), a first-order decay (a model nonlinear in its parameters), and
 * a fit whose standard errors dwarf its estimates.
 */
import { describe, expect, it } from 'vitest';
import type { FitResult } from '../../engine/result';
import { fitTextLines } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import { correlationCaption, goodnessEntries, r2Caveat } from '../../engine/front/views/summary';
import { fitWarnings } from '../../engine/stats/warnings';
import { warningInput } from '../fixtures/warning-input';
import { CORRELATION_SYMBOL, THRESHOLDS } from '../../engine/thresholds';
import { formatNumber } from '../../engine/format';
import { buildPanelModel, panelFit } from '../../extension/logic/panel-model';
import { panelNumberColumns } from '../../extension/logic/panel-align';
import { runSpec, tempDir, writeCsv } from '../run/helpers';

const dir = tempDir();
// a calibration line read at 100 … 110 (far from 0: intercept and slope correlate near -1), noise from a sine hash
const xs = Array.from({ length: 12 }, (_, i) => 100 + i);
writeCsv(dir, 'line.csv', ['x', 'y'], xs.map((x, i) => [x, (0.52 * x + 3.1 + 0.05 * Math.sin(12.9898 * (i + 1))).toFixed(4)]));
const ts = Array.from({ length: 15 }, (_, i) => 1 + i * 40);
writeCsv(dir, 'decay.csv', ['t', 'y'], ts.map((t, i) => [t, (40 * Math.exp(-0.004 * t) + 3 + 0.4 * Math.sin(12.9898 * i)).toFixed(4)]));

const LINE = `data d = "line.csv"
fit cal on d {
  model y = a + b * x
  param a
  param b
}
`;
const DECAY = `data d = "decay.csv"
fit decay on d {
  model y = a * exp(-k * t) + c
  param a = 10
  param k = 1 in [0, inf]
  param c = 0
}
`;

/** The CLI line that starts with `label` followed by a space. */
function cliLine(lines: string[], label: string): string {
  const line = lines.find((l) => l.trimStart().startsWith(`${label} `));
  expect(line, label).toBeDefined();
  return line!;
}

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
/** `cell` as a whole cell of a text line (between spaces or at its ends). */
const asCell = (cell: string) => new RegExp(`(^|\\s)${escape(cell)}(\\s|$)`);

/** Panel labels of the headline figures and the CLI labels of the same statistics. */
const KEY_STAT_LABELS: Record<string, string> = {
  RMSE: 'residual standard deviation (RMSE)',
  'R²': 'R²',
  AICc: 'AICc',
  'χ²/ν': 'reduced χ² (χ²/dof)',
};

function expectParity(fit: FitResult): void {
  const panel = panelFit(fit, false);
  const cli = fitTextLines(fit);
  // parameter table: every cell of the panel's row is a cell of the CLI's line for that parameter
  // the page shows each numeric column in one notation, as the CLI's table does (panel-align.ts `panelNumberColumns`)
  for (const row of panelNumberColumns(panel.parameterRows, (j) => j >= 1 && j <= 4)) {
    const line = cliLine(cli, row[0]);
    for (const cell of row.slice(1, 5).filter((c) => c !== '')) expect(line, `${row[0]}: ${cell}`).toMatch(asCell(cell));
  }
  // headline figures: the same string as the CLI's goodness-of-fit line
  const shown = panel.keyStats.filter((k) => KEY_STAT_LABELS[k.label]);
  expect(shown.length).toBeGreaterThanOrEqual(3);
  for (const k of shown) expect(cliLine(cli, KEY_STAT_LABELS[k.label]), k.label).toMatch(asCell(k.value));
  // the goodness table is the CLI's, entry for entry
  expect(panel.goodness).toEqual(goodnessEntries(fit));
  // correlations: the panel's value is the one in the CLI's warning for that pair, with the same symbol
  for (const c of panel.correlations) {
    const warning = cli.find((l) => l.includes('strongly correlated') && l.includes(c.a) && l.includes(c.b));
    expect(warning, `${c.a} · ${c.b}`).toContain(`(${CORRELATION_SYMBOL} = ${c.r})`);
  }
}

describe('panel and CLI show the same text for the same number', () => {
  it('a calibration line: parameters, headline figures and the correlated pair', async () => {
    const { result } = await runSpec(LINE, dir);
    const fit = result.fits[0];
    expect(fit.stop.converged).toBe(true);
    expect(Math.abs(fit.correlation[0][1])).toBeGreaterThan(THRESHOLDS.correlation); // the case under test
    const panel = panelFit(fit, false);
    expect(panel.correlations).toHaveLength(1);
    expect(panel.correlationCaption).toBe(correlationCaption());
    expect(panel.correlationCaption).toContain(`|${CORRELATION_SYMBOL}| > ${formatNumber(THRESHOLDS.correlation)}`);
    expectParity(fit);
    // and the Markdown report prints the same parameter cells
    const report = markdownReport(result);
    for (const row of panel.parameterRows) for (const cell of row.slice(1, 5)) expect(report).toContain(` ${cell} `);
  });

  it('a model nonlinear in its parameters: the R² caveat is the warning, in the CLI and the panel alike', async () => {
    const { result } = await runSpec(DECAY, dir);
    const fit = result.fits[0];
    expect(fit.stop.converged).toBe(true);
    const caveat = r2Caveat(fit);
    expect(caveat).toBe(fit.warnings.find((w) => w.code === 'r2_nonlinear')?.message);
    expect(cliLine(fitTextLines(fit), 'R²')).toContain(caveat!);
    expect(panelFit(fit, false).keyStats.find((k) => k.label === 'R²')?.title).toContain(caveat!);
    expectParity(fit);
  });

  it('standard errors far above the estimates: the same non-zero estimates in both (issue 13: 1.0 printed as 0)', async () => {
    const { result } = await runSpec(LINE, dir);
    const real = result.fits[0];
    const fit: FitResult = {
      ...real,
      parameters: real.parameters.map((p, i) => ({ ...p, estimate: i === 0 ? 1.0 : 4.64, stderr: 60165, lower: -120330, upper: 120340 })),
    };
    const rows = panelFit(fit, false).parameterRows;
    expect(rows.map((r) => r[1])).toEqual(['1', '4.6']);
    expect(rows[0].slice(2, 5)).toEqual(['60000', '-120000', '120000']);
    expectParity(fit);
  });

  it('the whole model of a run carries the same parameter rows as the CLI', async () => {
    const { result } = await runSpec(DECAY, dir);
    const model = buildPanelModel(result, { specUri: 'file:///decay.lsq', specName: 'decay.lsq' });
    const cli = fitTextLines(result.fits[0]);
    for (const row of model.fits[0].parameterRows) expect(cliLine(cli, row[0])).toMatch(asCell(row[1]));
  });
});

describe('panel and engine warnings use one correlation threshold', () => {
  const input = (rho: number) => warningInput({ correlation: [[1, rho], [rho, 1]] });


  it('lists a pair in the panel exactly when the engine warns about it', async () => {
    const { result } = await runSpec(LINE, dir);
    const real = result.fits[0];
    const t = THRESHOLDS.correlation;
    for (const rho of [0.5, 0.95, 0.97, t, t + 1e-4, 0.999, -0.97, -0.995]) {
      const warned = fitWarnings(input(rho)).some((w) => w.code === 'high_correlation');
      const fit: FitResult = { ...real, correlation: [[1, rho], [rho, 1]] };
      const listed = panelFit(fit, false).correlations.length > 0;
      expect(listed, `ρ = ${rho}`).toBe(warned);
    }
    expect(fitWarnings(input(0.995)).some((w) => w.code === 'high_correlation')).toBe(true);
    expect(fitWarnings(input(0.97)).some((w) => w.code === 'high_correlation')).toBe(false);
  });
});
