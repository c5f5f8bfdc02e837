/**
 * Chart subtitles (and titles, below) wrapped at word boundaries to the chart's width. Vega does
 * not wrap title lines: a long subtitle line widens the whole chart (the SVG
 * export of a 560 px plot came out 890 px wide, blank on the right) or, with
 * a fixed width, is cut off. Widths are estimated per character of the 11 px
 * subtitle font: in a browser about 5.6 px on the default sans-serif fonts
 * (`SUBTITLE_CHAR_PX`, measured, rounded up); without a canvas (the CLI's
 * headless SVG) Vega estimates every character at 0.8 × the font size
 * (vega-scenegraph `estimateWidth`), 8.8 px (`HEADLESS_CHAR_PX`).
 */

/** Average width of a subtitle character at 11 px in a browser, in pixels (rounded up so lines stay inside). */
export const SUBTITLE_CHAR_PX = 6;
/** Vega's width estimate of an 11 px character without a canvas (0.8 × font size). */
export const HEADLESS_CHAR_PX = 8.8;

/** `lines` wrapped so no line is wider than `width` pixels at `charPx` per character (a single longer word stays whole). */
export function wrapSubtitle(lines: readonly string[], width: number, charPx = SUBTITLE_CHAR_PX): string[] {
  const budget = Math.max(30, Math.floor(width / charPx));
  const out: string[] = [];
  for (const s of lines) {
    let line = '';
    for (const word of s.split(' ')) {
      if (line && line.length + 1 + word.length > budget) {
        out.push(line);
        line = word;
      } else line = line ? `${line} ${word}` : word;
    }
    if (line) out.push(line);
  }
  return out;
}

/**
 * Chart titles: Vega does not wrap them either, so a long fit name widened the exported SVG past its plot. A title
 * is wrapped at word boundaries into at most `TITLE_LINES` lines of `width` pixels; a word longer than a line (a
 * long fit name) and text beyond the last line are cut with an ellipsis. The full title stays in the SVG's
 * `<title>` (`svgWithTitle`) and, in the panel, in the chart's tooltip.
 */
export const TITLE_LINES = 2;
/** Vega's width estimate of a 14 px title character without a canvas (0.8 × font size, vega-scenegraph `estimateWidth`). */
export const HEADLESS_TITLE_CHAR_PX = 11.2;
/** Average width of a 14 px semibold title character in a browser, in pixels (rounded up, as `SUBTITLE_CHAR_PX`). */
export const TITLE_CHAR_PX = 8;
const ELLIPSIS = '…';

/** `title` as at most `TITLE_LINES` lines no wider than `width` pixels at `charPx` per character; `shortened` when cut. */
export function wrapTitle(title: string, width: number, charPx = HEADLESS_TITLE_CHAR_PX): { lines: string[]; shortened: boolean } {
  const budget = Math.max(20, Math.floor(width / charPx));
  // a cut word keeps a closing colon (`a_very_long_na…:`), the title's break between name and description
  const cut = (w: string) => (w.length <= budget ? w : w.endsWith(':') ? w.slice(0, budget - 2) + ELLIPSIS + ':' : w.slice(0, budget - 1) + ELLIPSIS);
  let shortened = false;
  const lines: string[] = [];
  let line = '';
  for (const raw of title.split(' ')) {
    const word = cut(raw);
    if (word !== raw) shortened = true;
    if (line && line.length + 1 + word.length > budget) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  if (lines.length > TITLE_LINES) {
    shortened = true;
    const last = lines[TITLE_LINES - 1];
    lines.length = TITLE_LINES;
    lines[TITLE_LINES - 1] = (last.length + 1 > budget ? last.slice(0, budget - 1) : last) + ELLIPSIS;
  }
  return { lines: lines.length ? lines : [''], shortened };
}

/** An SVG document with `title` as its first child `<title>` (the accessible name and the viewer's tooltip). */
export function svgWithTitle(svg: string, title: string): string {
  const open = svg.search(/<svg[\s>]/);
  const end = open < 0 ? -1 : svg.indexOf('>', open);
  if (end < 0) return svg;
  const text = title.replace(/[&<>]/g, (c) => (c === '&' ? '&amp;' : c === '<' ? '&lt;' : '&gt;'));
  return `${svg.slice(0, end + 1)}<title>${text}</title>${svg.slice(end + 1)}`;
}
