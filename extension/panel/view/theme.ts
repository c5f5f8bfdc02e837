/**
 * Theme colours for the charts. The chart specs arrive coloured with the
 * default palette (engine/front/views/palette.ts); each role has a CSS variable
 * `--lw-<role>` (page.css defines them per theme from VS Code's
 * `--vscode-*` variables and our own palette), and `themed` swaps every
 * default colour in a spec for the current theme's colour of the same role.
 * Called again when VS Code changes the theme (body class changes).
 */
import { cssVariable, FONT, PALETTE, PALETTE_ROLES, type Palette, type PaletteRole } from '../../../engine/front/views/palette';

export type ThemeKind = 'light' | 'dark' | 'high-contrast' | 'high-contrast-light';

export function themeKind(body: HTMLElement = document.body): ThemeKind {
  const c = body.classList;
  if (c.contains('vscode-high-contrast-light')) return 'high-contrast-light';
  if (c.contains('vscode-high-contrast')) return 'high-contrast';
  if (c.contains('vscode-dark')) return 'dark';
  return 'light';
}

/** A CSS colour resolved to `rgb(...)`/`rgba(...)` by the browser, or null if empty/invalid. */
function resolveColour(probe: HTMLElement, value: string): string | null {
  if (!value) return null;
  probe.style.color = '';
  probe.style.color = value;
  if (!probe.style.color) return null;
  return getComputedStyle(probe).color || null;
}

/** The current theme's palette: each role from its `--lw-*` variable, default colour when unset. */
export function themePalette(): Palette {
  const styles = getComputedStyle(document.body);
  const probe = document.createElement('span');
  probe.style.display = 'none';
  document.body.append(probe);
  const out = { ...PALETTE } as Palette;
  for (const role of PALETTE_ROLES) {
    const raw = styles.getPropertyValue(cssVariable(role)).trim();
    const c = resolveColour(probe, raw);
    if (c) out[role] = c;
  }
  probe.remove();
  return out;
}

/** The editor's font family, for chart text. */
export function themeFont(): string {
  return getComputedStyle(document.body).getPropertyValue('--vscode-font-family').trim() || FONT;
}

/**
 * Deep copy of `spec` with every default-palette colour replaced by the same
 * role's colour in `palette`, and the chart font set to `font`.
 */
export function themed<T>(spec: T, palette: Palette, font: string): T {
  const swap = new Map<string, string>();
  for (const role of PALETTE_ROLES as PaletteRole[]) swap.set(PALETTE[role].toLowerCase(), palette[role]);
  const walk = (v: unknown, key?: string): unknown => {
    if (typeof v === 'string') {
      if (key === 'font' && v === FONT) return font;
      return swap.get(v.toLowerCase()) ?? v;
    }
    if (Array.isArray(v)) return v.map((x) => walk(x));
    if (v && typeof v === 'object') {
      const o: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v)) o[k] = k === 'values' && key === 'data' ? x : walk(x, k);
      return o;
    }
    return v;
  };
  return walk(spec) as T;
}
