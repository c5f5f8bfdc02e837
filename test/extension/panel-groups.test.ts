/**
 * The results page's views across groups in real headless Chromium (as
 * panel.test.ts, same harness): the overlay with its legend selection, the
 * residuals by group, the parameter charts with group labels, and the plate
 * map with its chooser and click-through, for an invented 96-well run of
 * straight-line groups (fixtures/line-fit.ts) with one well left empty and
 * one group that did not converge. Screenshots go to test/artifacts/extension/.
 */
import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { chromium } from 'playwright-core';
import type { FitResult } from '../../engine/result';
import { buildPanelModel, type PanelModel } from '../../extension/logic/panel-model';
import { wellName } from '../../engine/front/views/wells';
import { requireInCi } from '../fixtures/required';
import { lineData, lineFit, runOf } from '../fixtures/line-fit';
import { ARTIFACTS, bundlePage, CHROMIUM_ARGS, servePanel, type PanelServer, type ThemeName } from './panel-harness';

const CHROMIUM = process.env.CHROMIUM ?? '/usr/bin/chromium';
const haveChromium = requireInCi('Chromium for the panel page test', existsSync(CHROMIUM), `CHROMIUM=${CHROMIUM}`);

/** 95 wells (H12 empty) of straight lines whose slope rises across the columns; well C05 did not converge. */
function plateRun(): PanelModel {
  const wells = Array.from({ length: 96 }, (_, i) => wellName(Math.floor(i / 12), (i % 12) + 1)).filter((w) => w !== 'H12');
  const fits: FitResult[] = wells.map((w, i) => lineFit({ ...lineData(6, 900 + i, { b: 0.04 + 0.004 * (i % 12) }), name: 'assay', group: w, predictor: 'time_min', response: 'signal' }));
  const c05 = wells.indexOf('C05');
  fits[c05] = { ...fits[c05], iterations: 40, stop: { code: 'max_iterations', message: 'iteration limit 40 reached', converged: false } } as FitResult;
  return buildPanelModel(runOf(fits), { specUri: 'file:///work/plate/assay.lsq', specName: 'assay.lsq' });
}

let browser: Browser;
let server: PanelServer;
const model = plateRun();

async function open(theme: ThemeName): Promise<{ page: Page; problems: string[] }> {
  const page = await browser.newPage({ viewport: { width: 1180, height: 1400 } });
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') problems.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  await page.goto(server.url(theme));
  await page.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((m) => m.type === 'ready'));
  await page.evaluate((m) => window.postMessage({ type: 'show', model: m }, '*'), model as unknown as Record<string, unknown>);
  await page.waitForSelector('body[data-rendered="true"]');
  return { page, problems };
}

const marks = (page: Page, id: string) => page.locator(`figure[data-chart-id="${id}"]`).first().evaluate((f) => Number((f as HTMLElement).dataset.marks));

