#!/usr/bin/env node
// End-to-end test of the extension in a real VS Code 1.100 (code-server),
// driven with playwright-core + Debian Chromium, offline (recipe:
// $VSCODE_WEB_TOOLS/README.md, default ../shared/tools/vscode-web from the
// repo root). Steps: install the recipe (idempotent) -> `npm run package`
// (.vsix) -> copy samples/cooling to a temp workspace -> start code-server
// with the .vsix -> open cooling.lsq -> introduce a typo and see the error
// squiggle and the Problems entry -> apply the "did you mean" quick fix ->
// run "Leastwise: Fit This File" from the command palette -> wait for the
// parameter table and the drawn charts inside the two nested webview iframes
// -> hover a parameter for its estimate -> screenshot -> export the Markdown
// report -> scaffold a new spec from the CSV (QuickPicks: x, y, model) ->
// fit on save -> cancel a long fit from its progress notification
// (cancel.cjs) -> the views across groups (views.cjs) -> the results panel's
// trust views, then the same in three themes with screenshots (panel-views.cjs)
// -> edit the dose-response sample (editor.cjs: one diagnostic for one
// misspelling, unclosed-parenthesis range, bounds quick fixes, completion
// order, semantic colours in three themes with screenshots; then the log/linear
// axis switch on its panel) -> then a second
// server with Workspace Trust on for the Restricted Mode checks (restricted.cjs). No sleeps: every step waits for a
// condition. Last line: "N passed, N failed"; exit 1 on failure.
//
// Env: VSCODE_WEB_TOOLS, VSCODE_WEB_HOME (recipe cache), CHROMIUM
// (default /usr/bin/chromium), E2E_OUT (screenshots, default
// test/artifacts/e2e), KEEP=1 (keep the temp workspace and server state),
// HEADED=1.
'use strict';
const fs = require('fs');
const os = require('os');
const path = require('path');

const repo = path.resolve(__dirname, '..', '..');
const tools = path.resolve(process.env.VSCODE_WEB_TOOLS || path.join(repo, '..', 'shared', 'tools', 'vscode-web'));
const home = process.env.VSCODE_WEB_HOME || path.join(os.homedir(), '.cache', 'vscode-web');
const outDir = path.resolve(process.env.E2E_OUT || path.join(repo, 'test', 'artifacts', 'e2e'));
const { secs, check, anyFailed, finish, waitForFile, freePort, run, quickInput, startRecipeServer, openBrowser, webviewFrame, errorSummary } = require('./harness.cjs');
const { restrictedMode } = require('./restricted.cjs');
const { writeSlowJob, cancelRunningFit } = require('./cancel.cjs');
const { writePlateSample, groupViews } = require('./views.cjs');
const { writeEditorSpecs, editorChecks, doseAxis } = require('./editor.cjs');
const { panelViews, panelThemes } = require('./panel-views.cjs');

