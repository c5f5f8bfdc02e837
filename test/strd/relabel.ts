/**
 * Equivalent parameter vectors of the NIST StRD models (relabellings): a fit
 * started without values may land on the certified minimum with its
 * interchangeable terms in another order or with a sign that the model
 * cannot see. Read from the model formulas in models.ts:
 *   Lanczos1-3  b1·e^(−b2·x) + b3·e^(−b4·x) + b5·e^(−b6·x): the three terms in any order;
 *   Gauss1-3    the two Gaussian terms (b3, b4, b5) and (b6, b7, b8) exchanged;
 *               b5 and b8 enter squared, so their signs are free;
 *   MGH17       b2·e^(−x·b4) and b3·e^(−x·b5) exchanged;
 *   ENSO        the cycles (b4, b5, b6) and (b7, b8, b9) exchanged; a period
 *               of −b4 with −b6 gives the same curve (cos even, sin odd), likewise b7 with b9;
 *   Eckerle4    (b1, b2) → (−b1, −b2) leaves b1/b2 and ((x − b3)/b2)² unchanged.
 * `relabellings(name)` lists every equivalent form (the identity first) as a
 * map from each parameter to the source parameter and sign; `bestRelabelling`
 * picks the one that scores highest (used by run-strd.ts for the solver-level
 * table and by no-start.ts for the fits without start values).
 */

export type Map = Record<string, { from: string; sign: 1 | -1 }>;

const identity = (names: readonly string[]): Map => Object.fromEntries(names.map((n) => [n, { from: n, sign: 1 as const }]));

/** Exchanges blocks of parameters (equal lengths). */
function blockSwap(names: readonly string[], a: readonly string[], b: readonly string[]): Map {
  const m = identity(names);
  a.forEach((n, k) => {
    m[n] = { from: b[k], sign: 1 };
    m[b[k]] = { from: n, sign: 1 };
  });
  return m;
}

function signFlip(names: readonly string[], flip: readonly string[]): Map {
  const m = identity(names);
  for (const n of flip) m[n] = { from: n, sign: -1 };
  return m;
}

/** Composition: (f ∘ g)(v) = f(g(v)). */
function compose(f: Map, g: Map): Map {
  const out: Map = {};
  for (const [n, { from, sign }] of Object.entries(f)) out[n] = { from: g[from].from, sign: (sign * g[from].sign) as 1 | -1 };
  return out;
}

/** Closure of a set of generators (small groups only). */
function group(names: readonly string[], generators: Map[]): Map[] {
  const key = (m: Map) => JSON.stringify(names.map((n) => [m[n].from, m[n].sign]));
  const all = new globalThis.Map<string, Map>([[key(identity(names)), identity(names)]]);
  let frontier = [...all.values()];
  while (frontier.length) {
    const next: Map[] = [];
    for (const m of frontier) {
      for (const g of generators) {
        const c = compose(g, m);
        if (!all.has(key(c))) {
          all.set(key(c), c);
          next.push(c);
        }
      }
    }
    frontier = next;
  }
  return [...all.values()];
}

const B = (n: number) => Array.from({ length: n }, (_, k) => `b${k + 1}`);

export function relabellings(dataset: string, names: readonly string[]): Map[] {
  const b = B(names.length);
  switch (dataset) {
    case 'Lanczos1':
    case 'Lanczos2':
    case 'Lanczos3':
      return group(b, [blockSwap(b, ['b1', 'b2'], ['b3', 'b4']), blockSwap(b, ['b3', 'b4'], ['b5', 'b6'])]);
    case 'Gauss1':
    case 'Gauss2':
    case 'Gauss3':
      return group(b, [blockSwap(b, ['b3', 'b4', 'b5'], ['b6', 'b7', 'b8']), signFlip(b, ['b5']), signFlip(b, ['b8'])]);
    case 'MGH17':
      return group(b, [blockSwap(b, ['b2', 'b4'], ['b3', 'b5'])]);
    case 'ENSO':
      return group(b, [blockSwap(b, ['b4', 'b5', 'b6'], ['b7', 'b8', 'b9']), signFlip(b, ['b4', 'b6']), signFlip(b, ['b7', 'b9'])]);
    case 'Eckerle4':
      return group(b, [signFlip(b, ['b1', 'b2'])]);
    default:
      return [identity(names)];
  }
}

/** The estimates relabelled by `m` (by parameter name). */
export function applyRelabelling(m: Map, values: Readonly<Record<string, number>>): Record<string, number> {
  return Object.fromEntries(Object.entries(m).map(([n, { from, sign }]) => [n, sign * values[from]]));
}

/** The relabelling of `values` (by parameter name) that `score` rates highest; index 0 is the identity. */
export function bestRelabelling(dataset: string, values: Readonly<Record<string, number>>, score: (relabelled: Record<string, number>) => number): { index: number; map: Map; score: number } {
  let best = { index: 0, map: identity(Object.keys(values)), score: -Infinity };
  relabellings(dataset, Object.keys(values)).forEach((m, index) => {
    const v = score(applyRelabelling(m, values));
    if (v > best.score) best = { index, map: m, score: v };
  });
  return best;
}
