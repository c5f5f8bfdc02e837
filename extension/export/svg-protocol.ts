/** Messages to and from the SVG export worker (svg-worker.ts). */

export interface SvgRequest {
  id: number;
  /** `title`: the chart's full title, kept as the SVG's <title> (optional). */
  charts: { file: string; spec: Record<string, unknown>; title?: string }[];
}

export interface SvgResponse {
  id: number;
  files: { file: string; svg?: string; error?: string }[];
}

export function isSvgRequest(x: unknown): x is SvgRequest {
  if (typeof x !== 'object' || x === null) return false;
  const r = x as Record<string, unknown>;
  return typeof r.id === 'number' && Array.isArray(r.charts) && r.charts.every((c) => typeof c === 'object' && c !== null && typeof (c as Record<string, unknown>).file === 'string' && typeof (c as Record<string, unknown>).spec === 'object');
}

export function isSvgResponse(x: unknown): x is SvgResponse {
  if (typeof x !== 'object' || x === null) return false;
  const r = x as Record<string, unknown>;
  return typeof r.id === 'number' && Array.isArray(r.files);
}
