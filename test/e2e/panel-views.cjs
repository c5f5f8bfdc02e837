// The results panel's trust views in a real VS Code (issue 15, panel part): a second
// spec (test/fixtures/panel-trust.cjs: five declared fits, one failing at run time,
// one stopped at its iteration limit, two rows with weight 0 and one empty cell) is
// fitted while the first spec's panel stays open, so each spec has its own panel;
// then, inside the new panel's webview: every declared fit in the navigation with its
// state and the headline counts per state; the failed fit's reason; the warnings chip
// opening the warnings (count = list); the comparison naming the fit left out; the
// rows left out in the header and drawn hollow; the residual-kind switch (standardized
// first for the weighted fit); copying the parameter table as tab-separated text
// (read back from the clipboard); saving a chart as SVG through the save dialog; and the
// panel coming back after a window reload with the reader's choices. Condition waits
// only. Screenshots: vscode-panel-<view>.png in the output folder.
'use strict';
const fs = require('fs');
const path = require('path');
const { check, quickInput, waitForFile, panelFrame } = require('./harness.cjs');
const { writeTrustScenario } = require('../fixtures/panel-trust.cjs');

async function panelViews(page, ws, outDir) {
  writeTrustScenario(ws, 'trust');
  await quickInput(page, 'Control+P', 'trust.lsq', 'trust.lsq');
  const editor = page.locator('.editor-group-container .monaco-editor', { hasText: 'fit newton on bench' }).last();
  await editor.locator('.view-lines', { hasText: 'fit empty on late' }).waitFor();
  await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
  await page.locator('.tab', { hasText: 'Results: trust.lsq' }).first().waitFor({ timeout: 90000 });
  const tabs = await page.locator('.tab', { hasText: /^Results: / }).allInnerTexts();
  check('a second spec gets its own results panel; the first spec\'s panel stays', tabs.some((t) => t.includes('cooling.lsq')) && tabs.some((t) => t.includes('trust.lsq')), tabs.join(' | '));
  const frame = await panelFrame(page, 'trust.lsq');
  await frame.locator('body[data-rendered="true"]').waitFor();

  const nav = await frame.locator('button.lw-nav-item').evaluateAll((bs) => bs.map((b) => b.textContent));
  check('every declared fit is in the navigation with its state', nav.slice(0, 5).join('|') === 'newton|line|quad|slownot converged|emptyfailed', nav.join('|'));
  const chips = (await frame.locator('.lw-chips').innerText()).replace(/\s+/g, ' ');
  check('the headline counts converged, not converged and failed fits of all declared', /3\/5 converged 1 not converged 1 failed/.test(chips), chips);

  const rows = await frame.locator('section.lw-fit .lw-rows').innerText();
  check('the header counts the rows left out, with why', rows === 'n = 28 fitted (of 31 rows: 1 with an empty or NA cell (line 27), 2 with weight 0 (lines 10, 22), drawn hollow)', rows);
  const hollow = await frame.locator('figure[data-chart-id="fit"] svg .role-mark.excluded_points_marks path').count();
  const legend = await frame.locator('figure[data-chart-id="fit"] svg .role-legend-label').allTextContents();
  check('rows with weight 0 drawn hollow; the bands named by a legend, not by shade', hollow === 2 && legend.includes('95% confidence band') && !/shade/.test(await frame.locator('figure[data-chart-id="fit"] svg .role-title-subtitle').textContent()), `${hollow} hollow, legend ${legend.join(', ')}`);
  // a row left out tells why in its tooltip
  await frame.locator('figure[data-chart-id="fit"] svg .role-mark.excluded_points_marks path').first().hover();
  const tip = frame.locator('#vg-tooltip-element.visible');
  await tip.waitFor();
  const tipText = (await tip.innerText()).replace(/\s+/g, ' ');
  check('a row left out says why in its tooltip', /weight 0/.test(tipText), tipText.slice(0, 120));
  // every number column of the parameter table in one notation (engine/format.ts rule 6)
  const columns = await frame.locator('table.lw-params').evaluate((t) => {
    const body = [...t.querySelectorAll('tbody tr')].map((r) => [...r.querySelectorAll('td')].map((c) => c.textContent.trim()));
    return body[0].map((_, c) => body.map((r) => r[c] ?? ''));
  });
  const numeric = columns.filter((col) => col.some((v) => /^[-+]?\d/.test(v)));
  const mixed = numeric.filter((col) => { const n = col.filter((v) => /^[-+]?\d/.test(v)); return n.some((v) => /e[-+]?\d/.test(v)) && n.some((v) => !/e[-+]?\d/.test(v)); });
  check('no number column of the parameter table mixes fixed and exponent notation', numeric.length >= 4 && mixed.length === 0, `${numeric.length} number columns; ${mixed.map((c) => c.join(' ')).join(' | ')}`);
  const on = await frame.locator('.lw-segmented[data-control="residual"] button.on').innerText();
  check('the weighted fit shows standardized residuals first', on === 'standardized', on);
  await frame.locator('.lw-segmented[data-control="residual"] button[data-value="percent"]').click();
  await frame.locator('figure[data-chart-id="residuals-fitted"] svg .role-axis-title', { hasText: '% of the fitted value' }).first().waitFor();
  check('the residual switch draws residuals in % of the fitted value', true);
  await page.screenshot({ path: path.join(outDir, 'vscode-panel-fit.png') });

  // copy the parameter table; read the clipboard the workbench wrote (vscode.env.clipboard)
  await page.context().grantPermissions(['clipboard-read', 'clipboard-write'], { origin: new URL(page.url()).origin });
  await frame.locator('table.lw-params caption button.lw-copy').click();
  await page.locator('.statusbar-item', { hasText: 'Leastwise: copied' }).first().waitFor();
  const clip = await page.evaluate(() => navigator.clipboard.readText());
  const lines = clip.split('\n');
  check('"Copy" puts the parameter table on the clipboard as tab-separated text', lines[0].startsWith('parameter\testimate\tstd. error') && /^tau\t14\.\d+\t/.test(lines[2] ?? ''), JSON.stringify(lines.slice(0, 3)).slice(0, 120));

  // the failed fit and the warnings
  await frame.locator('button.lw-nav-item[data-key="empty"]').click();
  const reason = await frame.locator('section.lw-missing .lw-reasons li').innerText();
  check('the fit that failed at run time shows why', /where condition of the data statement leaves none/.test(reason), reason.slice(0, 100));
  await page.screenshot({ path: path.join(outDir, 'vscode-panel-failed.png') });
  const chip = frame.locator('button.lw-chip[data-open="#warnings"]');
  const count = Number(/(\d+)/.exec(await chip.innerText())[1]);
  await chip.click();
  await frame.locator('section.lw-warnings-all').waitFor();
  const listed = await frame.locator('section.lw-warnings-all li').count();
  check('the warnings chip opens the warnings; its count is the list\'s', listed === count && count > 0, `${count} on the chip, ${listed} listed`);
  await frame.locator('button.lw-nav-item[data-key="#checks"]').click();
  const cmp = await frame.locator('section.lw-checks').innerText();
  check('the comparison compares the fits that converged and names the one left out', cmp.includes('Left out of the ranking: slow') && cmp.includes('slow left out: the fit did not converge'), cmp.split('\n').find((l) => l.startsWith('Left out')));

  // save a chart as SVG (code-server's simple save dialog: Enter accepts the proposed path)
  await frame.locator('button.lw-nav-item[data-key="newton"]').click();
  await frame.locator('body[data-rendered="true"]').waitFor();
  await frame.locator('figure[data-chart-id="fit"] button.lw-save[data-format="svg"]').click();
  await page.waitForFunction(() => /newton-data-and-fitted-curve\.svg$/.test(document.querySelector('.quick-input-widget .quick-input-box input')?.value ?? ''));
  await page.keyboard.press('Enter');
  const svg = await waitForFile(path.join(ws, 'newton-data-and-fitted-curve.svg'), (t) => t.trimEnd().endsWith('</svg>'));
  check('a chart saved as SVG next to the spec', /^<svg/.test(svg) && svg.includes('fitted curve'), `${svg.length} characters`);
  // and as PNG: the file starts with the PNG signature and its header gives the size drawn
  await frame.locator('figure[data-chart-id="fit"] button.lw-save[data-format="png"]').click();
  await page.waitForFunction(() => /newton-data-and-fitted-curve\.png$/.test(document.querySelector('.quick-input-widget .quick-input-box input')?.value ?? ''));
  await page.keyboard.press('Enter');
  const pngFile = path.join(ws, 'newton-data-and-fitted-curve.png');
  await waitForFile(pngFile, () => { const b = fs.readFileSync(pngFile); return b.length > 33 && b.subarray(b.length - 8).toString('latin1').includes('IEND'); });
  const png = fs.readFileSync(pngFile);
  const [w, hgt] = [png.readUInt32BE(16), png.readUInt32BE(20)];
  check('a chart saved as PNG next to the spec', png.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) && w > 300 && hgt > 200, `${w}×${hgt} px, ${png.length} bytes`);

  // reload the window: the panels come back with the reader's choices
  await frame.locator('button.lw-nav-item[data-key="slow"]').click();
  await frame.locator('section.lw-fit[data-state="not_converged"]').waitFor();
  // the workbench's own reload: it saves the webviews' state on shutdown (a browser reload may not finish the write)
  await Promise.all([page.waitForEvent('load', { timeout: 90000 }), quickInput(page, 'F1', 'Developer: Reload Window', 'Developer: Reload Window')]);
  await page.locator('.monaco-workbench').waitFor();
  await page.locator('.tab', { hasText: 'Results: trust.lsq' }).first().waitFor({ timeout: 90000 });
  await page.locator('.tab', { hasText: 'Results: trust.lsq' }).first().click();
  const back = await panelFrame(page, 'trust.lsq');
  await back.locator('section.lw-fit[data-state="not_converged"]').waitFor({ timeout: 90000 });
  check('after a reload the panel comes back showing the fit the reader left it on', true);
  // that fit stopped at its iteration limit: marked as not a fitted result, its goodness-of-fit statistics withheld
  // (the key figures name no R² or RMSE; the statistics table says they are withheld instead of giving values)
  const slow = back.locator('section.lw-fit[data-state="not_converged"]');
  const mark = (await slow.locator('.lw-notfitted').innerText()).trim();
  const keyStats = await slow.locator('.lw-keystats dt').allTextContents();
  const stats = await slow.locator('table.lw-goodness tbody tr').evaluateAll((trs) => trs.map((tr) => Array.from(tr.children, (c) => c.textContent.trim())));
  const named = stats.filter(([label]) => /R²|RMSE/.test(label));
  check('the fit that did not converge is marked as no fitted result; its R² and RMSE are withheld, not shown',
    /^Not a fitted result/.test(mark) && !keyStats.some((t) => /R²|RMSE/.test(t)) && named.length > 0 && named.every(([, value]) => value === 'withheld'),
    `${mark.slice(0, 50)}…; ${named.map((r) => r.slice(0, 2).join(': ')).join('; ')}`);
  // every results panel shown beside it came back drawn too (after a reload the panels are revived side by side)
  const frames = page.locator('iframe.webview.ready');
  const drawn = [];
  for (let i = 0; i < (await frames.count()); i++) {
    if (!(await frames.nth(i).evaluate((f) => f.getBoundingClientRect().width > 0))) continue;
    const inner = page.frameLocator(`iframe.webview.ready >> nth=${i}`).frameLocator('#active-frame');
    await inner.locator('body[data-rendered="true"]').waitFor();
    drawn.push(await inner.locator('.lw-toolbar h1').textContent());
  }
  check('after a reload every results panel shown is drawn again', drawn.length >= 2 && drawn.includes('trust.lsq'), drawn.join(', '));
}



