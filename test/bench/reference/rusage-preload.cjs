// Loaded with `node --require` by the side-by-side benchmark cases: at exit,
// writes this process's peak resident set and CPU time (all threads) to the
// file named by LEASTWISE_BENCH_RUSAGE, in the same shape as the reference
// script writes its own (test/bench/reference/script_fit.py).
'use strict';
const fs = require('node:fs');
const out = process.env.LEASTWISE_BENCH_RUSAGE;
if (out) {
  process.on('exit', () => {
    const u = process.resourceUsage();
    fs.writeFileSync(out, JSON.stringify({ maxRssKb: u.maxRSS, userS: u.userCPUTime / 1e6, sysS: u.systemCPUTime / 1e6 }));
  });
}