describe.skipIf(!haveChromium)('extension/panel views across groups in Chromium', () => {
  beforeAll(async () => {
    const out = join(ARTIFACTS, 'panel-groups-build');
    await bundlePage(out);
    server = await servePanel(out);
    const scratch = join(ARTIFACTS, 'chromium-groups');
    mkdirSync(scratch, { recursive: true });
    browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS, env: { ...process.env, XDG_CONFIG_HOME: scratch, XDG_CACHE_HOME: scratch } });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('draws the overlay, the residuals by group, the parameter charts and the plate map in every theme, without errors', async () => {
    for (const theme of ['light', 'dark', 'high-contrast'] as const) {
      const { page, problems } = await open(theme);
      const ids = await page.locator('section.lw-group figure.lw-chart').evaluateAll((fs) => fs.map((f) => (f as HTMLElement).dataset.chartId));
      expect(ids, theme).toEqual(['plate-flags', 'overlay', 'residuals-by-group', 'group-intercept', 'group-slope']);
      for (const id of ids) expect(await marks(page, id!), `${theme} ${id}`).toBeGreaterThan(0);
      // 8 coloured groups (the flagged C05 among them) and the other 87 as thin lines
      expect(await page.locator('figure[data-chart-id="overlay"] .role-legend-label text').allTextContents()).toEqual(['A01', 'A02', 'A03', 'A04', 'A05', 'A06', 'A07', 'C05']);
      expect(await page.locator('figure[data-chart-id="overlay"] .role-mark.other_curves_marks path').count()).toBe(87);
      // group labels on the axis of a parameter chart: 95 groups, every 3rd labelled
      const axis = await page.locator('figure[data-chart-id="group-slope"] .role-axis-label text').allTextContents();
      expect(axis).toContain('A01');
      expect(axis).toContain('A04');
      expect(axis).not.toContain('A02');
      // the plate: 96 wells, 95 with a group, the empty H12 only outlined
      expect(await page.locator('figure[data-chart-id="plate-flags"] .role-mark.wells_marks path').count()).toBe(96);
      expect(await page.locator('figure[data-chart-id="plate-flags"] .role-mark.well_values_marks path').count()).toBe(95);
      expect(problems, theme).toEqual([]);
      await page.screenshot({ path: join(ARTIFACTS, `panel-groups-${theme}.png`), fullPage: true });
      // close-ups for review (artifacts only)
      for (const id of ['overlay', 'plate-flags', 'group-slope']) await page.locator(`figure[data-chart-id="${id}"]`).screenshot({ path: join(ARTIFACTS, `panel-groups-${theme}-${id}.png`) });
      await page.close();
    }
  });

  it('picks a group from the overlay legend: its points stay, the others dim', async () => {
    const { page } = await open('light');
    const points = page.locator('figure[data-chart-id="overlay"] .role-mark.curve_points_marks path');
    const opacities = () => points.evaluateAll((ps) => ps.map((p) => p.getAttribute('opacity') ?? '1'));
    expect(new Set(await opacities())).toEqual(new Set(['0.9']));
    // Vega hit-tests on its own svg, which takes the pointer events: a mouse click at the legend label, in mid-view (clear of the sticky toolbar)
    await page.locator('figure[data-chart-id="overlay"]').evaluate((el) => el.scrollIntoView({ block: 'center' }));
    const box = (await page.locator('figure[data-chart-id="overlay"] .role-legend-label text', { hasText: 'A03' }).boundingBox())!;
    await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
    await page.waitForFunction(() => Array.from(document.querySelectorAll('figure[data-chart-id="overlay"] .role-mark.curve_points_marks path')).some((p) => p.getAttribute('opacity') === '0.1'));
    const after = await opacities();
    expect(after.filter((o) => o === '0.9')).toHaveLength(6); // A03's six points
    expect(after.filter((o) => o === '0.1')).toHaveLength(after.length - 6);
    await page.close();
  });

  it('switches the plate map to a parameter, and opens a group\'s fit from its well', async () => {
    const { page, problems } = await open('light');
    const options = await page.locator('select.lw-plate-choice option').allTextContents();
    expect(options).toEqual(['flags', 'intercept', 'slope']);
    await page.locator('select.lw-plate-choice').selectOption('plate-param-slope');
    await page.waitForSelector('body[data-plate-drawn="true"] figure[data-chart-id="plate-param-slope"]');
    // C05 did not converge: outlined, no colour
    expect(await page.locator('figure[data-chart-id="plate-param-slope"] .role-mark.well_values_marks path').count()).toBe(94);
    expect(await page.locator('figure[data-chart-id="plate-param-slope"] .role-mark.wells_without_value_marks path').count()).toBe(1);
    // B07: row B, column 7 -> the 19th well with a value (row-major order)
    await page.locator('figure[data-chart-id="plate-param-slope"] .role-mark.well_values_marks path').nth(18).click();
    await page.waitForSelector('section.lw-fit[data-fit-key="assay/B07"]');
    await page.waitForSelector('body[data-rendered="true"]');
    // the chosen map is kept across the redraw
    expect(await page.locator('.lw-plate figure').getAttribute('data-chart-id')).toBe('plate-param-slope');
    expect(problems).toEqual([]);
    await page.close();
  });

  it('leaves its screenshots for review in the artifacts (the checked-in ones come from the VS Code run, test/e2e/views.cjs)', () => {
    for (const theme of ['light', 'dark', 'high-contrast']) expect(existsSync(join(ARTIFACTS, `panel-groups-${theme}.png`))).toBe(true);
  });
});
