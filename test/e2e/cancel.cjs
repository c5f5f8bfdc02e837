// Cancelling a running fit from its progress notification in a real VS Code.
// The job: 400 batches of 60 rows, each fitted by gradient descent with a
// 100,000-iteration limit (about 70 s on two cores if nothing stopped it).
// The driver waits until the notification reports at least one finished
// batch (so the fit is running, not starting), presses Cancel, and waits for
// the status bar to say the fit was cancelled and for the extension's log to
// say the solver stopped (extension/fit/runner.ts: the worker answered the
// cancel flag rather than being terminated). Then the same rows as one fit
// (long.lsq): the notification shows its iterations, and Cancel ends it.
'use strict';
const fs = require('fs');
const path = require('path');
const { check, quickInput, until, findExtensionLog } = require('./harness.cjs');
const { writeSlowJob: writeSlowJobFiles } = require('../fixtures/slow-job.cjs');

const BATCHES = 400;

/** Writes slow.lsq and batches.csv into `dir` (test/fixtures/slow-job.cjs). */
function writeSlowJob(dir) {
  writeSlowJobFiles(dir, { batches: BATCHES, iterations: 100000, perBatch: true });
  // the same rows as one fit (24,000 rows): no groups, so the notification shows iterations
  writeSlowJobFiles(dir, { batches: BATCHES, iterations: 100000000, perBatch: false, specName: 'long.lsq' });
}

async function cancelRunningFit(page, logsDir) {
  await quickInput(page, 'Control+P', 'slow.lsq', 'slow.lsq');
  const editor = page.locator('.editor-group-container .monaco-editor', { hasText: 'fit decay on runs' }).first();
  await editor.locator('.view-lines').waitFor();
  await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
  const toast = page.locator('.notification-toast', { hasText: 'Leastwise: fitting slow.lsq' }).first();
  await toast.waitFor();
  await page.locator('.statusbar-item', { hasText: 'Leastwise: fitting slow.lsq' }).first().waitFor();
  // running, not starting: at least one batch done
  await toast.locator('.notification-list-item-message', { hasText: new RegExp(`[1-9]\\d* of ${BATCHES}`) }).waitFor();
  const progress = (await toast.innerText()).replace(/\s+/g, ' ').trim();
  check('a long per-group fit shows a progress notification with a count', true, progress.slice(0, 80));
  await toast.locator('.monaco-button', { hasText: 'Cancel' }).click();
  await page.locator('.statusbar-item', { hasText: 'Leastwise: cancelled' }).first().waitFor();
  await toast.waitFor({ state: 'detached' });
  check('Cancel in the notification ends the fit; the status bar says cancelled', true);
  // the log channel is flushed to disk asynchronously
  const line = await until(() => {
    const log = findExtensionLog(logsDir);
    return log && fs.readFileSync(log, 'utf8').split('\n').find((l) => /slow\.lsq cancelled after/.test(l));
  }, `the cancel line in the extension log under ${logsDir}`);
  check('the solver stopped on the cancel flag (extension log)', /\(the solver stopped\)/.test(line), line.replace(/^.*?\] /, ''));

  // a single long fit: the notification reports its iterations
  await quickInput(page, 'Control+P', 'long.lsq', 'long.lsq');
  await page.locator('.tab.active', { hasText: 'long.lsq' }).waitFor();
  await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
  const longToast = page.locator('.notification-toast', { hasText: 'Leastwise: fitting long.lsq' }).first();
  const iterating = longToast.locator('.notification-list-item-message', { hasText: /decay: iteration [\d,]+, objective/ });
  await iterating.waitFor();
  await page.locator('.statusbar-item', { hasText: 'Leastwise: fitting long.lsq' }).first().waitFor();
  check('a long single fit shows its iterations in the notification', true, (await iterating.innerText()).replace(/\s+/g, ' ').slice(0, 100));

  // fitting the same spec again replaces the running fit; the replaced run must not report itself cancelled
  await quickInput(page, 'F1', 'Leastwise: Fit This File', 'Leastwise: Fit This File');
  const replaced = await until(() => {
    const log = findExtensionLog(logsDir);
    return log && fs.readFileSync(log, 'utf8').split('\n').find((l) => /long\.lsq replaced by a newer fit/.test(l));
  }, 'the replaced-fit line in the extension log');
  const toasts = page.locator('.notification-toast', { hasText: 'Leastwise: fitting long.lsq' });
  // the replaced run's notification is gone, the new run's remains
  await page.waitForFunction(() => [...document.querySelectorAll('.notification-toast')].filter((t) => t.textContent.includes('Leastwise: fitting long.lsq')).length === 1);
  await toasts.first().locator('.notification-list-item-message', { hasText: /iteration/ }).waitFor();
  const status = (await page.locator('.statusbar-item', { hasText: 'Leastwise' }).first().innerText()).trim();
  check('fitting a spec again replaces its running fit; the status bar follows the new run', /fitting long\.lsq/.test(status), `${status}; ${replaced.replace(/^.*?\] /, '')}`);
  await toasts.first().locator('.monaco-button', { hasText: 'Cancel' }).click();
  await page.locator('.statusbar-item', { hasText: 'Leastwise: cancelled' }).first().waitFor();
  await toasts.first().waitFor({ state: 'detached' });
}

module.exports = { writeSlowJob, cancelRunningFit };
