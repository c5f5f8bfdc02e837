/**
 * The results page's trust views in real headless Chromium (as
 * test/extension/panel.test.ts): the scenario of panel-scenario.ts (five
 * declared fits, one failing at run time, one stopped at its iteration
 * limit) as the extension would show it. Checks each fit's entry and state,
 * the warnings chip opening the warnings, the between-groups comparison of
 * the joint fit of samples/potency, and takes light, dark and
 * high-contrast screenshots of each view (test/artifacts/extension/;
 * `UPDATE_SCREENSHOTS=1` copies them to test/extension/screenshots/).
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { chromium } from 'playwright-core';
import { requireInCi } from '../fixtures/required';
import type { PanelModel } from '../../extension/logic/panel-model';
import { ARTIFACTS, bundlePage, CHROMIUM_ARGS, ROOT, servePanel, type PanelServer, type ThemeName } from './panel-harness';
import { runScenario } from './panel-scenario';
import { buildPanelModel } from '../../extension/logic/panel-model';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { runPlan } from '../../engine/runner/run-plan';
import { toTsv } from '../../extension/logic/panel-copy';
import { JOINT_CAUTION } from '../../engine/front/views/joint';

const CHROMIUM = process.env.CHROMIUM ?? '/usr/bin/chromium';
const haveChromium = requireInCi('Chromium for the panel page test', existsSync(CHROMIUM), `CHROMIUM=${CHROMIUM}`);
const THEME_NAMES: ThemeName[] = ['light', 'dark', 'high-contrast'];

let browser: Browser;
let server: PanelServer;
let model: PanelModel;

async function open(theme: ThemeName, m: PanelModel | undefined, savedState?: unknown, width = 1180): Promise<{ page: Page; problems: string[] }> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  const problems: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error' || msg.type() === 'warning') problems.push(`${msg.type()}: ${msg.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  await page.goto(server.url(theme, savedState));
  await page.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((x) => x.type === 'ready'));
  if (m) await page.evaluate((x) => window.postMessage({ type: 'show', model: x }, '*'), m as unknown as Record<string, unknown>);
  await page.waitForSelector('body[data-rendered="true"]');
  return { page, problems };
}

const posted = (page: Page) => page.evaluate(() => (window as unknown as { __posted: Record<string, unknown>[] }).__posted);

/** A screenshot of the view in the artifacts, copied to the checked-in screenshots with UPDATE_SCREENSHOTS=1. */
async function shot(page: Page, name: string, selector?: string): Promise<void> {
  mkdirSync(ARTIFACTS, { recursive: true });
  const path = join(ARTIFACTS, `${name}.png`);
  if (selector) {
    // the sticky toolbar would cover part of a tall element's screenshot
    await page.evaluate(() => document.querySelectorAll<HTMLElement>('.lw-toolbar').forEach((t) => (t.style.position = 'static')));
    await page.locator(selector).first().screenshot({ path });
  }
  else await page.screenshot({ path });
  if (process.env.UPDATE_SCREENSHOTS === '1') {
    const dir = join(ROOT, 'test', 'extension', 'screenshots');
    mkdirSync(dir, { recursive: true });
    copyFileSync(path, join(dir, `${name}.png`));
  }
}

async function select(page: Page, key: string): Promise<void> {
  await page.locator(`button.lw-nav-item[data-key="${key}"]`).click();
  await page.waitForSelector('body[data-rendered="true"]');
}