const THEMES = [
  { name: 'light', setting: 'Default Light Modern', bodyClass: 'vscode-light' },
  { name: 'dark', setting: 'Default Dark Modern', bodyClass: 'vscode-dark' },
  { name: 'high-contrast', setting: 'Default High Contrast', bodyClass: 'vscode-high-contrast' },
];

/** Scrolls `target` (in the panel's page) to the top of the view, below the sticky toolbar, and waits a frame. */
async function toTop(frame, target) {
  await frame.locator(target).first().evaluate((el) => new Promise((resolve) => {
    el.scrollIntoView({ block: 'start' });
    window.scrollBy(0, -((document.querySelector('.lw-toolbar')?.getBoundingClientRect().height ?? 0) + 8));
    requestAnimationFrame(() => resolve());
  }));
}

/**
 * The trust panel's new views in the light, dark and high-contrast themes (workspace setting, waited for in the
 * webview's body class), with its editor group maximized: the fit (navigation with the states, header with the rows
 * left out; below it the residual switch and the chart with its band legend), the failed fit and the warnings, one
 * screenshot each (vscode-panel-<view>-<theme>.png, view = fit, chart, failed, warnings; UPDATE_SCREENSHOTS=1 copies them to test/extension/screenshots/). In each theme
 * each legend swatch must have the colour and opacity its layer is drawn with.
 */
