#!/usr/bin/env bash
# Sharded per-group fits on a real Slurm scheduler (a one-node cluster from
# Debian's packages on loopback: ../shared/tools/slurm-local, or
# SLURM_LOCAL_TOOLS). Generates a screen of 2,400 compounds
# (samples/cluster/make-screen.mjs), fits it once unsharded, then submits the
# documented job scripts exactly as README "Running on a cluster" shows: an
# array of 4 tasks (samples/cluster/fit-shard.sbatch) and the gathering job
# with a dependency on the array (gather.sbatch); waits for both and checks
# that the gathered JSON equals the unsharded JSON apart from timing
# (startedAt, elapsedMs) and that the group tables are byte-equal. The
# cluster is stopped at the end, also on failure. Needs `node build.mjs`.
set -euo pipefail
cd "$(dirname "$0")/../.."
root=$(pwd)
TOOLS="${SLURM_LOCAL_TOOLS:-$(cd "$root/.." && pwd)/shared/tools/slurm-local}"
export SLURM_LOCAL_DIR="${SLURM_LOCAL_DIR:-/tmp/leastwise-slurm}"
TASKS=4
COMPOUNDS="${SLURM_TEST_COMPOUNDS:-2400}"
say() { printf '[slurm] %s\n' "$*"; }

[ -x "$TOOLS/start.sh" ] || { say "slurm-local recipe not found at $TOOLS"; exit 1; }
timeout 900 "$TOOLS/install.sh" >/dev/null
rc=1
finish() {
  "$TOOLS/stop.sh" >/dev/null 2>&1 || { say "stop.sh failed"; rc=1; }
  if [ "$rc" = 0 ]; then say "PASS"; else say "FAIL (daemon logs: $SLURM_LOCAL_DIR/log; job output: $work)"; fi
  exit "$rc"
}
work="$(mktemp -d /tmp/leastwise-slurm-work.XXXXXX)"
trap finish EXIT
envs="$("$TOOLS/start.sh")"
eval "$envs"

cp samples/cluster/screen.lsq "$work/"
node samples/cluster/make-screen.mjs "$COMPOUNDS" >"$work/screen.csv"
export LEASTWISE="node $root/dist/cli.js"
mkdir -p "$work/whole" "$work/out"
t0=$(date +%s.%N)
code=0
node dist/cli.js fit "$work/screen.lsq" --json "$work/whole/result.json" --groups "$work/whole/groups.csv" --quiet || code=$?
[ "$code" != 2 ] || { say "unsharded fit failed"; exit 1; }
t1=$(date +%s.%N)

array="$(sbatch --parsable --array=0-$((TASKS - 1)) --output="$work/out/slurm-%A_%a.out" samples/cluster/fit-shard.sbatch "$work/screen.lsq" "$work/out")"
array="${array%%;*}"
gather="$(sbatch --parsable --dependency=afterany:"$array" --output="$work/out/gather-%j.out" samples/cluster/gather.sbatch "$work/screen.lsq" "$work/out")"
gather="${gather%%;*}"
say "submitted array $array ($TASKS tasks over $COMPOUNDS compounds) and gather job $gather"
"$TOOLS/wait-job.sh" "$array" 600
"$TOOLS/wait-job.sh" "$gather" 600
t2=$(date +%s.%N)
say "each task said:"; grep -h "fitting shard" "$work"/out/slurm-*.out | sed 's/^/  /'

node -e '
const fs = require("fs");
const untimed = (f) => fs.readFileSync(f, "utf8").replace(/"startedAt": "[^"]*"/g, "\"startedAt\": \"-\"").replace(/"elapsedMs": [0-9.e+-]+/g, "\"elapsedMs\": 0");
const [whole, gathered] = process.argv.slice(1);
const a = untimed(whole), b = untimed(gathered);
if (a !== b) { console.error("[slurm] gathered JSON differs from the unsharded JSON"); process.exit(1); }
const n = JSON.parse(a).fits.length;
if (n < 2000) { console.error(`[slurm] only ${n} groups`); process.exit(1); }
console.log(`[slurm] gathered JSON equals the unsharded JSON (${n} groups, timing aside)`);
' "$work/whole/result.json" "$work/out/result.json"
cmp "$work/whole/groups.csv" "$work/out/groups.csv"
say "group tables byte-equal; unsharded $(awk -v a="$t0" -v b="$t1" 'BEGIN{printf "%.1f", b-a}') s, array + gather on the cluster $(awk -v a="$t1" -v b="$t2" 'BEGIN{printf "%.1f", b-a}') s (submission and polling included)"
rm -rf "$work"
rc=0