describe.skipIf(!haveChromium)('extension/panel trust views in Chromium', () => {
  beforeAll(async () => {
    model = (await runScenario()).model;
    const out = join(ARTIFACTS, 'panel-views-build');
    await bundlePage(out);
    server = await servePanel(out);
    const scratch = join(ARTIFACTS, 'chromium-views');
    mkdirSync(scratch, { recursive: true });
    browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS, env: { ...process.env, XDG_CONFIG_HOME: scratch, XDG_CACHE_HOME: scratch } });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('lists every declared fit with its state, and the failed one with its reason', async () => {
    for (const theme of THEME_NAMES) {
      const { page, problems } = await open(theme, model);
      const nav = await page.locator('button.lw-nav-item').evaluateAll((bs) => bs.map((b) => b.textContent));
      expect(nav.slice(0, 5)).toEqual(['newton', 'line', 'quad', 'slownot converged', 'emptyfailed']);
      await expect(page.locator('.lw-chips').textContent()).resolves.toMatch(/^3\/5 converged1 not converged1 failed/);
      await select(page, 'empty');
      await expect(page.locator('section.lw-missing[data-state="failed"] .lw-reasons li').textContent()).resolves.toMatch(/where condition of the data statement leaves none/);
      await shot(page, `panel-failed-fit-${theme}`);
      await select(page, 'slow');
      await expect(page.locator('section.lw-fit[data-state="not_converged"] .lw-notfitted').textContent()).resolves.toMatch(/^Not a fitted result/);
      expect(await page.locator('.lw-keystats').textContent()).not.toMatch(/RMSE|R²/);
      expect(problems, theme).toEqual([]);
      await page.close();
    }
  });

  it('opens the warnings from the chip; the count is the list\'s length, each entry leads to its fit', async () => {
    for (const theme of THEME_NAMES) {
      const { page } = await open(theme, model);
      const chip = page.locator('button.lw-chip[data-open="#warnings"]');
      await expect(chip.textContent()).resolves.toBe(`${model.findings.length} warnings`);
      await chip.click();
      await page.waitForSelector('section.lw-warnings-all');
      expect(await page.locator('section.lw-warnings-all li').count()).toBe(model.findings.length);
      await shot(page, `panel-warnings-${theme}`);
      await page.locator('.lw-warn-fit[data-fit="line"] h3 button').click();
      await page.waitForSelector('section.lw-fit[data-fit-key="line"]');
      await page.close();
    }
  });

  it('shows the comparison of the fits that converged, naming the one left out', async () => {
    const { page } = await open('light', model);
    await select(page, '#checks');
    const text = await page.locator('section.lw-checks').textContent();
    expect(text).toContain('Left out of the ranking: slow');
    expect(text).toContain('slow left out: the fit did not converge (max_iterations');
    expect(text).toContain('The data');
    await page.close();
  });

  it('comes back from its saved state after a reload with the same selection', async () => {
    const first = await open('light', model);
    await select(first.page, 'empty');
    const state = await first.page.evaluate(() => (window as unknown as { __state: unknown }).__state);
    await first.page.close();
    const { page } = await open('light', undefined, state);
    await page.waitForSelector('section.lw-missing');
    expect((await posted(page)).filter((m) => m.type !== 'ready' && m.type !== 'log')).toEqual([]);
    await page.close();
  });

  it('draws a swatch legend in the theme colours of the bands, and the rows left out muted with the reason', async () => {
    for (const theme of THEME_NAMES) {
      const { page, problems } = await open(theme, model);
      const fig = page.locator('figure[data-chart-id="fit"]');
      const subtitle = await fig.locator('svg .role-title-subtitle').textContent();
      expect(subtitle, theme).not.toMatch(/shade/);
      const legend = await fig.locator('svg .role-legend-label').allTextContents();
      // newton's weight reads columns other than the predictor: no prediction band, and the caption says why
      expect(legend, theme).toEqual(['data', 'fitted curve', '95% confidence band']);
      expect(subtitle, theme).toMatch(/No prediction band: the spread of a new point comes from a column other than time_min/);
      // each swatch has the colour its marks are drawn in
      const swatches = await fig.locator('svg .role-legend-symbol path').evaluateAll((ps) => ps.map((p) => p.getAttribute('fill')));
      const bandFill = (name: string) => fig.locator(`svg .role-mark.${name}_marks path`).first().getAttribute('fill');
      expect(swatches[2], theme).toBe(await bandFill('confidence_band'));
      // and the opacity they are drawn with (one shared legend drew every swatch at the bands' opacity)
      const swatchOpacity = await fig.locator('svg .role-legend-symbol path').evaluateAll((ps) => ps.map((p) => p.getAttribute('opacity') ?? '1'));
      const markOpacity = (name: string) => fig.locator(`svg .role-mark.${name}_marks path`).first().evaluate((p) => p.getAttribute('opacity') ?? p.parentElement?.getAttribute('opacity') ?? '1');
      expect(swatchOpacity, theme).toEqual([await markOpacity('data_points'), await markOpacity('fitted_curve'), await markOpacity('confidence_band')]);
      await expect(page.locator('section.lw-fit .lw-rows').textContent()).resolves.toBe('n = 28 fitted (of 31 rows: 1 with an empty or NA cell (line 27), 2 with weight 0 (lines 10, 22), drawn hollow)');
      const hollow = fig.locator('svg .role-mark.excluded_points_marks path');
      expect(await hollow.count()).toBe(2);
      await hollow.first().hover();
      const tip = page.locator('#vg-tooltip-element.visible');
      await tip.waitFor();
      expect(await tip.textContent()).toMatch(/left out\s*weight 0: left out of the fit/);
      await shot(page, `panel-fit-legend-${theme}`, 'section.lw-fit');
      // the unweighted line has both bands, each swatch in its band's colour
      await select(page, 'line');
      const lineFig = page.locator('figure[data-chart-id="fit"]');
      expect(await lineFig.locator('svg .role-legend-label').allTextContents(), theme).toEqual(['data', 'fitted curve', '95% confidence band', '95% prediction band']);
      const lineSwatches = await lineFig.locator('svg .role-legend-symbol path').evaluateAll((ps) => ps.map((p) => p.getAttribute('fill')));
      const lineFill = (name: string) => lineFig.locator(`svg .role-mark.${name}_marks path`).first().getAttribute('fill');
      expect(lineSwatches[2], theme).toBe(await lineFill('confidence_band'));
      expect(lineSwatches[3], theme).toBe(await lineFill('prediction_band'));
      expect(problems, theme).toEqual([]);
      await page.close();
    }
  });

  it('switches the residual kind (standardized first for the weighted fit) and the x axis, and keeps the choice after a reload', async () => {
    const { page, problems } = await open('light', model);
    const yTitle = () => page.locator('figure[data-chart-id="residuals-fitted"] svg .role-axis-title').allTextContents();
    await expect(page.locator('.lw-segmented[data-control="residual"] button.on').textContent()).resolves.toBe('standardized');
    expect(await yTitle()).toContain('standardized residual (weighted residual / s)');
    await page.locator('.lw-segmented[data-control="residual"] button[data-value="percent"]').click();
    await page.waitForSelector('body[data-rendered="true"]');
    expect(await yTitle()).toContain('residual, % of the fitted value');
    // the readings start at t = 0: no logarithmic axis
    expect(await page.locator('.lw-segmented[data-control="x-scale"] button[data-value="log"]').isDisabled()).toBe(true);
    const state = await page.evaluate(() => (window as unknown as { __state: unknown }).__state);
    await page.close();
    for (const theme of THEME_NAMES) {
      const again = await open(theme, undefined, state);
      await expect(again.page.locator('.lw-segmented[data-control="residual"] button.on').textContent()).resolves.toBe('% of fitted');
      await shot(again.page, `panel-residual-kind-${theme}`, 'section.lw-fit .lw-chart-controls + .lw-charts');
      await again.page.close();
    }
    // the unweighted fit starts on raw residuals
    const second = await open('light', model);
    await select(second.page, 'line');
    await expect(second.page.locator('.lw-segmented[data-control="residual"] button.on').textContent()).resolves.toBe('raw');
    await second.page.close();
    expect(problems).toEqual([]);
  });

  it('copies a table as tab-separated text and hands a drawn chart to the host as PNG and SVG', async () => {
    const { page, problems } = await open('light', model);
    await page.locator('table.lw-params caption button.lw-copy').click();
    const copy = (await posted(page)).find((m) => m.type === 'copy') as { text: string; what: string };
    const newton = model.fits.find((f) => f.key === 'newton')!;
    expect(copy.what).toBe('Parameters (click a row to show its declaration)');
    expect(copy.text).toBe([newton.parameterHeaders, ...newton.parameterRows].map((r) => r.join('\t')).join('\n') + '\n');
    for (const format of ['svg', 'png'] as const) {
      await page.locator(`figure[data-chart-id="fit"] button.lw-save[data-format="${format}"]`).click();
      await page.waitForFunction((f) => (window as unknown as { __posted: { type: string; format?: string }[] }).__posted.some((m) => m.type === 'saveChart' && m.format === f), format);
    }
    const saves = (await posted(page)).filter((m) => m.type === 'saveChart') as { format: string; name: string; data: string }[];
    expect(saves.map((x) => x.name)).toEqual(['newton-data-and-fitted-curve.svg', 'newton-data-and-fitted-curve.png']);
    const svg = saves[0].data;
    expect(svg.startsWith('<svg')).toBe(true);
    // no blank strip on the right: the document is as wide as the chart drawn in the page
    const drawnWidth = await page.locator('figure[data-chart-id="fit"] .lw-chart-canvas svg').evaluate((e) => Number(e.getAttribute('width')));
    expect(Number(/width="(\d+(?:\.\d+)?)"/.exec(svg)?.[1])).toBe(drawnWidth);
    expect(saves[1].data.startsWith('data:image/png;base64,')).toBe(true);
    const png = Buffer.from(saves[1].data.slice(saves[1].data.indexOf(',') + 1), 'base64');
    expect(png.subarray(1, 4).toString('ascii')).toBe('PNG');
    expect(png.readUInt32BE(16)).toBe(2 * drawnWidth); // 2× resolution
    expect(problems).toEqual([]);
    await page.close();
  });

  it('summarises the per-group checks of the plate sample: counts per expectation, failures, derived values per well', async () => {
    const spec = readFileSync(join(ROOT, 'samples', 'plate', 'plate.lsq'), 'utf8');
    const dir = join(ROOT, 'samples', 'plate');
    const { plan } = analyze(spec, { headers: headerLookup(dir) });
    const run = await runPlan(plan, { baseDir: dir, specText: spec, threads: 1 });
    const plate = buildPanelModel(run, { specUri: 'file:///work/samples/plate/plate.lsq', specName: 'plate.lsq', declaredFits: plan.fits.map((f) => f.name) });
    for (const theme of THEME_NAMES) {
      const { page, problems } = await open(theme, plate);
      await select(page, '#checks');
      const items = await page.locator('.lw-expect-summary > ul > li').count();
      expect(items).toBe(plan.expectations.length);
      expect(await page.locator('table.lw-derived-table tbody tr').count()).toBe(run.fits.length);
      await expect(page.locator('.lw-expect-summary h3').textContent()).resolves.toMatch(/^Expectations: \d+ passed, \d+ failed$/);
      await shot(page, `panel-group-checks-${theme}`);
      expect(problems, theme).toEqual([]);
      await page.close();
    }
  });

  it('shows the between-groups comparison of the potency sample\'s joint fit first in its group entry, with aligned numbers, copy and the caution', async () => {
    const dir = join(ROOT, 'samples', 'potency');
    const spec = readFileSync(join(dir, 'potency.lsq'), 'utf8');
    const { plan } = analyze(spec, { headers: headerLookup(dir) });
    const run = await runPlan(plan, { baseDir: dir, specText: spec, threads: 1 });
    const potency = buildPanelModel(run, { specUri: 'file:///work/samples/potency/potency.lsq', specName: 'potency.lsq', declaredFits: plan.fits.map((f) => f.name) });
    const joint = potency.joint![0];
    for (const theme of THEME_NAMES) {
      const { page, problems } = await open(theme, potency);
      await select(page, '#group:potency');
      // the comparison leads, then the group table and the overlay, then the first group's fit
      const order = await page.locator('main > section').evaluateAll((ss) => ss.map((x) => x.className));
      expect(order.slice(0, 3), theme).toEqual(['lw-joint', 'lw-group', 'lw-fit']);
      const section = page.locator('section.lw-joint[data-fit="potency"]');
      await expect(section.locator('h2').textContent()).resolves.toBe('Between groups: potency');
      const captions = await section.locator('table caption').evaluateAll((cs) => cs.map((c) => c.firstChild?.textContent ?? ''));
      expect(captions).toEqual(joint.tables.map((t) => t.title));
      // every cell as the CLI prints it; the number columns drawn as numbers with their decimal padding
      const pairs = section.locator('table').nth(2);
      const cells = await pairs.locator('tbody tr').first().locator('th, td').allTextContents();
      expect(cells).toEqual(joint.tables[2].rows[0]);
      const numClasses = await pairs.locator('tbody tr').first().locator('th, td').evaluateAll((cs) => cs.map((c) => c.classList.contains('num')));
      expect(numClasses).toEqual([false, false, false, true, true, true, true]);
      const fPad = await section.locator('table').nth(1).locator('tbody tr td:nth-child(2)').evaluateAll((cs) => cs.map((c) => (c as HTMLElement).dataset.pad ?? ''));
      expect(fPad.length).toBe(4);
      expect(fPad.some((p) => p.length > 0)).toBe(true);
      await expect(section.locator('.lw-joint-readings li').count()).resolves.toBe(joint.readings.length);
      await expect(section.locator('.lw-caution').textContent()).resolves.toBe(JOINT_CAUTION);
      // the overlay of the joint fit's groups is drawn, one legend entry per group
      const legend = await page.locator('section.lw-group figure[data-chart-id="overlay"] svg .role-legend-label').allTextContents();
      expect(legend.sort(), theme).toEqual(['Reference std', 'Test lot 7']);
      await shot(page, `panel-joint-${theme}`, 'section.lw-joint');
      await shot(page, `panel-joint-overlay-${theme}`, 'section.lw-group');
      if (theme === 'light') {
        await section.locator('table').nth(1).locator('caption button.lw-copy').click();
        const copy = (await posted(page)).find((m) => m.type === 'copy') as { text: string; what: string };
        expect(copy.what).toBe(joint.tables[1].title);
        expect(copy.text).toBe(toTsv(joint.tables[1].headers, joint.tables[1].rows));
        expect(copy.text.split('\n')[1].split('\t')).toEqual(joint.tables[1].rows[0]);
      }
      expect(problems, theme).toEqual([]);
      await page.close();
    }
  });
});
