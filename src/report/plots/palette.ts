/**
 * Okabe & Ito's colour-blind-safe palette ("Color Universal Design", 2008),
 * ordered so that the first five keep at least 3:1 contrast against a white
 * page (WCAG 2.1 §1.4.11, graphical objects); the fifth is the text colour
 * (black on paper, light on a dark screen). Each series also gets its own
 * marker shape, dash pattern or hatching so that series stay apart in
 * grey-scale print, where blue and vermilion come out almost the same grey.
 * On screen the colours are CSS custom properties (`--plot-<i>`, set in
 * templates/assets/style.css) with these values as the fallback.
 */
export const PALETTE = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#000000", "#E69F00", "#56B4E9"];
/** As many shapes as colours, so no two of the first seven series share a marker. */
export const MARKERS = ["circle", "square", "triangle", "diamond", "cross", "triangle-down", "plus"] as const;
export const DASHES: Record<string, string> = { solid: "", dashed: "6 4", dotted: "2 3" };
/** Dash patterns given in turn to data lines that do not ask for a style. */
export const LINE_CYCLE = ["", "9 3", "2 3", "9 3 2 3"];
/** Hatching angles (degrees) given in turn to histogram series after the first; undefined = solid fill. */
export const HATCH_CYCLE = [undefined, 45, -45, 0] as const;

/** The colour of series i: a CSS variable for the screen, the palette value as fallback. */
export function seriesColour(i: number): { attr: string; style: string } {
  const k = i % PALETTE.length;
  return { attr: PALETTE[k], style: `color:var(--plot-${k},${PALETTE[k]})` };
}
