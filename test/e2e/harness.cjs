// Shared pieces of the end-to-end driver (run.cjs): the pass/fail ledger,
// waiting for files and quick inputs, starting code-server and Chromium.
// Two ways to start the server:
//  - startRecipeServer: the shared recipe's start.sh (Workspace Trust off,
//    as the recipe always starts it);
//  - startTrustServer: the same steps as start.sh (settings, XDG folders,
//    .vsix install, own process group, /healthz poll) but with Workspace
//    Trust on, for the Restricted Mode checks. start.sh passes
//    --disable-workspace-trust unconditionally, hence this launcher.
'use strict';
const fs = require('fs');
const os = require('os');
const path = require('path');
const net = require('net');
const http = require('http');
const { spawn, spawnSync, execFileSync } = require('child_process');

const t0 = Date.now();
const secs = (from) => ((Date.now() - from) / 1000).toFixed(1);

const results = [];
function check(name, ok, detail) {
  results.push({ name, ok });
  console.log(`${ok ? 'ok  ' : 'FAIL'} ${name}${detail ? ` — ${detail}` : ''} (${secs(t0)}s)`);
  return ok;
}
function anyFailed() {
  return results.some((r) => !r.ok);
}
function finish(code) {
  const passed = results.filter((r) => r.ok).length;
  const failed = results.length - passed;
  console.log(`end-to-end total ${secs(t0)}s`);
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed || code ? 1 : 0);
}

/**
 * Resolves with the file's text once it exists and `complete(text)` holds
 * (checked on each change in its folder: a file may be created before it is written).
 */
function waitForFile(file, complete, timeoutMs = 60000) {
  return new Promise((resolve, reject) => {
    const dir = path.dirname(file);
    const done = () => {
      let text;
      try {
        text = fs.readFileSync(file, 'utf8');
      } catch {
        return;
      }
      if (!complete(text)) return;
      clearTimeout(timer);
      watcher.close();
      resolve(text);
    };
    const watcher = fs.watch(dir, () => done());
    const timer = setTimeout(() => { watcher.close(); reject(new Error(`${file} did not appear complete`)); }, timeoutMs);
    done();
  });
}

/** First line of a driver error plus, for a Playwright wait, the locator it waited for. */
function errorSummary(e) {
  const lines = String((e && e.message) || e).split('\n');
  const waiting = lines.find((l) => /waiting for /.test(l));
  return waiting ? `${lines[0]} (${waiting.trim().replace(/^- /, '')})` : lines[0];
}

/** Resolves with the first truthy value of `probe()`, polled every 200 ms (for files whose name is not known in advance). */
async function until(probe, what, timeoutMs = 30000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = probe();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** Newest file named like the extension's log channel under the server's log folder, or null. */
function findExtensionLog(logsDir) {
  const found = [];
  const walk = (d) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (/Leastwise\.log$/.test(e.name)) found.push(p);
    }
  };
  if (fs.existsSync(logsDir)) walk(logsDir);
  return found.sort((a, b) => fs.statSync(b).mtimeMs - fs.statSync(a).mtimeMs)[0] ?? null;
}

function freePort() {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address();
      s.close(() => resolve(port));
    });
  });
}

function run(label, cmd, args, opts = {}) {
  const t = Date.now();
  const r = spawnSync(cmd, args, { encoding: 'utf8', ...opts });
  const ok = r.status === 0;
  check(`${label} (${secs(t)}s)`, ok, ok ? '' : `${(r.stderr || r.stdout || String(r.error || '')).trim().split('\n').slice(-5).join(' | ')}`);
  return r;
}

