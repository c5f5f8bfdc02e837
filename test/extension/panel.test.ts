/**
 * The results page in real headless Chromium (playwright-core + Debian
 * chromium), under the webview's CSP: saved RunResults (fixtures/*.json,
 * written by fixtures/make-fixtures.ts from the engine) are turned into panel
 * models exactly as the extension does and sent as `show` messages. Checks
 * the parameter table, that every chart drew marks, tooltips, click-through
 * messages, group navigation, state restore, and that the console shows no
 * error and no CSP violation. Screenshots go to test/artifacts/extension/;
 * `UPDATE_SCREENSHOTS=1` also refreshes test/extension/screenshots/.
 * Skips (loudly) when /usr/bin/chromium is missing.
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { requireInCi } from '../fixtures/required';
import type { Browser, Page } from 'playwright-core';
import { chromium } from 'playwright-core';
import type { RunResult } from '../../engine/result';
import { buildPanelModel, type PanelModel } from '../../extension/logic/panel-model';
import { ARTIFACTS, bundlePage, CHROMIUM_ARGS, ROOT, servePanel, type PanelServer, type ThemeName } from './panel-harness';

const CHROMIUM = process.env.CHROMIUM ?? '/usr/bin/chromium';
const haveChromium = requireInCi('Chromium for the panel page test', existsSync(CHROMIUM), `CHROMIUM=${CHROMIUM}`);

const fixture = (name: string): RunResult => JSON.parse(readFileSync(join(__dirname, 'fixtures', name), 'utf8')) as RunResult;
const cooling = buildPanelModel(fixture('cooling-run.json'), { specUri: 'file:///work/samples/cooling/cooling.lsq', specName: 'cooling.lsq' });
const batches = buildPanelModel(fixture('batches-run.json'), { specUri: 'file:///work/fixtures/batches/batches.lsq', specName: 'batches.lsq' });

let browser: Browser;
let server: PanelServer;
const scratch = join(ARTIFACTS, 'chromium');

interface Opened {
  page: Page;
  /** Console errors and uncaught page errors. */
  problems: string[];
}

async function open(theme: ThemeName, model?: PanelModel, savedState?: unknown): Promise<Opened> {
  const page = await browser.newPage({ viewport: { width: 1180, height: 860 } });
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') problems.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  await page.goto(server.url(theme, savedState));
  await page.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((m) => m.type === 'ready'));
  if (model) await page.evaluate((m) => window.postMessage({ type: 'show', model: m }, '*'), model as unknown as Record<string, unknown>);
  await page.waitForSelector('body[data-rendered="true"]');
  return { page, problems };
}

const posted = (page: Page) => page.evaluate(() => (window as unknown as { __posted: Record<string, unknown>[] }).__posted);
const cspViolations = (page: Page) => page.evaluate(() => (window as unknown as { __csp: string[] }).__csp);

async function shot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTIFACTS, { recursive: true });
  const path = join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path });
  return path;
}

