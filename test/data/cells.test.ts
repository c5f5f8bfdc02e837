import { describe, expect, it } from 'vitest';
import { isMissingCell, parseNumberCell } from '../../engine/data/cells';
import { detectDelimiter } from '../../engine/data/delimiter';

describe('data/cells parseNumberCell', () => {
  it('reads decimal and exponent forms', () => {
    expect(parseNumberCell('1', '.')).toBe(1);
    expect(parseNumberCell(' -1.5e-3 ', '.')).toBe(-0.0015);
    expect(parseNumberCell('.5', '.')).toBe(0.5);
    expect(parseNumberCell('5.', '.')).toBe(5);
    expect(parseNumberCell('+2E+2', '.')).toBe(200);
  });
  it('rejects units, thousands separators, infinities and overflow', () => {
    for (const s of ['12 kg', '1,234.5', 'inf', 'Infinity', '0x10', '1e999', '--1', '']) {
      expect(parseNumberCell(s, '.')).toBeNaN();
    }
  });
  it('reads a decimal comma only when asked', () => {
    expect(parseNumberCell('3,25', ',')).toBe(3.25);
    expect(parseNumberCell('3,25', '.')).toBeNaN();
    expect(parseNumberCell('3.25', ',')).toBeNaN();
  });
  it('knows the missing markers', () => {
    for (const s of ['', ' ', 'NA', 'na', 'N/A', 'NaN', 'nan']) expect(isMissingCell(s)).toBe(true);
    for (const s of ['0', 'none', 'x']) expect(isMissingCell(s)).toBe(false);
  });
});

describe('data/delimiter detectDelimiter', () => {
  it('picks the most frequent candidate in the header line', () => {
    expect(detectDelimiter('a,b,c\n1;2')).toBe(',');
    expect(detectDelimiter('a;b;c\n1,2;3')).toBe(';');
    expect(detectDelimiter('a\tb\n')).toBe('\t');
  });
  it('ignores candidates inside quotes', () => {
    expect(detectDelimiter('"a,b,c";d\n')).toBe(';');
  });
  it('prefers semicolon with a decimal comma and defaults single columns', () => {
    expect(detectDelimiter('x\n1,5\n', ',')).toBe(';');
    expect(detectDelimiter('x\n1\n')).toBe(',');
  });
});