// Quick input (Ctrl+P / F1 / Ctrl+G): type, wait for a matching row (if any), accept.
// `next`: the title of the quick input the accepted item opens (the widget is reused,
// so it never hides); without it, wait until the widget is hidden.
// Opened by `keys`, the widget can close by itself before a row is accepted: a webview
// that was just clicked takes the keyboard focus a moment later, and the quick input
// closes when it loses the focus. Then it is opened again (at most 3 tries): the row
// wait ends at whichever comes first, the row focused or the widget hidden.
async function quickInput(page, keys, text, rowText, next) {
  const widget = page.locator('.quick-input-widget');
  for (let attempt = 1; ; attempt++) {
    if (keys) await page.keyboard.press(keys);
    const input = page.locator('.quick-input-widget .quick-input-box input');
    // A webview that keeps or takes back the keyboard focus can swallow the key, or close the widget just after it
    // opened (seen after a click in the plate map and after un-maximizing a results panel): then give the focus back
    // to the workbench (the side bar's title, which has no action) and press again. The text is typed into the
    // widget's own input, so nothing lands in an editor if the widget closes.
    const retry = async (what) => {
      console.log(`(quick input for "${text}" ${what}; focusing the workbench and pressing ${keys} again)`);
      await page.locator('.part.sidebar .composite.title').first().click({ timeout: 5000 }).catch(() => {});
    };
    if (keys && attempt < 3) {
      const shown = await input.waitFor({ state: 'visible', timeout: 10000 }).then(() => true, () => false);
      if (!shown) {
        await retry('did not open');
        continue;
      }
      const typed = await input.pressSequentially(text, { delay: 10, timeout: 15000 }).then(() => true, () => false);
      if (!typed) {
        await retry('closed while typing');
        continue;
      }
    } else {
      await input.waitFor({ state: 'visible' });
      await input.pressSequentially(text, { delay: 10 });
    }
    // Enter accepts the focused row: wait until the row we want is the focused one (the list filters
    // asynchronously; a visible but unfocused match would let Enter pick another row or nothing)
    if (rowText) {
      const row = page.locator('.quick-input-widget .monaco-list-row.focused', { hasText: rowText }).first();
      const seen = await Promise.race([
        row.waitFor({ state: 'visible', timeout: 30000 }).then(() => 'row', (e) => e),
        widget.waitFor({ state: 'hidden', timeout: 30000 }).then(() => 'closed', (e) => e),
      ]);
      if (seen === 'closed' && keys && attempt < 3) {
        console.log(`(quick input for "${text}" closed before a row was accepted; opening it again)`);
        continue;
      }
      if (seen instanceof Error) throw seen;
      if (seen === 'closed') throw new Error(`the quick input closed before a row "${rowText}" was focused (after ${attempt} tries)`);
    }
    await page.keyboard.press('Enter');
    if (next) await page.locator('.quick-input-widget .quick-input-title', { hasText: next }).waitFor();
    else await widget.waitFor({ state: 'hidden' });
    return;
  }
}

/** The recipe's start.sh (trust off). Returns { url, stop } or throws with start.sh's stderr. */
function startRecipeServer({ tools, home, port, workspace, vsix, state }) {
  const out = execFileSync(path.join(tools, 'start.sh'), ['--port', String(port), '--workspace', workspace, '--extension', vsix, '--state', state], {
    encoding: 'utf8', env: { ...process.env, VSCODE_WEB_HOME: home }, stdio: ['ignore', 'pipe', 'pipe'],
  });
  const vars = Object.fromEntries(out.trim().split('\n').map((l) => /^(\w+)='?(.*?)'?$/.exec(l)).filter(Boolean).map((m) => [m[1], m[2]]));
  if (!vars.VSCODE_WEB_URL) throw new Error(`start.sh printed no URL: ${out}`);
  return {
    url: vars.VSCODE_WEB_URL,
    stop: () => spawnSync(path.join(tools, 'start.sh'), ['--stop', state], { stdio: 'ignore', env: { ...process.env, VSCODE_WEB_HOME: home } }),
  };
}

function healthy(port) {
  return new Promise((resolve) => {
    http.get({ host: '127.0.0.1', port, path: '/healthz', timeout: 1000 }, (r) => { r.resume(); resolve(r.statusCode === 200); })
      .on('error', () => resolve(false));
  });
}

