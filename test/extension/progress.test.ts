import { describe, expect, it } from 'vitest';
import { progressMessage } from '../../extension/logic/progress';

describe('extension/logic/progress', () => {
  it('shows units only when there are several', () => {
    expect(progressMessage({ done: 0, total: 1 })).toBe('');
    expect(progressMessage({ done: 3, total: 96 })).toBe('3 of 96');
  });

  it('shows the latest iteration of the fit being solved, with its group', () => {
    expect(progressMessage({ done: 0, total: 1, iteration: { fit: 'decay', iteration: 12345, cost: 0.001234567 } })).toBe('decay: iteration 12,345, objective 0.001235');
    expect(progressMessage({ done: 2, total: 8, iteration: { fit: 'kinetics', group: 'D07', iteration: 3, cost: 2 } })).toBe('2 of 8 · kinetics [D07]: iteration 3, objective 2');
  });
});
