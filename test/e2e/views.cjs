// The views across groups in a real VS Code: the 96-well plate sample
// (samples/plate, copied into the temporary workspace) is fitted from the
// command palette; the results panel shows the plate map, the overlay of every
// well's curve, the residuals by group and the parameters across groups with
// group labels; a legend click in the overlay dims the other wells; the plate
// map is switched to the rate constant k; a click on well D07 (the flagged,
// enzyme-free well) opens that well's fit. Then the colour theme is set to
// light, dark and high contrast in turn (workspace setting), each waited for in
// the webview's body class, with the panel's editor group maximized, and
// screenshotted twice (vscode-groups-<theme>.png: plate map and group table;
// vscode-overlay-<theme>.png: overlay and residuals by group) in the artifacts
// folder; with UPDATE_SCREENSHOTS=1 also in test/extension/screenshots/.
// Last, the panel's checks: the per-group expectations summarised with their
// counts and failures, and the derived values as a table per well.
// Condition waits only.
'use strict';
const fs = require('fs');
const path = require('path');
const { check, quickInput, panelFrame } = require('./harness.cjs');

/** Copies samples/plate into `ws/plate`. */
function writePlateSample(repo, ws) {
  fs.cpSync(path.join(repo, 'samples', 'plate'), path.join(ws, 'plate'), { recursive: true });
}

const THEMES = [
  { name: 'light', setting: 'Default Light Modern', bodyClass: 'vscode-light' },
  { name: 'dark', setting: 'Default Dark Modern', bodyClass: 'vscode-dark' },
  { name: 'high-contrast', setting: 'Default High Contrast', bodyClass: 'vscode-high-contrast' },
];

