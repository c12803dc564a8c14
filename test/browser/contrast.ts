/** WCAG 2.1 relative luminance and contrast ratio of sRGB colours given as #rrggbb or #rgb. */

export function hexToRgb(hex: string): [number, number, number] {
  const m = /^#([0-9a-f]{6}|[0-9a-f]{3})$/i.exec(hex.trim());
  if (!m) throw new Error(`not a #rrggbb or #rgb colour: ${hex}`);
  const digits = m[1].length === 3 ? [...m[1]].map((d) => d + d).join("") : m[1];
  const n = parseInt(digits, 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

/** WCAG 2.1, definition "relative luminance": linearised sRGB channels weighted 0.2126, 0.7152, 0.0722. */
export function relativeLuminance(hex: string): number {
  const lin = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  const [r, g, b] = hexToRgb(hex).map(lin);
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.1, definition "contrast ratio": (L1 + 0.05) / (L2 + 0.05), L1 the lighter. */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** Custom properties (`--name: #rrggbb` or `#rgb`) declared in the first rule block that follows `marker` in a stylesheet. */
export function customProperties(css: string, marker: string): Record<string, string> {
  const start = css.indexOf(marker);
  if (start < 0) throw new Error(`stylesheet has no ${marker}`);
  const open = css.indexOf(":root", start);
  const block = css.slice(css.indexOf("{", open) + 1, css.indexOf("}", open));
  const out: Record<string, string> = {};
  for (const m of block.matchAll(/--([a-z0-9-]+)\s*:\s*(#[0-9a-fA-F]{6}\b|#[0-9a-fA-F]{3}\b)/g)) out[m[1]] = m[2];
  return out;
}
