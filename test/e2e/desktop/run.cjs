#!/usr/bin/env node
// Desktop runner of the end-to-end suite: the same scenario as test/e2e/run.cjs,
// driven through the VS Code API inside a desktop VS Code started by
// @vscode/test-electron (`npm run test:desktop`).
//
// Offline note: test-electron DOWNLOADS VS Code (from update.code.visualstudio.com)
// unless told where one is installed. On a machine without that access, set
// VSCODE_EXECUTABLE to an installed VS Code binary (e.g. /usr/share/code/code);
// without it this runner fails at the download step. The code-server runner
// (npm run test:e2e) is the one used where there is no download access.
'use strict';
const fs = require('fs');
const os = require('os');
const path = require('path');
const { runTests } = require('@vscode/test-electron');

async function main() {
  const repo = path.resolve(__dirname, '..', '..', '..');
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'leastwise-desktop-'));
  const ws = path.join(work, 'cooling');
  fs.cpSync(path.join(repo, 'samples', 'cooling'), ws, { recursive: true });
  try {
    await runTests({
      extensionDevelopmentPath: repo,
      extensionTestsPath: path.join(__dirname, 'suite.cjs'),
      ...(process.env.VSCODE_EXECUTABLE ? { vscodeExecutablePath: process.env.VSCODE_EXECUTABLE } : {}),
      launchArgs: [ws, '--disable-extensions', '--disable-workspace-trust', '--skip-welcome', '--skip-release-notes'],
      extensionTestsEnv: { LEASTWISE_E2E_WORKSPACE: ws },
    });
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(`desktop end-to-end failed: ${e && e.message ? e.message : e}`);
  process.exit(1);
});
