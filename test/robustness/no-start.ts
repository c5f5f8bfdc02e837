/**
 * No-start scenarios of the robustness suite: every family of scenarios.ts
 * with its start values removed (`param ec in [0, inf]` instead of
 * `param ec = 1 in [0, inf]`; bounds kept), as a user who gives none would
 * write it. The engine then computes the starts from the data and runs its
 * multi-start search (engine/solve/start). Same curves, same reference
 * minima (reference.json), same counting (suite.ts).
 */
import { FAMILIES, type Family } from './scenarios';

/** A `param` line without its `= value` part. */
export function stripStart(line: string): string {
  return line.replace(/^(\S+)\s*=\s*\S+/, '$1');
}

export function withoutStarts(family: Family): Family {
  return { ...family, paramLines: (c) => family.paramLines(c).map(stripStart) };
}

export const NO_START_FAMILIES: Family[] = FAMILIES.map(withoutStarts);
