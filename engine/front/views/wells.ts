/**
 * Whether the group labels of a fit are the wells of microplates, and where
 * each group sits on its plate (for the plate map, plate-charts.ts).
 *
 * A label is a well name when it is, in full:
 *   [plate prefix and separator] row letter, column number
 * - row letter: one of A–P (upper or lower case, shown upper case);
 * - column number: 1–24, written with or without one leading zero
 *   (`A1`, `A01`; not `A001`, `A0`, `A25`);
 * - plate prefix (optional): any text followed by one of `-`, `_`, `:`, `.`,
 *   `/` or a space, e.g. `P1-A01`, `plate2_B07`, `run 3 C11`. The prefix
 *   (without its separator) names the plate; labels without a prefix are on
 *   one unnamed plate.
 *
 * The labels of a fit are taken as plates only when all of these hold
 * (otherwise there is no plate map, and `notPlates` says why):
 * 1. every label is a well name (one that is not, such as `H2O`, `Q1`,
 *    `A25` or `control`, rules the map out: a map with wells missing for
 *    another reason would mislead);
 * 2. either every label has a plate prefix or none has;
 * 3. no two labels name the same well of the same plate (`A1` and `A01`);
 * 4. the wells span at least two rows and two columns: a run of labels such
 *    as `C1`…`C8` (concentration steps) or `B1`, `B2` (batches) merely looks
 *    like wells;
 * 5. the format is the smallest that holds every well: 96 (rows A–H,
 *    columns 1–12) or else 384 (rows A–P, columns 1–24), the same for every
 *    plate of the fit.
 */

export type PlateFormat = 96 | 384;

export interface PlateShape {
  format: PlateFormat;
  rows: number;
  columns: number;
}

export const PLATE_SHAPES: Readonly<Record<PlateFormat, PlateShape>> = Object.freeze({
  96: { format: 96, rows: 8, columns: 12 },
  384: { format: 384, rows: 16, columns: 24 },
});

/** A well name read from a label. */
export interface WellName {
  /** Plate name (the prefix without its separator), or null when the label has none. */
  plate: string | null;
  /** Row index from 0 (A = 0). */
  row: number;
  /** Column number from 1. */
  column: number;
}

/** Minimum rows and columns the wells must span (rule 4). */
export const MIN_SPAN = 2;

const WELL = /^(?:(.*\S)[-_:./ ])?([A-Pa-p])(0?[1-9]|1[0-9]|2[0-4])$/;

/** The well a label names, or null when it is not a well name (see the module comment). */
export function parseWell(label: string): WellName | null {
  const m = WELL.exec(label);
  if (!m) return null;
  return { plate: m[1] ?? null, row: m[2].toUpperCase().charCodeAt(0) - 65, column: Number(m[3]) };
}

/** The usual name of a well: row letter and two-digit column, `B07`. */
export function wellName(row: number, column: number): string {
  return `${String.fromCharCode(65 + row)}${String(column).padStart(2, '0')}`;
}

export interface PlacedGroup {
  /** The group label as written. */
  group: string;
  /** Plate name; '' for the unnamed plate. */
  plate: string;
  row: number;
  column: number;
}

export interface PlateLayout {
  shape: PlateShape;
  /** Plate names in order of first appearance ('' for labels without a prefix). */
  plates: string[];
  groups: PlacedGroup[];
}

export type PlateDetection = { layout: PlateLayout; notPlates?: undefined } | { layout: null; notPlates: string };

/** The plate layout of a fit's group labels, or why they are not taken as wells (rules in the module comment). */
export function detectPlates(labels: readonly string[]): PlateDetection {
  if (labels.length === 0) return { layout: null, notPlates: 'no groups' };
  const groups: PlacedGroup[] = [];
  let prefixed = 0;
  for (const group of labels) {
    const w = parseWell(group);
    if (!w) return { layout: null, notPlates: `group ${group} is not a well name` };
    if (w.plate !== null) prefixed++;
    groups.push({ group, plate: w.plate ?? '', row: w.row, column: w.column });
  }
  if (prefixed > 0 && prefixed < labels.length) return { layout: null, notPlates: 'some group labels have a plate prefix and others do not' };
  const seen = new Map<string, string>();
  for (const g of groups) {
    const key = `${g.plate}\u0000${g.row}\u0000${g.column}`;
    const other = seen.get(key);
    if (other !== undefined) return { layout: null, notPlates: `groups ${other} and ${g.group} name the same well` };
    seen.set(key, g.group);
  }
  const rows = new Set(groups.map((g) => g.row));
  const columns = new Set(groups.map((g) => g.column));
  if (rows.size < MIN_SPAN || columns.size < MIN_SPAN) return { layout: null, notPlates: 'the labels span a single row or a single column, so they are not taken as wells' };
  const fits96 = groups.every((g) => g.row < PLATE_SHAPES[96].rows && g.column <= PLATE_SHAPES[96].columns);
  const plates = [...new Set(groups.map((g) => g.plate))];
  return { layout: { shape: PLATE_SHAPES[fits96 ? 96 : 384], plates, groups } };
}