/**
 * code-server from the recipe's install with Workspace Trust on (see the file
 * comment). Same folders and flags as start.sh otherwise; `settings` are
 * merged into the user settings. Returns { url, stop }.
 */
async function startTrustServer({ home, port, workspace, vsix, state, settings = {} }, timeoutMs = 90000) {
  const entry = path.join(home, 'node_modules', 'code-server', 'out', 'node', 'entry.js');
  if (!fs.existsSync(entry)) throw new Error(`code-server not installed in ${home} (run the recipe's install.sh)`);
  const ud = path.join(state, 'user-data');
  const ed = path.join(state, 'extensions');
  for (const d of [path.join(ud, 'User'), ed, 'xdg-config', 'xdg-data', 'xdg-cache'].map((d) => path.resolve(state, d))) fs.mkdirSync(d, { recursive: true });
  fs.writeFileSync(path.join(state, 'config.yaml'), `bind-addr: 127.0.0.1:${port}\nauth: none\ncert: false\n`);
  fs.writeFileSync(path.join(ud, 'User', 'settings.json'), JSON.stringify({
    'workbench.startupEditor': 'none',
    'workbench.tips.enabled': false,
    'workbench.enableExperiments': false,
    'workbench.welcomePage.walkthroughs.openOnInstall': false,
    'security.workspace.trust.enabled': true,
    'telemetry.telemetryLevel': 'off',
    'update.mode': 'none',
    'extensions.autoCheckUpdates': false,
    'extensions.autoUpdate': false,
    'extensions.ignoreRecommendations': true,
    'git.enabled': false,
    'chat.commandCenter.enabled': false,
    'editor.accessibilitySupport': 'off',
    ...settings,
  }, null, 2));
  const env = {
    ...process.env,
    XDG_CONFIG_HOME: path.join(state, 'xdg-config'),
    XDG_DATA_HOME: path.join(state, 'xdg-data'),
    XDG_CACHE_HOME: path.join(state, 'xdg-cache'),
    EXTENSIONS_GALLERY: '{}', // no marketplace: nothing tries to reach the internet
  };
  const args = ['--config', path.join(state, 'config.yaml'), '--bind-addr', `127.0.0.1:${port}`, '--auth', 'none',
    '--disable-telemetry', '--disable-update-check', '--disable-getting-started-override',
    '--user-data-dir', ud, '--extensions-dir', ed];
  const install = spawnSync(process.execPath, [entry, ...args, '--force', '--install-extension', vsix], { encoding: 'utf8', env });
  if (install.status !== 0) throw new Error(`install of ${vsix} failed: ${(install.stderr || install.stdout).trim().split('\n').slice(-3).join(' | ')}`);
  const log = fs.openSync(path.join(state, 'code-server.log'), 'w');
  // detached: own process group, so stop() ends the extension host and the pty host with it
  const child = spawn(process.execPath, [entry, ...args, '--ignore-last-opened', workspace], { env, detached: true, stdio: ['ignore', log, log] });
  fs.closeSync(log);
  let exited = false;
  child.on('exit', () => { exited = true; });
  const stop = () => new Promise((resolve) => {
    if (exited) return resolve();
    const kill = (sig) => { try { process.kill(-child.pid, sig); } catch { /* gone */ } };
    const hard = setTimeout(() => kill('SIGKILL'), 10000);
    child.once('exit', () => { clearTimeout(hard); resolve(); });
    kill('SIGTERM');
  });
  const deadline = Date.now() + timeoutMs;
  while (!(await healthy(port))) {
    if (exited) throw new Error(`code-server exited during start (log ${path.join(state, 'code-server.log')})`);
    if (Date.now() > deadline) { await stop(); throw new Error(`code-server did not answer within ${timeoutMs / 1000}s`); }
    await new Promise((r) => setTimeout(r, 200));
  }
  const folder = encodeURIComponent(workspace).replace(/%2F/g, '/');
  return { url: `http://127.0.0.1:${port}/?folder=${folder}`, stop };
}