async function groupViews(page, { repo, ws, outDir }) {
  await quickInput(page, 'Control+P', 'plate.lsq', 'plate.lsq');
  await page.locator('.editor-group-container .monaco-editor .view-lines', { hasText: 'fit kinetics on reads' }).first().waitFor();
  await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
  // one results panel per spec: the plate spec's own panel (others may be open beside it)
  const frame = await panelFrame(page, 'plate.lsq');
  await frame.locator('section.lw-group[data-fit="kinetics"]').waitFor({ timeout: 90000 });
  await frame.locator('body[data-rendered="true"]').waitFor();
  const charts = await frame.locator('section.lw-group figure.lw-chart').evaluateAll((fs) => fs.map((f) => `${f.dataset.chartId}:${f.dataset.marks}`));
  const ids = charts.map((c) => c.split(':')[0]);
  const want = ['plate-flags', 'overlay', 'residuals-by-group', 'group-blank', 'group-amplitude', 'group-k'];
  check('per-group fit shows the plate map, the overlay, residuals by group and each parameter across groups, all drawn',
    want.every((w, i) => ids[i] === w) && charts.every((c) => Number(c.split(':')[1]) > 0), charts.join(' '));

  const legend = await frame.locator('figure[data-chart-id="overlay"] .role-legend-label text').allTextContents();
  check('overlay legend: 8 wells, the flagged D07 among them', legend.length === 8 && legend.includes('D07'), legend.join(','));
  const axis = await frame.locator('figure[data-chart-id="group-k"] .role-axis-label text').allTextContents();
  check('group labels on the parameter axis (every 3rd of 96)', axis.includes('A01') && axis.includes('A04') && !axis.includes('A02'), axis.slice(0, 6).join(','));
  const wells = await frame.locator('figure[data-chart-id="plate-flags"] .role-mark.wells_marks path').count();
  check('plate map draws all 96 wells', wells === 96, String(wells));

  // legend selection: click the D07 entry's symbol; the other wells' points dim
  await frame.locator('figure[data-chart-id="overlay"]').evaluate((el) => el.scrollIntoView({ block: 'center' }));
  await frame.locator('figure[data-chart-id="overlay"] .role-legend-symbol path').nth(legend.indexOf('D07')).click();
  await frame.locator('figure[data-chart-id="overlay"] .role-mark.curve_points_marks path[opacity="0.1"]').first().waitFor();
  const opacities = await frame.locator('figure[data-chart-id="overlay"] .role-mark.curve_points_marks path').evaluateAll((ps) => ps.map((p) => p.getAttribute('opacity')));
  const bright = opacities.filter((o) => o === '0.9').length;
  check('a legend click keeps one well bright and dims the others', bright === 16 && opacities.length === 8 * 16, `${bright} of ${opacities.length} points bright`);

  // the plate map of k, then a click on well D07 opens its fit
  await frame.locator('select.lw-plate-choice').selectOption('plate-param-k');
  await frame.locator('body[data-plate-drawn="true"] figure[data-chart-id="plate-param-k"]').waitFor();
  await frame.locator('figure[data-chart-id="plate-param-k"]').evaluate((el) => el.scrollIntoView({ block: 'center' }));
  // D07 is flagged, so its well carries a dot over its colour (the mark on top): the click lands on the dot
  const dots = await frame.locator('figure[data-chart-id="plate-param-k"] .role-mark.flagged_wells_marks path').count();
  check('the map of k marks the one flagged well with a dot', dots === 1, String(dots));
  await frame.locator('figure[data-chart-id="plate-param-k"] .role-mark.flagged_wells_marks path').first().click();
  await frame.locator('section.lw-fit[data-fit-key="kinetics/D07"]').waitFor();
  await frame.locator('body[data-rendered="true"]').waitFor();
  const kept = await frame.locator('.lw-plate figure').getAttribute('data-chart-id');
  check('a click on well D07 in the plate map opens that well\'s fit; the map stays on k', kept === 'plate-param-k', kept);

  // themes: the workspace setting, waited for in the webview's body class
  const settingsFile = path.join(ws, '.vscode', 'settings.json');
  const settings = JSON.parse(fs.readFileSync(settingsFile, 'utf8'));
  // room for the views: the results panel's editor group maximized (waited for in the webview's width)
  await page.locator('.tab', { hasText: 'Results: plate.lsq' }).first().click();
  await quickInput(page, 'F1', 'View: Toggle Maximize Editor Group', 'Toggle Maximize Editor Group');
  // one panel per spec: the shown one is the plate spec's (the others are hidden, width 0)
  await page.waitForFunction(() => Array.from(document.querySelectorAll('iframe.webview.ready')).some((f) => f.getBoundingClientRect().width > 1200));
  const shots = [];
  for (const t of THEMES) {
    fs.writeFileSync(settingsFile, JSON.stringify({ ...settings, 'workbench.colorTheme': t.setting }, null, 2) + '\n');
    await frame.locator(`body.${t.bodyClass}[data-rendered="true"]`).waitFor();
    await frame.locator('body[data-rendered="true"] figure[data-chart-id="plate-param-k"][data-marks]').waitFor();
    // two views per theme: the plate map with the group table, then the overlay with the residuals by group
    for (const [what, target] of [['groups', 'section.lw-group'], ['overlay', 'figure[data-chart-id="overlay"]']]) {
      // to the top of the page's scroll area, clear of its sticky toolbar
      await frame.locator(target).first().evaluate((el) => {
        el.scrollIntoView({ block: 'start' });
        window.scrollBy(0, -((document.querySelector('.lw-toolbar')?.getBoundingClientRect().height ?? 0) + 8));
      });
      await frame.locator(target).first().evaluate((el) => new Promise((resolve) => requestAnimationFrame(() => resolve(el.getBoundingClientRect().top))));
      const shot = path.join(outDir, `vscode-${what}-${t.name}.png`);
      await page.screenshot({ path: shot });
      shots.push(shot);
    }
    check(`group views drawn in the ${t.name} theme`, true, shots.slice(-2).map((s) => path.basename(s)).join(', '));
  }
  if (process.env.UPDATE_SCREENSHOTS === '1') {
    const dir = path.join(repo, 'test', 'extension', 'screenshots');
    fs.mkdirSync(dir, { recursive: true });
    for (const shot of shots) fs.copyFileSync(shot, path.join(dir, path.basename(shot)));
  }
  fs.writeFileSync(settingsFile, JSON.stringify(settings, null, 2) + '\n');

  // the per-group expectations summarised: one entry per expectation with its passed/failed counts over the wells
  // (not 288 "passed" lines), the failures listed under their expectation, then the derived values as a table per well
  await frame.locator('button.lw-nav-item[data-key="#checks"]').click();
  const head = frame.locator('.lw-expect-summary h3');
  await head.waitFor();
  const summary = (await head.textContent()).trim();
  const [, passed, failedCount] = (/(\d+) passed, (\d+) failed/.exec(summary) ?? []).map(Number);
  const entries = await frame.locator('.lw-expect-summary > ul > li').count();
  const lines = await frame.locator('.lw-expect-summary li').count();
  const derivedRows = await frame.locator('table.lw-derived-table tbody tr').count();
  check('per-group expectations summarised: counts per expectation (3 over 96 wells), failures listed, derived values per well as a table',
    passed + failedCount === 288 && entries === 3 && lines <= entries + failedCount && derivedRows === 96, `${summary}; ${entries} expectations, ${lines} lines, ${derivedRows} derived rows`);
}

module.exports = { writePlateSample, groupViews };