async function panelThemes(page, { repo, ws, outDir }) {
  await page.locator('.tab', { hasText: 'Results: trust.lsq' }).first().click();
  await page.locator('.tab.active', { hasText: 'Results: trust.lsq' }).first().waitFor();
  await quickInput(page, 'F1', 'View: Toggle Maximize Editor Group', 'Toggle Maximize Editor Group');
  await page.waitForFunction(() => Array.from(document.querySelectorAll('iframe.webview.ready')).some((f) => f.getBoundingClientRect().width > 1200));
  const frame = await panelFrame(page, 'trust.lsq');
  const settingsFile = path.join(ws, '.vscode', 'settings.json');
  const settings = JSON.parse(fs.readFileSync(settingsFile, 'utf8'));
  const shots = [];
  for (const t of THEMES) {
    fs.writeFileSync(settingsFile, JSON.stringify({ ...settings, 'workbench.colorTheme': t.setting }, null, 2) + '\n');
    await frame.locator(`body.${t.bodyClass}[data-rendered="true"]`).waitFor();

    // the fit: navigation, header, legend, residual switch
    await frame.locator('button.lw-nav-item[data-key="newton"]').click();
    await frame.locator(`body.${t.bodyClass}[data-rendered="true"] section.lw-fit[data-fit-key="newton"] figure[data-chart-id="fit"][data-marks]`).waitFor();
    // each legend entry (this weighted fit: data, fitted curve, confidence band; no prediction band without a spread
    // of new points) against its layer as drawn: colour (a line's stroke) and opacity
    const entries = await frame.locator('figure[data-chart-id="fit"] svg').evaluate((svg) => {
      const probe = document.createElement('span');
      document.body.append(probe);
      const rgb = (c) => { probe.style.color = ''; probe.style.color = c ?? ''; return getComputedStyle(probe).color; };
      const paint = (el) => (el.getAttribute('fill') && el.getAttribute('fill') !== 'none' && el.getAttribute('fill') !== 'transparent' ? el.getAttribute('fill') : el.getAttribute('stroke'));
      const look = (el) => el && { colour: rgb(paint(el)), opacity: Number(el.getAttribute('opacity') ?? el.parentElement?.getAttribute('opacity') ?? 1) };
      const layer = (label) => (label === 'data' ? 'data_points' : label === 'fitted curve' ? 'fitted_curve' : /(confidence|prediction) band/.exec(label)?.[0].replace(' ', '_'));
      const symbols = [...svg.querySelectorAll('.role-legend-symbol path')];
      const out = [...svg.querySelectorAll('.role-legend-label text')].map((t, i) => ({ label: t.textContent, swatch: look(symbols[i]), drawn: look(svg.querySelector(`.role-mark.${layer(t.textContent)}_marks path`)) }));
      probe.remove();
      return out;
    });
    const same = entries.length >= 3 && entries.some((e) => /confidence band/.test(e.label)) && entries.every((e) => e.swatch && e.drawn && e.swatch.colour === e.drawn.colour && Math.abs(e.swatch.opacity - e.drawn.opacity) < 0.01);
    check(`${t.name} theme: each legend swatch has its layer's colour and opacity`, same, entries.map((e) => `${e.label}: ${e.swatch?.colour}@${e.swatch?.opacity} / ${e.drawn?.colour}@${e.drawn?.opacity}`).join('; '));
    await toTop(frame, 'section.lw-fit[data-fit-key="newton"]');
    shots.push(path.join(outDir, `vscode-panel-fit-${t.name}.png`));
    await page.screenshot({ path: shots.at(-1) });
    // below it: the residual and axis switches above the chart with its band legend and the hollow rows
    await toTop(frame, '.lw-segmented[data-control="residual"]');
    shots.push(path.join(outDir, `vscode-panel-chart-${t.name}.png`));
    await page.screenshot({ path: shots.at(-1) });

    // the failed fit
    await frame.locator('button.lw-nav-item[data-key="empty"]').click();
    await frame.locator('section.lw-missing .lw-reasons li').first().waitFor();
    await toTop(frame, 'section.lw-missing');
    shots.push(path.join(outDir, `vscode-panel-failed-${t.name}.png`));
    await page.screenshot({ path: shots.at(-1) });

    // the warnings, opened by their chip
    await frame.locator('button.lw-chip[data-open="#warnings"]').click();
    await frame.locator('section.lw-warnings-all li').first().waitFor();
    await toTop(frame, 'section.lw-warnings-all');
    shots.push(path.join(outDir, `vscode-panel-warnings-${t.name}.png`));
    await page.screenshot({ path: shots.at(-1) });
    check(`the panel's fit, chart, failed-fit and warnings views drawn in the ${t.name} theme`, true, shots.slice(-4).map((s) => path.basename(s)).join(', '));
  }
  if (process.env.UPDATE_SCREENSHOTS === '1') {
    const dir = path.join(repo, 'test', 'extension', 'screenshots');
    fs.mkdirSync(dir, { recursive: true });
    for (const shot of shots) fs.copyFileSync(shot, path.join(dir, path.basename(shot)));
  }
  fs.writeFileSync(settingsFile, JSON.stringify(settings, null, 2) + '\n');
  await quickInput(page, 'F1', 'View: Toggle Maximize Editor Group', 'Toggle Maximize Editor Group');
}
module.exports = { panelViews, panelThemes };
