/**
 * test/fuzz/thread-cpu: the CPU time the fuzz campaign judges a case by.
 * A worker thread that computes gains CPU time; one that waits (here on a
 * message that does not come, as a case blocked on a read would) is not
 * running and gains none, so the campaign can tell slow from blocked.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { Worker } from 'node:worker_threads';
import { threadCpu, threadFolder } from './thread-cpu';

const onLinux = threadFolder() !== null;

/** Busy for `units` of work on each 'spin' message; sends its /proc folder first and the sum after each spin. */
const WORKER = `
const { parentPort } = require('node:worker_threads');
const { realpathSync } = require('node:fs');
parentPort.postMessage(realpathSync('/proc/thread-self'));
parentPort.on('message', (units) => {
  let s = 0;
  for (let i = 0; i < units * 1e6; i++) s += Math.sqrt(i);
  parentPort.postMessage(s);
});
`;

let worker: Worker | undefined;
afterEach(async () => {
  await worker?.terminate();
});

const next = (w: Worker): Promise<unknown> => new Promise((r) => w.once('message', r));
const pause = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

describe('test/fuzz/thread-cpu', () => {
  it.runIf(onLinux)('counts the CPU time of the one thread that works, not of the process', async () => {
    worker = new Worker(WORKER, { eval: true });
    const folder = (await next(worker)) as string;
    expect(folder).toMatch(/^\/proc\/\d+\/task\/\d+$/);
    expect(folder).not.toBe(threadFolder()); // another thread than this one
    const before = threadCpu(folder)!;
    worker.postMessage(60); // 6·10⁷ square roots: tens of ms at least, above the 10 ms resolution on any machine
    await next(worker);
    const after = threadCpu(folder)!;
    expect(after.ms).toBeGreaterThan(before.ms);
  });

  it.runIf(onLinux)('a waiting thread is not running and gains no CPU time', async () => {
    worker = new Worker(WORKER, { eval: true });
    const folder = (await next(worker)) as string;
    await pause(200); // let its start-up settle
    const a = threadCpu(folder)!;
    await pause(300);
    const b = threadCpu(folder)!;
    expect(b.running).toBe(false);
    expect(b.ms).toBe(a.ms);
  });

  it('gives null for a thread that is gone, and the folder is null or under /proc', () => {
    expect(threadCpu('/proc/0/task/0')).toBeNull();
    const own = threadFolder();
    if (own !== null) expect(threadCpu(own)).toMatchObject({ running: true });
  });
});
