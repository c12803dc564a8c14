import { escapeHtml } from "../escape.ts";

const MINUS = "\u2212"; // a typeset minus sign, as in print, not a hyphen

/** A number as a person reads it: plain decimals in the middle range, a power of ten outside it. */
export function numberText(v: number, digits = 6): string {
  if (v === 0) return "0";
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e5) return String(Number(v.toPrecision(digits))).replace("-", MINUS);
  const [mantissa, exponent] = v.toExponential(digits - 1).split("e");
  const m = String(Number(mantissa)).replace("-", MINUS);
  const e = String(Number(exponent)).replace("-", MINUS);
  return m === "1" ? `10^${e}` : m === `${MINUS}1` ? `${MINUS}10^${e}` : `${m}×10^${e}`;
}

/** A tick label as SVG text content: the exponent of a power of ten raised as a superscript. */
export function tickLabelSvg(v: number): string {
  const text = numberText(v);
  const caret = text.indexOf("^");
  if (caret < 0) return escapeHtml(text);
  return `${escapeHtml(text.slice(0, caret))}<tspan dy="-0.5em" font-size="75%">${escapeHtml(text.slice(caret + 1))}</tspan>`;
}