(async () => {
  fs.mkdirSync(outDir, { recursive: true });
  // 1. the recipe (idempotent, ~0.5 s when installed)
  const install = path.join(tools, 'install.sh');
  if (!check('vscode-web recipe present', fs.existsSync(install), install)) return finish(1);
  if (run('install.sh', install, [], { env: { ...process.env, VSCODE_WEB_HOME: home } }).status !== 0) return finish(1);

  // 2. the .vsix (npm run package = build the extension bundles + vsce)
  const pkg = JSON.parse(fs.readFileSync(path.join(repo, 'package.json'), 'utf8'));
  const vsix = path.join(repo, `${pkg.name}-${pkg.version}.vsix`);
  fs.rmSync(vsix, { force: true });
  if (run('npm run package', 'npm', ['run', 'package', '--silent'], { cwd: repo }).status !== 0 || !check('vsix built', fs.existsSync(vsix), vsix)) return finish(1);

  // 3. a throwaway copy of the sample workspace
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'leastwise-e2e-'));
  const ws = path.join(work, 'cooling');
  fs.cpSync(path.join(repo, 'samples', 'cooling'), ws, { recursive: true });
  // Workspace setting for the fit-on-save step at the end (nothing before it saves the spec).
  fs.mkdirSync(path.join(ws, '.vscode'));
  fs.writeFileSync(path.join(ws, '.vscode', 'settings.json'), JSON.stringify({ 'leastwise.fitOnSave': true }, null, 2) + '\n');
  const specText = fs.readFileSync(path.join(ws, 'cooling.lsq'), 'utf8');
  const specLines = specText.split(/\r?\n/);
  const sigmaLine = specLines.findIndex((l) => /^\s*sigma\s+temp_sd\s*$/.test(l)) + 1;
  if (!check('sample spec has a `sigma temp_sd` line', sigmaLine > 0, `line ${sigmaLine}`)) return finish(1);

  // A slow per-group job for the cancel step (written into the workspace, never into samples/).
  writeSlowJob(ws);
  // The 96-well plate sample for the views across groups (views.cjs).
  writePlateSample(repo, ws);
  // The dose-response sample for the editing steps (editor.cjs), as dose/ in the workspace.
  writeEditorSpecs(repo, ws);

  // 4. code-server with the .vsix installed (the recipe's start.sh: Workspace Trust off)
  const state = path.join(work, 'state');
  const tStart = Date.now();
  let server;
  try {
    server = startRecipeServer({ tools, home, port: await freePort(), workspace: ws, vsix, state });
  } catch (e) {
    check('code-server started', false, String(e.stderr || e.message).split('\n').slice(-5).join(' | '));
    return finish(1);
  }
  check(`code-server started (${secs(tStart)}s)`, true, server.url);
  const browser = await openBrowser(repo);
  const { page, pageErrors, external } = browser;

  let failed = false;
  const tDrive = Date.now();
  try {
    await page.goto(server.url);
    await page.locator('.monaco-workbench').waitFor();
    await page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'cooling.lsq' }).waitFor();
    check('workbench loaded with the sample workspace', true);

    await quickInput(page, 'Control+P', 'cooling.lsq', 'cooling.lsq');
    const editor = page.locator('.editor-group-container .monaco-editor').first();
    await editor.locator('.view-lines', { hasText: 'fit newton on bench' }).waitFor();
    check('cooling.lsq open in the editor', true);

    // the extension is active: status bar item and the code lens above the fit
    await page.locator('.statusbar-item', { hasText: 'Leastwise' }).first().waitFor();
    check('status bar item shown', true);
    await editor.locator('.codelens-decoration', { hasText: 'Fit' }).first().waitFor();
    check('"Fit" code lens above the fit', true);
    const lang = (await page.locator('.statusbar-item', { hasText: /Leastwise spec|lsq/ }).first().innerText()).trim();
    check('language mode is the Leastwise spec language', /Leastwise spec|lsq/.test(lang), lang);

    // typo: `temp_sd` -> `temp_sdx` (not a column of cooling.csv)
    await quickInput(page, 'Control+G', String(sigmaLine));
    await page.keyboard.press('End');
    await page.keyboard.type('x');
    await editor.locator('.squiggly-error').first().waitFor();
    check('error squiggle under the misspelt column', true);
    await page.keyboard.press('Control+Shift+M');
    const problem = page.locator('.markers-panel .monaco-list-row', { hasText: 'temp_sdx' }).first();
    await problem.waitFor();
    check('Problems panel lists the unknown column', true, (await problem.innerText()).replace(/\s+/g, ' ').slice(0, 160));

    // quick fix: "Change to 'temp_sd'"
    await page.keyboard.press('Control+1'); // back to the editor
    await quickInput(page, 'Control+G', `${sigmaLine}:${specLines[sigmaLine - 1].indexOf('temp_sd') + 3}`);
    await page.keyboard.press('Control+.');
    const fix = page.locator('.action-widget .monaco-list-row', { hasText: "Change to 'temp_sd'" }).first();
    await fix.waitFor();
    await page.keyboard.press('Enter'); // the preferred fix is the focused row
    await editor.locator('.view-line', { hasText: /sigma\s+temp_sd\s*$/ }).first().waitFor();
    await editor.locator('.squiggly-error').first().waitFor({ state: 'detached' });
    check('quick fix restores the column name and the squiggle goes away', true);
    await page.keyboard.press('Control+J'); // hide the panel area (Problems) to leave room
    await page.locator('.markers-panel').waitFor({ state: 'hidden' });

    // fit from the command palette
    await page.keyboard.press('Control+1');
    await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
    check('"Leastwise: Fit This File" ran from the command palette', true);
    const frame = webviewFrame(page);
    await frame.locator('table.lw-params tbody tr[data-param="tau"]').waitFor({ timeout: 90000 });
    const params = await frame.locator('table.lw-params tbody tr').evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-param')));
    check('results panel shows the parameter table', params.join(',') === 'rise,tau', params.join(','));
    const tau = (await frame.locator('table.lw-params tbody tr[data-param="tau"]').innerText()).replace(/\s+/g, ' ');
    check('tau has an estimate and a standard error', /tau \d+\.\d+ \d+\.\d+/.test(tau), tau);
    await frame.locator('body[data-rendered="true"]').waitFor();
    const marks = await frame.locator('figure.lw-chart').evaluateAll((fs) => fs.map((f) => Number(f.dataset.marks)));
    check('every chart drew marks', marks.length >= 4 && marks.every((m) => m > 0), marks.join(','));
    await page.locator('.statusbar-item', { hasText: /Leastwise: 1\/1 fit/ }).first().waitFor();
    check('status bar shows the last fit', true);

    // hover after the fit: estimate ± standard error
    await page.keyboard.press('Control+1');
    const tauToken = editor.locator('.view-line', { hasText: 'param tau' }).locator('span span', { hasText: /^tau$/ }).first();
    await tauToken.hover();
    const hover = page.locator('.monaco-hover-content', { hasText: '±' }).first();
    await hover.waitFor();
    check('hover on a parameter shows estimate ± standard error', true, (await hover.innerText()).replace(/\s+/g, ' ').slice(0, 120));
    await page.keyboard.press('Escape');

    // panel -> editor: a parameter row reveals its declaration; a chart point opens the CSV at its row
    await frame.locator('table.lw-params tbody tr[data-param="rise"]').click();
    const riseLine = specLines.findIndex((l) => /^\s*param\s+rise\b/.test(l)) + 1;
    await page.locator('.statusbar-item', { hasText: new RegExp(`Ln ${riseLine}, Col \\d+ \\(4 selected\\)`) }).first().waitFor();
    check('clicking a parameter row selects its declaration', true, `line ${riseLine}`);
    const point = frame.locator('figure[data-chart-id="fit"] svg .role-mark.data_points_marks path').nth(3);
    await point.hover();
    const tip = frame.locator('#vg-tooltip-element.visible');
    await tip.waitFor();
    const row = Number(/CSV row\s*(\d+)/.exec(await tip.innerText())?.[1]);
    await point.click();
    await page.locator('.tab.active', { hasText: 'cooling.csv' }).waitFor();
    await page.locator('.statusbar-item', { hasText: new RegExp(`Ln ${row}, Col 1 \\(`) }).first().waitFor();
    check('clicking a chart point opens the CSV at that row', row > 1, `row ${row}`);
    await page.locator('.tab', { hasText: 'cooling.lsq' }).first().click();
    await editor.locator('.view-lines', { hasText: 'fit newton on bench' }).waitFor();

    const shot = path.join(outDir, 'vscode-results.png');
    await page.screenshot({ path: shot });
    console.log(`screenshot: ${shot}`);

    // export: Markdown report through the save dialog (code-server's simple dialog: Enter accepts the proposed path)
    await quickInput(page, 'F1', 'Leastwise: Export Report', 'Leastwise: Export Report', 'Export the results');
    await quickInput(page, null, 'Markdown report', 'Markdown report', 'Export Markdown report');
    await page.waitForFunction(() => /cooling-report\.md$/.test(document.querySelector('.quick-input-widget .quick-input-box input')?.value ?? ''));
    await page.keyboard.press('Enter');
    const report = await waitForFile(path.join(ws, 'cooling-report.md'), (t) => t.includes('Use of results') && t.endsWith('\n'));
    check('Markdown report exported next to the spec', /^# Fit report/.test(report) && report.includes('newton'), `${report.length} characters`);

    // new spec from the CSV: x, y and a model template
    await page.locator('.quick-input-widget').waitFor({ state: 'hidden' });
    await page.locator('.tab', { hasText: 'cooling.csv' }).first().click(); // opened above from the chart
    await page.locator('.tab.active', { hasText: 'cooling.csv' }).waitFor();
    await page.locator('.editor-group-container .monaco-editor .view-lines', { hasText: 'time_min,temp_C' }).first().waitFor();
    await quickInput(page, 'F1', 'Leastwise: New Spec from CSV', 'Leastwise: New Spec from CSV', 'New spec (1/3)');
    await quickInput(page, null, 'time_min', 'time_min', 'New spec (2/3)');
    await quickInput(page, null, 'temp_C', 'temp_C', 'New spec (3/3)');
    await quickInput(page, null, 'exponential decay', 'exponential decay');
    const scaffold = await waitForFile(path.join(ws, 'cooling-2.lsq'), (t) => /^fit /m.test(t) && t.endsWith('\n'));
    await page.locator('.editor-group-container .monaco-editor .view-lines', { hasText: 'on cooling' }).first().waitFor();
    check('new spec scaffolded from the CSV and opened', /fit \w+ on cooling/.test(scaffold) && scaffold.includes('temp_C'), scaffold.split('\n').find((l) => l.startsWith('fit ')));

    // leastwise.fitOnSave (workspace setting): add an expectation that cannot hold, save, and the
    // fit re-runs by itself: the status bar reports the failed expectation.
    await page.locator('.tab', { hasText: 'cooling.lsq' }).first().click();
    await page.locator('.tab.active', { hasText: 'cooling.lsq' }).first().waitFor();
    const specEditor = page.locator('.editor-group-container .monaco-editor', { hasText: 'fit newton on bench' }).first();
    await specEditor.locator('.view-lines').click();
    await page.keyboard.press('Control+End');
    await page.keyboard.type('\nexpect newton.tau below 1\n');
    await page.keyboard.press('Control+S');
    await waitForFile(path.join(ws, 'cooling.lsq'), (t) => t.includes('expect newton.tau below 1'));
    await page.locator('.statusbar-item', { hasText: /1 expectation failed/ }).first().waitFor();
    check('fit on save re-ran the fit and the status bar shows the failed expectation', true);

    // cancel a running fit from its progress notification
    await cancelRunningFit(page, path.join(state, 'user-data', 'logs'));

    // views across groups: plate map, overlay, residuals by group, group labels, three themes
    await groupViews(page, { repo, ws, outDir });
    // the results panel's trust views on a second spec (panel-views.cjs)
    await panelViews(page, ws, outDir);
    // the same panel's new views in the light, dark and high-contrast themes, with screenshots (panel-views.cjs)
    await panelThemes(page, { repo, ws, outDir });
    // editing the dose-response sample (editor.cjs), last: it closes every editor first, so its spec opens alone in
    // one wide group (opened in the fourth of four narrow groups the steps above leave, its misspelt name was scrolled
    // out of view and the pointer landed on the neighbouring editor: the hover check timed out)
    await editorChecks(page, { repo, ws, outDir });
    // the log/linear axis switch on the dose-response spec's panel (editor.cjs)
    await doseAxis(page);
  } catch (e) {
    failed = true;
    check('no exception while driving VS Code', false, errorSummary(e));
  }
  if (failed) await page.screenshot({ path: path.join(outDir, 'vscode-failure.png') }).catch(() => {});
  console.log(`drive ${secs(tDrive)}s`);
  check('no uncaught errors in the workbench page', pageErrors.length === 0, pageErrors.slice(0, 3).join(' | '));
  check('nothing reached outside 127.0.0.1', external.size === 0, [...external].join(', '));
  await browser.close();
  server.stop();

  // 5. Restricted Mode: a second server with Workspace Trust on
  if (!(await restrictedMode({ repo, home, vsix, work, outDir }))) failed = true;

  const anyFail = failed || anyFailed();
  if (anyFail || process.env.KEEP === '1') {
    const logs = path.join(state, 'user-data', 'logs');
    console.log(`kept ${work} (server log ${path.join(state, 'code-server.log')}, extension host logs under ${logs})`);
  } else fs.rmSync(work, { recursive: true, force: true });
  finish(failed ? 1 : 0);
})().catch((e) => {
  console.error(e);
  check('driver', false, e.message);
  finish(1);
});
