import { describe, it, expect } from 'vitest';
import { PivotedQR } from '../../engine/linalg/qr';
import { StreamedQR, BLOCK_ROWS } from '../../engine/linalg/streamed-qr';
import { randomMatrix } from './random';
import { rng } from '../fixtures/random';

/** R₂ of a factorisation as a dense p×p column-major matrix. */
function denseR(qr: PivotedQR, p: number): Float64Array {
  const out = new Float64Array(p * p);
  for (let j = 0; j < p; j++) for (let i = 0; i <= j; i++) out[i + j * p] = qr.r(i, j);
  return out;
}

/** The pivoted QR of the whole matrix (the reference) and the streamed one, on the same J and r. */
function both(m: number, p: number, jac: Float64Array, r: Float64Array): { ref: PivotedQR; qtrRef: Float64Array; s: StreamedQR } {
  const ref = new PivotedQR(m, p).factor(jac, m, p, { pivot: true });
  const b = Float64Array.from(r);
  ref.applyQt(b);
  const s = new StreamedQR(p).factor(jac, r, m);
  return { ref, qtrRef: b.slice(0, p), s };
}

describe('engine/linalg/streamed-qr StreamedQR (R and Qᵀr in one pass over the rows)', () => {
  const next = rng(7);

  it('gives the pivoted factor of J itself up to the signs of its rows (several blocks, a partial last block)', () => {
    for (const [m, p] of [[5, 3], [BLOCK_ROWS, 4], [3 * BLOCK_ROWS + 17, 4], [2000, 7]]) {
      const jac = randomMatrix(m, p, next);
      // columns of very different size: the power-of-two scaling must keep them exact
      for (let i = 0; i < m; i++) {
        jac[i] *= 1e150;
        jac[i + m] *= 1e-150;
      }
      const r = randomMatrix(m, 1, next);
      const { ref, qtrRef, s } = both(m, p, jac, r);
      expect(Array.from(s.small.perm)).toEqual(Array.from(ref.perm));
      expect(Array.from(s.norms)).toEqual(Array.from(ref.norms));
      const a = denseR(ref, p);
      const b = denseR(s.small, p);
      for (let i = 0; i < p; i++) {
        const sign = Math.sign(a[i + i * p]) * Math.sign(b[i + i * p]);
        for (let j = i; j < p; j++) {
          const scale = Math.abs(a[j + j * p]) + Math.abs(a[i + j * p]);
          expect(Math.abs(sign * b[i + j * p] - a[i + j * p])).toBeLessThanOrEqual(1e-13 * scale * Math.sqrt(m));
        }
        expect(Math.abs(sign * s.qtr[i] - qtrRef[i])).toBeLessThanOrEqual(1e-13 * Math.sqrt(m) * (Math.abs(qtrRef[i]) + 1));
      }
      expect(s.small.rank).toBe(ref.rank);
    }
  });

  it('ρ is the least-squares residual norm ‖r − J·x‖, and an exact fit gives ρ ≈ 0', () => {
    const m = 1000;
    const p = 3;
    const jac = randomMatrix(m, p, next);
    const x = [0.5, -2, 3];
    const r = new Float64Array(m);
    for (let i = 0; i < m; i++) for (let j = 0; j < p; j++) r[i] += jac[i + j * m] * x[j];
    expect(new StreamedQR(p).factor(jac, r, m).unexplained).toBeLessThan(1e-12);
    const noise = randomMatrix(m, 1, next);
    const ref = new PivotedQR(m, p).factor(jac, m, p);
    const b = Float64Array.from(noise);
    ref.applyQt(b);
    let tail = 0;
    for (let i = p; i < m; i++) tail += b[i] * b[i];
    expect(new StreamedQR(p).factor(jac, noise, m).unexplained).toBeCloseTo(Math.sqrt(tail), 12);
  });

  it('finds the rank of a matrix with a repeated column and one of zeros, as the pivoted QR of J does', () => {
    const m = 600;
    const p = 4;
    const jac = randomMatrix(m, p, next);
    for (let i = 0; i < m; i++) {
      jac[i + 2 * m] = jac[i]; // column 2 = column 0
      jac[i + 3 * m] = 0;
    }
    const r = randomMatrix(m, 1, next);
    const { ref, s } = both(m, p, jac, r);
    expect(ref.rank).toBe(2);
    expect(s.small.rank).toBe(2);
    expect(s.norms[3]).toBe(0);
  });
});
