/**
 * Messages between the extension host and the results panel page: one
 * discriminated union per direction, with guards that check every field
 * (the page is treated as untrusted input by the host, and vice versa).
 * Browser-safe: no Node or vscode imports.
 */
import type { PanelChart, PanelModel } from './panel-model';
import type { ResidualKind, XScale } from './panel-chart-options';
import { MAX_IMAGE_CHARS } from './panel-copy';

export type ExportFormat = 'markdown' | 'json' | 'svg';
export const EXPORT_FORMATS: readonly ExportFormat[] = ['markdown', 'json', 'svg'];

/** Host → page. */
export type ToPage =
  /** Show a run (replaces what is shown); `focus` is a fit key (`name` or `name/group`). */
  | { type: 'show'; model: PanelModel; focus?: string }
  /** A fit is running. */
  | { type: 'busy'; specName: string; text: string }
  /** The run could not start or crashed; the last results stay visible. */
  | { type: 'failed'; specName: string; message: string }
  /** Charts of one fit, answering `requestCharts` (null: the run is no longer in memory). */
  | { type: 'charts'; key: string; charts: PanelChart[] | null };

/** Page → host. */
export type FromPage =
  | { type: 'ready' }
  /** Open the fit's data file at a 1-based file line. */
  | { type: 'openRow'; fit: string; group?: string; row: number }
  /** Reveal a fit (or one of its parameters) in the spec. */
  | { type: 'reveal'; fit: string; param?: string }
  | { type: 'refit' }
  /** Charts of a fit whose model entry has `charts: null`. */
  | { type: 'requestCharts'; key: string }
  | { type: 'export'; format: ExportFormat }
  /** Put a table (tab-separated text, extension/logic/panel-copy.ts) on the clipboard; `what` names it in the confirmation. */
  | { type: 'copy'; text: string; what: string }
  /** Save a drawn chart: `data` is the SVG document, or a PNG as a `data:image/png;base64,` URL; `name` the proposed file name. */
  | { type: 'saveChart'; format: 'png' | 'svg'; name: string; data: string }
  /** A page-side problem, for the output channel. */
  | { type: 'log'; level: 'info' | 'error'; message: string };

/** State the page keeps with `vscode.setState`, restored after a reload. */
export interface PageState {
  model?: PanelModel;
  /** Fit key shown. */
  selected?: string;
  /** Residual kind chosen per fit key (extension/logic/panel-chart-options.ts; absent: the fit's default). */
  residualKind?: Record<string, ResidualKind>;
  /** x axis chosen per fit key (absent: as the views chose it). */
  xScale?: Record<string, XScale>;
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

const isString = (x: unknown): x is string => typeof x === 'string';
const isOptString = (x: unknown): boolean => x === undefined || typeof x === 'string';

/** Shallow check of a panel model (the host builds it; the page only needs the shape). */
export function isPanelModel(x: unknown): x is PanelModel {
  // the version of extension/logic/panel-model.ts PANEL_MODEL_VERSION (a literal: the page bundle imports no engine code; test/extension/protocol.test.ts holds them equal)
  return isObject(x) && x.version === 3 && isString(x.specUri) && isString(x.specName) && Array.isArray(x.fits) && isObject(x.run);
}

export function isPanelChart(x: unknown): x is PanelChart {
  return isObject(x) && isString(x.id) && isString(x.title) && isObject(x.spec);
}

export function isToPage(x: unknown): x is ToPage {
  if (!isObject(x)) return false;
  switch (x.type) {
    case 'show':
      return isPanelModel(x.model) && isOptString(x.focus);
    case 'busy':
      return isString(x.specName) && isString(x.text);
    case 'failed':
      return isString(x.specName) && isString(x.message);
    case 'charts':
      return isString(x.key) && (x.charts === null || (Array.isArray(x.charts) && x.charts.every(isPanelChart)));
    default:
      return false;
  }
}

export function isFromPage(x: unknown): x is FromPage {
  if (!isObject(x)) return false;
  switch (x.type) {
    case 'ready':
    case 'refit':
      return true;
    case 'openRow':
      return isString(x.fit) && isOptString(x.group) && typeof x.row === 'number' && Number.isInteger(x.row) && x.row >= 1;
    case 'requestCharts':
      return isString(x.key);
    case 'reveal':
      return isString(x.fit) && isOptString(x.param);
    case 'export':
      return (EXPORT_FORMATS as readonly unknown[]).includes(x.format);
    case 'log':
      return (x.level === 'info' || x.level === 'error') && isString(x.message);
    case 'copy':
      return isString(x.text) && x.text.length <= MAX_IMAGE_CHARS && isString(x.what);
    case 'saveChart':
      return (x.format === 'png' || x.format === 'svg') && isString(x.name) && /^[A-Za-z0-9._-]{1,90}$/.test(x.name) && isString(x.data) && x.data.length <= MAX_IMAGE_CHARS
        && (x.format === 'svg' ? x.data.trimStart().startsWith('<svg') : x.data.startsWith('data:image/png;base64,'));
    default:
      return false;
  }
}

const RESIDUAL_KIND_NAMES: readonly string[] = ['raw', 'standardized', 'percent'];
const X_SCALE_NAMES: readonly string[] = ['linear', 'log'];

function isChoiceMap(x: unknown, names: readonly string[]): boolean {
  return x === undefined || (isObject(x) && Object.values(x).every((v) => typeof v === 'string' && names.includes(v)));
}

export function isPageState(x: unknown): x is PageState {
  return isObject(x) && (x.model === undefined || isPanelModel(x.model)) && isOptString(x.selected)
    && isChoiceMap(x.residualKind, RESIDUAL_KIND_NAMES) && isChoiceMap(x.xScale, X_SCALE_NAMES);
}