/**
 * Debian's Chromium through playwright-core (recipe README), a 1600×960 page,
 * uncaught page errors collected, and every request to a host other than
 * 127.0.0.1 recorded (webview resources are answered by the webview's service
 * worker and never touch the network).
 */
async function openBrowser(repo) {
  const { chromium } = require(path.join(repo, 'node_modules', 'playwright-core'));
  const scratch = fs.mkdtempSync(path.join(os.tmpdir(), 'leastwise-e2e-chromium-'));
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM || '/usr/bin/chromium',
    headless: process.env.HEADED !== '1',
    env: { ...process.env, XDG_CONFIG_HOME: scratch, XDG_CACHE_HOME: scratch },
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage',
      '--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1'],
  });
  const context = await browser.newContext({ viewport: { width: 1600, height: 960 } });
  const page = await context.newPage();
  page.setDefaultTimeout(60000);
  const pageErrors = [];
  page.on('pageerror', (e) => pageErrors.push(e.message));
  const external = new Set();
  const isLocal = (u) => ['127.0.0.1', 'localhost'].includes(u.hostname);
  context.on('requestfinished', async (r) => {
    const u = new URL(r.url());
    if (!/^https?:$/.test(u.protocol) || isLocal(u)) return;
    const res = await r.response().catch(() => null);
    if (!res || !res.fromServiceWorker()) external.add(`${u.host} (${res ? `answered ${res.status()} not by the service worker` : 'no response'}: ${u.pathname.slice(-60)})`);
  });
  context.on('requestfailed', (r) => {
    const u = new URL(r.url());
    // A webview's own resources use the pseudo-host *.vscode-resource.vscode-cdn.net, which the webview's service
    // worker answers from the local server; such a request aborted (net::ERR_ABORTED) when a panel is closed or
    // reloaded never reached the network. Any other failure (e.g. a name lookup) still counts as an attempt out.
    const aborted = r.failure()?.errorText === 'net::ERR_ABORTED' && u.hostname.endsWith('.vscode-resource.vscode-cdn.net');
    if (/^https?:$/.test(u.protocol) && !isLocal(u) && !aborted) external.add(`${u.host} (${r.failure()?.errorText}: ${u.pathname.slice(-60)}, at ${secs(t0)}s, webview ${/[?&]id=([\w-]{8})/.exec(r.frame()?.url() ?? '')?.[1] ?? '?'})`);
  });
  const close = async () => {
    await browser.close();
    fs.rmSync(scratch, { recursive: true, force: true });
  };
  return { page, pageErrors, external, close };
}

/** The webview's inner frame (two nested iframes: code-server's host frame, then the extension's page). */
function webviewFrame(page) {
  return page.frameLocator('iframe.webview.ready').frameLocator('#active-frame');
}

/** The webview (inner frame) of the results panel whose toolbar names `specName` (each try waits up to 1 s for a frame's title). */
async function panelFrame(page, specName, timeoutMs = 90000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const n = await page.locator('iframe.webview.ready').count();
    for (let i = 0; i < n; i++) {
      const f = page.frameLocator(`iframe.webview.ready >> nth=${i}`).frameLocator('#active-frame');
      const title = await f.locator('.lw-toolbar h1').textContent({ timeout: 1000 }).catch(() => null);
      if (title === specName) return f;
    }
    if (Date.now() > deadline) throw new Error(`no results panel for ${specName}`);
    if (n === 0) await page.locator('iframe.webview.ready').first().waitFor({ timeout: Math.max(1000, deadline - Date.now()) });
  }
}

module.exports = { t0, secs, check, anyFailed, finish, errorSummary, waitForFile, until, findExtensionLog, freePort, run, quickInput, startRecipeServer, startTrustServer, openBrowser, webviewFrame, panelFrame };
