/**
 * Chart subtitles wrapped at word boundaries to the chart's width. Vega does
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
