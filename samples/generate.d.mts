/** Types of samples/generate.mjs (the generator itself is plain JavaScript so it runs with `node` alone). */
/** Seed per scenario. */
export const SEEDS: Readonly<Record<string, number>>;
/** Every generated file (CSV per scenario and truth.json) by path relative to samples/. */
export function generate(seeds?: Readonly<Record<string, number>>): Record<string, string>;
