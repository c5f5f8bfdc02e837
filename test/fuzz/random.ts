/**
 * A seeded source of random choices for the fuzz generators: every case is a
 * pure function of (kind, seed, case index), so a failing case can be
 * regenerated from its numbers alone. Uniforms come from the shared
 * mulberry32 generator (test/fixtures/random.ts).
 */
import { rng } from '../fixtures/random';

export class Rand {
  private readonly u: () => number;

  constructor(seed: number) {
    this.u = rng(seed);
  }

  /** The case's generator: seed and index mixed so neighbouring cases are unrelated. */
  static forCase(seed: number, index: number, salt = 0): Rand {
    return new Rand(Math.imul(seed ^ 0x9e3779b9, 0x85ebca6b) ^ Math.imul(index + 1, 0xc2b2ae35) ^ salt);
  }

  float(): number {
    return this.u();
  }

  /** An integer in [lo, hi]. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.u() * (hi - lo + 1));
  }

  /** An integer in [lo, hi] (lo ≥ 0), log-uniform in k + 1 (small sizes common, large ones rare). */
  logInt(lo: number, hi: number): number {
    const a = Math.log(lo + 1);
    const b = Math.log(hi + 2);
    return Math.min(hi, Math.max(lo, Math.floor(Math.exp(a + this.u() * (b - a)) - 1)));
  }

  chance(p: number): boolean {
    return this.u() < p;
  }

  pick<T>(xs: readonly T[]): T {
    return xs[Math.floor(this.u() * xs.length)];
  }

  /** One of `choices` with the given weights. */
  weighted<T>(choices: readonly (readonly [number, T])[]): T {
    const total = choices.reduce((s, [w]) => s + w, 0);
    let r = this.u() * total;
    for (const [w, v] of choices) {
      r -= w;
      if (r < 0) return v;
    }
    return choices[choices.length - 1][1];
  }

  /** A number as a spec or a CSV writes it: small and large magnitudes, signs, exponents. */
  number(): string {
    return this.weighted<() => string>([
      [5, () => String(this.int(0, 20))],
      [4, () => (this.u() * 10 - 2).toFixed(this.int(0, 4))],
      [1, () => `${this.int(1, 9)}e${this.int(-30, 30)}`],
      [1, () => this.pick(['0', '0.0', '1e-300', '1e300', '0.5', '.5', '2.', '1e400', '123456789012345678901234567890'])],
    ])();
  }

  /** Odd characters: emoji (surrogate pairs), a lone surrogate, combining marks, bidi, separators, zero-width, BOM, NBSP, fullwidth. */
  oddChar(): string {
    return this.pick(['😀', '\ud83d', '\ude00', 'e\u0301', '\u202e', '\u2066', '\u2028', '\u2029', '\u200b', '\u200d', '\ufeff', '\u00a0', 'ｘ', 'µ', '°', 'Ω', 'ß', 'İ', '\u0000', '\u001b', '\t', '\r', '\u0085', '\uffff']);
  }

  /** Random bytes decoded as UTF-8 (invalid sequences become U+FFFD) or as Latin-1. */
  bytes(n: number): string {
    const b = Buffer.alloc(n);
    for (let i = 0; i < n; i++) b[i] = this.int(0, 255);
    return this.chance(0.5) ? b.toString('utf8') : b.toString('latin1');
  }
}
