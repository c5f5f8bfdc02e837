import { describe, expect, it } from 'vitest';
import { memoryIo } from '../../../engine/front/cli/io';
import { progressLine } from '../../../engine/front/cli/progress';
import { MSG } from '../../../engine/front/cli/messages';
import { iterationText } from '../../../engine/front/views/progress';

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

  it('makes a text given as a function only when the line is drawn', () => {
    let t = 0;
    let made = 0;
    const text = (s: string) => () => {
      made++;
      return s;
    };
    const io = { ...memoryIo('/', true), now: () => t };
    const p = progressLine(io, { delayMs: 700, intervalMs: 150 });
    p.update(text('early'));
    t = 800;
    p.update(text('one'));
    t = 850;
    p.update(text('too soon'));
    p.done();
    expect(io.err).toEqual(['\r\x1b[2Kone', '\r\x1b[2K']);
    expect(made).toBe(1);
    const quiet = progressLine(memoryIo('/', false), { delayMs: 0, intervalMs: 0 });
    quiet.update(text('never'));
    expect(made).toBe(1);
  });

  it('words: finished fits counted from 1, and the iteration of a long fit', () => {
    expect(MSG.progress('kinetics [A01]', 1, 96)).toBe('fitted kinetics [A01] (1 of 96)');
    expect(MSG.progress('kinetics [H12]', 96, 96)).toBe('fitted kinetics [H12] (96 of 96)');
    expect(MSG.iterating(iterationText({ fit: 'decay', iteration: 12345, cost: 0.001234567 }))).toBe('fitting decay: iteration 12,345, objective 0.001235');
    expect(iterationText({ fit: 'kinetics', group: 'D07', iteration: 3, cost: 2 })).toBe('kinetics [D07]: iteration 3, objective 2');
  });
});
