import { describe, expect, it } from 'vitest';
import { memoryIo } from '../../engine/cli/io';
import { progressLine } from '../../engine/cli/progress';

describe('cli/progress', () => {
  it('stays silent when stderr is not a terminal', () => {
    const io = memoryIo('/', false);
    const p = progressLine(io, { delayMs: 0, intervalMs: 0 });
    p.update('fitted a (1 of 2)');
    p.done();
    expect(io.err).toEqual([]);
  });

  it('waits for the quiet period, throttles, and clears the line at the end', () => {
    let t = 0;
    const io = { ...memoryIo('/', true), now: () => t };
    const p = progressLine(io, { delayMs: 700, intervalMs: 150 });
    p.update('early'); // t = 0: within the quiet period
    t = 800;
    p.update('one');
    t = 850;
    p.update('too soon');
    t = 1000;
    p.update('two');
    p.done();
    expect(io.err).toEqual(['\r\x1b[2Kone', '\r\x1b[2Ktwo', '\r\x1b[2K']);
  });
});