describe.skipIf(!haveChromium)('extension/panel page in Chromium', () => {
  beforeAll(async () => {
    const out = join(ARTIFACTS, 'panel-build');
    await bundlePage(out);
    server = await servePanel(out);
    mkdirSync(scratch, { recursive: true });
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      headless: true,
      args: CHROMIUM_ARGS,
      env: { ...process.env, XDG_CONFIG_HOME: scratch, XDG_CACHE_HOME: scratch },
    });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('shows the parameter table of the fit, as the CLI formats it', async () => {
    const { page, problems } = await open('light', cooling);
    const fit = cooling.fits[0];
    const rows = await page.locator('table.lw-params tbody tr').evaluateAll((trs) => trs.map((tr) => Array.from(tr.children, (c) => c.textContent ?? '')));
    expect(rows).toEqual(fit.parameterRows);
    const headers = await page.locator('table.lw-params thead th').allTextContents();
    expect(headers).toEqual(fit.parameterHeaders);
    await expect(page.locator('.lw-goodness').textContent()).resolves.toContain(fit.goodness[0].value);
    expect(problems).toEqual([]);
    expect(await cspViolations(page)).toEqual([]);
    await page.close();
  });

  it('draws every chart with marks, light and dark, without console errors or CSP violations', async () => {
    for (const theme of ['light', 'dark', 'high-contrast'] as const) {
      const { page, problems } = await open(theme, cooling);
      const charts = await page.locator('figure.lw-chart').evaluateAll((figs) => figs.map((f) => ({
        id: (f as HTMLElement).dataset.chartId,
        marks: Number((f as HTMLElement).dataset.marks),
        svgMarks: f.querySelectorAll('svg .role-mark path, svg .role-mark line, svg .role-mark rect').length,
      })));
      expect(charts.map((c) => c.id)).toEqual(cooling.fits[0].charts!.map((c) => c.id));
      for (const c of charts) {
        expect(c.marks, `${theme} ${c.id}`).toBeGreaterThan(0);
        expect(c.svgMarks, `${theme} ${c.id}`).toBe(c.marks);
      }
      expect(problems, theme).toEqual([]);
      expect(await cspViolations(page), theme).toEqual([]);
      await shot(page, `panel-${theme}`);
      await page.close();
    }
  });

  it('uses the theme colours: dark points differ from light points and from the default palette', async () => {
    const fills: Record<string, string> = {};
    for (const theme of ['light', 'dark'] as const) {
      const { page } = await open(theme, cooling);
      fills[theme] = await page.locator('figure[data-chart-id="fit"] svg .role-mark.data_points_marks path').first().getAttribute('fill') ?? '';
      await page.close();
    }
    expect(fills.light).toMatch(/^rgb/);
    expect(fills.dark).toMatch(/^rgb/);
    expect(fills.dark).not.toBe(fills.light);
  });

  it('shows a tooltip with the CSV row and opens the data file at the clicked row', async () => {
    const { page } = await open('light', cooling);
    const point = page.locator('figure[data-chart-id="fit"] svg .role-mark.data_points_marks path').nth(3);
    const box = (await point.boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    const tip = page.locator('#vg-tooltip-element.visible');
    await tip.waitFor();
    const text = (await tip.textContent()) ?? '';
    expect(text).toContain('CSV row');
    const row = Number(/CSV row\s*(\d+)/.exec(text)?.[1]);
    expect(fixture('cooling-run.json').fits[0].points.row).toContain(row);
    await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
    await page.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((m) => m.type === 'openRow'));
    const openRow = (await posted(page)).find((m) => m.type === 'openRow');
    expect(openRow).toEqual({ type: 'openRow', fit: 'newton', row });
    await page.close();
  });

  it('asks the editor to reveal a parameter when its row is clicked', async () => {
    const { page } = await open('light', cooling);
    await page.locator('table.lw-params tbody tr[data-param="tau"]').click();
    expect((await posted(page)).find((m) => m.type === 'reveal')).toEqual({ type: 'reveal', fit: 'newton', param: 'tau' });
    await page.locator('button', { hasText: 'Fit again' }).click();
    expect((await posted(page)).some((m) => m.type === 'refit')).toBe(true);
    await page.close();
  });

  it('lists groups worst first, charts parameters across groups and opens a group', async () => {
    const { page, problems } = await open('light', batches);
    const firstGroups = await page.locator('table.lw-groups tbody tr').evaluateAll((trs) => trs.map((tr) => (tr as HTMLElement).dataset.group));
    expect(firstGroups).toEqual(batches.groups[0].rows.map((r) => r.group));
    expect(batches.groups[0].rows[0].flags.length).toBeGreaterThan(0);
    // the worst group's fit is shown under the table
    await expect(page.locator('section.lw-fit h2').textContent()).resolves.toBe(batches.fits.find((f) => f.group === firstGroups[0])!.label);
    const groupCharts = await page.locator('section.lw-group figure.lw-chart').evaluateAll((fs) => fs.map((f) => Number((f as HTMLElement).dataset.marks)));
    expect(groupCharts.length).toBe(batches.groups[0].charts.length);
    for (const m of groupCharts) expect(m).toBeGreaterThan(0);
    await shot(page, 'panel-groups-light');
    // a group without eager charts asks for them
    const lazy = batches.fits.find((f) => f.charts === null)!;
    await page.locator(`table.lw-groups tbody tr[data-group="${lazy.group}"]`).click();
    await page.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((m) => m.type === 'requestCharts'));
    expect((await posted(page)).find((m) => m.type === 'requestCharts')).toEqual({ type: 'requestCharts', key: lazy.key });
    await expect(page.locator('section.lw-fit h2').textContent()).resolves.toBe(lazy.label);
    expect(problems).toEqual([]);
    expect(await cspViolations(page)).toEqual([]);
    await page.close();
  });

  it('comes back from its saved state after a reload, without a new message', async () => {
    const first = await open('dark', cooling);
    await first.page.locator('button.lw-nav-item', { hasText: 'Queries and checks' }).click();
    const state = await first.page.evaluate(() => (window as unknown as { __state: unknown }).__state);
    await first.page.close();
    const { page, problems } = await open('dark', undefined, state);
    await expect(page.locator('section.lw-checks h2').textContent()).resolves.toBe('Queries and checks');
    const expectations = await page.locator('.lw-expect li').count();
    expect(expectations).toBe(cooling.expectations.length);
    expect(problems).toEqual([]);
    await shot(page, 'panel-checks-dark');
    await page.close();
  });

  it('keeps light and dark screenshots for review', () => {
    const light = join(ARTIFACTS, 'panel-light.png');
    const dark = join(ARTIFACTS, 'panel-dark.png');
    expect(existsSync(light) && existsSync(dark)).toBe(true);
    if (process.env.UPDATE_SCREENSHOTS === '1') {
      const dir = join(ROOT, 'test', 'extension', 'screenshots');
      mkdirSync(dir, { recursive: true });
      copyFileSync(light, join(dir, 'panel-light.png'));
      copyFileSync(dark, join(dir, 'panel-dark.png'));
      copyFileSync(join(ARTIFACTS, 'panel-high-contrast.png'), join(dir, 'panel-high-contrast.png'));
    }
  });
});
