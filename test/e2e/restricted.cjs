// Restricted Mode (Workspace Trust) in a real VS Code: a second code-server
// with trust on. The user answers the startup question with "No, I don't
// trust the authors"; editing support works (an error squiggle on a misspelt
// column, completion of column names); saving does not fit although the
// workspace asks for fit on save (a restricted setting, which VS Code hides
// from extensions in Restricted Mode); "Fit This File" and "Export Report"
// refuse with the message from
// extension/trust.ts and open no results panel; then the user trusts the
// folder from that message and the same fit runs.
'use strict';
const fs = require('fs');
const path = require('path');
const { check, secs, freePort, quickInput, startTrustServer, openBrowser, webviewFrame, waitForFile, errorSummary } = require('./harness.cjs');

/** First words of untrustedMessage('fit' | 'export' | 'newSpec') in extension/trust.ts (the action's verb). */
const REFUSAL = (action) => `Leastwise does not ${action} in Restricted Mode`;

async function restrictedMode({ repo, home, vsix, work, outDir }) {
  const ws = path.join(work, 'restricted', 'cooling');
  fs.cpSync(path.join(repo, 'samples', 'cooling'), ws, { recursive: true });
  // fit on save asked for by the workspace: a restricted setting, ignored until the folder is trusted
  fs.mkdirSync(path.join(ws, '.vscode'));
  fs.writeFileSync(path.join(ws, '.vscode', 'settings.json'), JSON.stringify({ 'leastwise.fitOnSave': true }, null, 2) + '\n');
  const specLines = fs.readFileSync(path.join(ws, 'cooling.lsq'), 'utf8').split(/\r?\n/);
  const sigmaLine = specLines.findIndex((l) => /^\s*sigma\s+temp_sd\s*$/.test(l)) + 1;
  const state = path.join(work, 'restricted', 'state');
  const tStart = Date.now();
  let server;
  try {
    server = await startTrustServer({ home, port: await freePort(), workspace: ws, vsix, state });
  } catch (e) {
    check('code-server with Workspace Trust on started', false, e.message);
    return false;
  }
  check(`code-server with Workspace Trust on started (${secs(tStart)}s)`, true, server.url);
  const browser = await openBrowser(repo);
  const { page } = browser;
  let ok = true;
  try {
    await page.goto(server.url);
    await page.locator('.monaco-workbench').waitFor();
    const dialog = page.locator('.monaco-dialog-box', { hasText: 'Do you trust the authors' });
    await dialog.waitFor();
    await dialog.locator('.monaco-button', { hasText: "No, I don't trust the authors" }).click();
    await dialog.waitFor({ state: 'detached' });
    await page.locator('.statusbar-item', { hasText: 'Restricted Mode' }).first().waitFor();
    check('workspace opened in Restricted Mode', true);

    await quickInput(page, 'Control+P', 'cooling.lsq', 'cooling.lsq');
    const editor = page.locator('.editor-group-container .monaco-editor').first();
    await editor.locator('.view-lines', { hasText: 'fit newton on bench' }).waitFor();
    await editor.locator('.codelens-decoration', { hasText: 'Fit' }).first().waitFor();
    check('Restricted Mode: the extension is active (code lens above the fit)', true);

    // editing support: the CSV header is read, so a misspelt column is still an error
    await quickInput(page, 'Control+G', String(sigmaLine));
    await page.keyboard.press('End');
    await page.keyboard.type('x');
    await editor.locator('.squiggly-error').first().waitFor();
    check('Restricted Mode: error squiggle under the misspelt column', true);
    // completion of column names from the CSV header: replace the typo through the suggest widget
    await page.keyboard.press('Backspace');
    await page.keyboard.press('Control+Backspace');
    await page.keyboard.type('temp_');
    await page.keyboard.press('Control+Space');
    const suggestion = page.locator('.suggest-widget .monaco-list-row', { hasText: 'temp_sd' }).first();
    await suggestion.waitFor();
    check('Restricted Mode: completion offers the CSV columns', true, (await suggestion.innerText()).replace(/\s+/g, ' ').slice(0, 80));
    await page.keyboard.press('Escape');
    await page.keyboard.type('sd');
    await editor.locator('.squiggly-error').first().waitFor({ state: 'detached' });

    // save with leastwise.fitOnSave set by the workspace: a restricted setting, so no fit runs (checked
    // below: the status bar still shows no fit after the refused command, well after a fit would end)
    await page.keyboard.press('Control+End');
    await page.keyboard.type('\n# edited in Restricted Mode\n');
    await page.keyboard.press('Control+S');
    await waitForFile(path.join(ws, 'cooling.lsq'), (t) => t.includes('# edited in Restricted Mode'));

    // fitting refuses with the explanation and opens no panel
    await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
    const toast = page.locator('.notification-toast', { hasText: REFUSAL('fit') }).first();
    await toast.waitFor();
    const webviews = await page.locator('iframe.webview').count();
    check('Restricted Mode: "Fit This File" refuses with the trust message and opens no panel', webviews === 0, `${webviews} webviews`);
    const statusText = (await page.locator('.statusbar-item', { hasText: 'Leastwise' }).first().innerText()).trim();
    check('Restricted Mode: the status bar shows no fit (none from the command, none from saving with fitOnSave)', !/fitting|fit failed|\d+\/\d+ fit/.test(statusText), statusText);
    await toast.locator('.monaco-button', { hasText: 'Manage Workspace Trust' }).waitFor();
    await page.screenshot({ path: path.join(outDir, 'vscode-restricted.png'), animations: 'disabled' });
    await quickInput(page, 'F1', 'Leastwise: Export Report', 'Leastwise: Export Report');
    await page.locator('.notification-toast', { hasText: REFUSAL('export') }).first().waitFor();
    check('Restricted Mode: "Export Report" refuses with the trust message', true);
    const specsBefore = fs.readdirSync(ws).filter((f) => f.endsWith('.lsq')).sort();
    await quickInput(page, 'F1', 'Leastwise: New Spec from CSV', 'Leastwise: New Spec from CSV');
    await page.locator('.notification-toast', { hasText: REFUSAL('create specs from CSV files') }).first().waitFor();
    const asked = await page.locator('.quick-input-widget .quick-input-title', { hasText: 'New spec (1/3)' }).isVisible();
    const specsAfter = fs.readdirSync(ws).filter((f) => f.endsWith('.lsq')).sort();
    check('Restricted Mode: "New Spec from CSV" refuses with the trust message, asks nothing and writes no spec',
      !asked && JSON.stringify(specsAfter) === JSON.stringify(specsBefore), `${specsAfter.join(', ')}${asked ? '; the column picker opened' : ''}`);

    // trust from the message: "Manage Workspace Trust" opens the trust editor
    await toast.locator('.monaco-button', { hasText: 'Manage Workspace Trust' }).click();
    const trustEditor = page.locator('.workspace-trust-editor');
    await trustEditor.waitFor();
    await trustEditor.locator('.monaco-button', { hasText: /^Trust$/ }).first().click();
    await page.locator('.statusbar-item', { hasText: 'Restricted Mode' }).first().waitFor({ state: 'detached' });
    check('"Manage Workspace Trust" in the message leads to trusting the folder', true);

    await page.locator('.tab', { hasText: 'cooling.lsq' }).first().click();
    await editor.locator('.view-lines', { hasText: 'fit newton on bench' }).waitFor();
    await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
    await webviewFrame(page).locator('table.lw-params tbody tr[data-param="tau"]').waitFor({ timeout: 90000 });
    check('after trusting, the same fit runs and the panel shows the parameters', true);
  } catch (e) {
    ok = false;
    check('no exception while driving VS Code in Restricted Mode', false, errorSummary(e));
    await page.screenshot({ path: path.join(outDir, 'vscode-restricted-failure.png') }).catch(() => {});
  }
  check('Restricted Mode run: no uncaught errors in the workbench page', browser.pageErrors.length === 0, browser.pageErrors.slice(0, 3).join(' | '));
  check('Restricted Mode run: nothing reached outside 127.0.0.1', browser.external.size === 0, [...browser.external].join(', '));
  await browser.close();
  await server.stop();
  return ok;
}

module.exports = { restrictedMode };
