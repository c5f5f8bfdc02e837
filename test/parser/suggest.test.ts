import { describe, expect, it } from 'vitest';
import { editDistance, suggest } from '../../parser/suggest';

describe('parser/suggest', () => {
  it('computes edit distance with adjacent transpositions (from memory: kitten/sitting = 3)', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('tau', 'tua')).toBe(1);
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('Rate', 'rate')).toBe(0);
  });

  it('suggests close names, nearest first, and nothing for far ones', () => {
    expect(suggest('linar', ['auto', 'linear', 'levenberg_marquardt'])).toEqual(['linear']);
    expect(suggest('tmp', ['temp', 'time', 'tmp2'])).toEqual(['temp', 'tmp2']);
    expect(suggest('zzz', ['temp', 'time'])).toEqual([]);
    expect(suggest('x', ['x', 'y'])).toEqual(['y']);
  });
});
