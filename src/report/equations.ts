import katex from "katex";

/**
 * Typeset our own TeX at build time. `throwOnError: true`: a broken equation
 * in a check module stops the build instead of showing red text in a report.
 * `trust: false` forbids \href, \url and friends.
 */
export function renderEquation(tex: string, displayMode = true): string {
  const key = `${displayMode ? "D" : "T"}${tex}`;
  const known = typeset.get(key);
  if (known !== undefined) return known;
  const html = katex.renderToString(tex, { displayMode, throwOnError: true, trust: false, output: "htmlAndMathml", strict: "ignore" });
  if (typeset.size >= TYPESET_LIMIT) typeset.clear();
  typeset.set(key, html);
  return html;
}

/**
 * Typeset equations by TeX and mode. The checks state the same few laws on
 * every page of an archive, and KaTeX's output depends only on the TeX and
 * the options, so each is typeset once per process. Bounded, in case
 * equations ever carry numbers of the data.
 */
const typeset = new Map<string, string>();
const TYPESET_LIMIT = 5000;

/** TeX derived from user text: never throws, never trusts. */
export function renderUserTex(tex: string, displayMode = false): string {
  return katex.renderToString(tex, { displayMode, throwOnError: false, trust: false, output: "htmlAndMathml", strict: "ignore" });
}
