/**
 * Entry of the engine's worker thread (bundled to dist/worker.js). Serves the
 * jobs of engine/groups/protocol.ts:
 * - `fitGroups` (fitGroupsParallel): fits a chunk of groups in order and
 *   answers `groupsDone` with one FitResult per group;
 * - `bootstrap` (engine/groups/bootstrap-threads.ts): bootstrap refits of one fit,
 *   answered by `bootstrapDone`;
 * - `runPlan` (the editor extension): runs a whole plan, reading its data
 *   files, and answers `runPlanDone`.
 * Progress goes out as `progress` messages at most every PROGRESS_MS (and at
 * the end of a job); a runPlan job also reports the accepted iterations of
 * the fits it solves itself as `iteration` messages, the first at once and
 * then at most every ITERATION_MS (a long single fit shows it is moving). A
 * message posted from inside a solve leaves at once: a worker's postMessage
 * does not wait for its own event loop. A job that throws answers `error`; the worker stays up.
 */
import { parentPort } from 'node:worker_threads';
import { fitGroupList } from './groups/group-job';
import { cancelTokenOf, isWorkerRequest, type WorkerRequest, type WorkerResponse } from './groups/protocol';
import { runPlanJob } from './runner/plan-job';
import { packResults } from './groups/pack';
import { runText } from './messages';
import { runBootstrapRange } from './run/bootstrap';

/** Minimum interval between progress messages, in ms. */
const PROGRESS_MS = 50;
/** Minimum interval between iteration messages, in ms. */
const ITERATION_MS = 250;

function throttled(post: (done: number, total: number) => void): (done: number, total: number) => void {
  let last = 0;
  return (done, total) => {
    const now = Date.now();
    if (done >= total || now - last >= PROGRESS_MS) {
      last = now;
      post(done, total);
    }
  };
}

async function handle(req: WorkerRequest, send: (m: WorkerResponse) => void): Promise<void> {
  const progress = throttled((done, total) => send({ kind: 'progress', id: req.id, done, total }));
  const cancel = cancelTokenOf(req.cancelFlag);
  if (req.kind === 'fitGroups') {
    const total = req.groups.length;
    const results = fitGroupList(req.fit, req.groups, cancel, (done) => {
      if (done < total) progress(done, total);
    }, req.shared);
    send({ kind: 'groupsDone', id: req.id, ...packResults(results) });
    return;
  }
  if (req.kind === 'bootstrap') {
    send({ kind: 'bootstrapDone', id: req.id, chunk: runBootstrapRange(req.job, req.from, req.to, cancel) });
    return;
  }
  let lastIteration = -Infinity;
  const result = await runPlanJob(req.plan, req.options, cancel, progress, (it) => {
    const now = Date.now();
    if (now - lastIteration < ITERATION_MS) return;
    lastIteration = now;
    send({ kind: 'iteration', id: req.id, ...it });
  });
  send({ kind: 'runPlanDone', id: req.id, result });
}

const port = parentPort;
if (port) {
  const send = (m: WorkerResponse) => port.postMessage(m);
  port.on('message', (msg: unknown) => {
    if (!isWorkerRequest(msg)) {
      const id = typeof (msg as { id?: unknown })?.id === 'number' ? (msg as { id: number }).id : -1;
      send({ kind: 'error', id, message: runText.workerConfused });
      return;
    }
    handle(msg, send).catch((e: unknown) => {
      send({ kind: 'error', id: msg.id, message: e instanceof Error ? e.message : String(e) });
    });
  });
}
