#!/usr/bin/env bash
# Everything CI runs, from a clean install (`npm ci` done by the caller):
#   1. test tools: Debian chromium (panel page test) and a local VS Code for the
#      web (code-server + playwright-core, via the shared recipe) for the
#      end-to-end editor test;
#   2. build; 3. vitest (unit, property, NIST StRD, CLI, panel page in Chromium);
#   4. sharded per-group fits on a one-node Slurm cluster (test/slurm/run.sh);
#   5. the NIST StRD table; 6. the end-to-end test in a real VS Code.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
export STRD_DIR="${STRD_DIR:-$(cd "$root/.." && pwd)/shared/strd}"
export VSCODE_WEB_TOOLS="${VSCODE_WEB_TOOLS:-$(cd "$root/.." && pwd)/shared/tools/vscode-web}"
# long tests (e.g. test/front/cli/json-stream.test.ts, 5 million rows) run here, not in a plain `npx vitest run`
export LEASTWISE_LONG_TESTS=1

step() { printf '\n== %s ==\n' "$*"; }

step "test tools"
if ! command -v chromium >/dev/null 2>&1; then
  if [ "$(id -u)" = 0 ]; then
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium fonts-liberation fonts-dejavu-core >/dev/null
  else
    echo "chromium is missing and this is not root: install Debian's chromium (apt-get install chromium)" >&2
    exit 1
  fi
fi
chromium --version
if [ -x "$VSCODE_WEB_TOOLS/install.sh" ] || [ -f "$VSCODE_WEB_TOOLS/install.sh" ]; then
  bash "$VSCODE_WEB_TOOLS/install.sh"
else
  echo "VS Code for the web recipe not found at $VSCODE_WEB_TOOLS; the end-to-end editor test cannot run" >&2
  exit 1
fi

step "build"
node build.mjs

step "vitest"
mkdir -p test/artifacts
npx vitest run --reporter=default --reporter=json --outputFile.json=test/artifacts/vitest.json

step "sharded fits on a real Slurm scheduler (../shared/tools/slurm-local)"
export SLURM_LOCAL_TOOLS="${SLURM_LOCAL_TOOLS:-$(cd "$root/.." && pwd)/shared/tools/slurm-local}"
bash test/slurm/run.sh | tee test/artifacts/slurm.log

step "NIST StRD table"
node dist/strd.js

step "end to end in VS Code (code-server)"
node test/e2e/run.cjs | tee test/artifacts/e2e.log

# One closing line over both runners (vitest's JSON counts + the end-to-end tally).
node -e '
const fs = require("fs");
const v = JSON.parse(fs.readFileSync("test/artifacts/vitest.json", "utf8"));
const m = /(\d+) passed, (\d+) failed/.exec(fs.readFileSync("test/artifacts/e2e.log", "utf8").trim().split("\n").pop() || "");
const e2e = m ? [Number(m[1]), Number(m[2])] : [0, 1];
const slurm = /\[slurm\] PASS/.test(fs.readFileSync("test/artifacts/slurm.log", "utf8")) ? [1, 0] : [0, 1];
const passed = v.numPassedTests + e2e[0] + slurm[0], failed = v.numFailedTests + e2e[1] + slurm[1], skipped = v.numPendingTests + v.numTodoTests;
console.log(`\ntotal: ${passed} passed, ${failed} failed, ${skipped} skipped`);
process.exit(failed ? 1 : 0);
'
