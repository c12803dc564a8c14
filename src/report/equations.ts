import katex from "katex";

/**
 * Typeset our own TeX at build time. `throwOnError: true`: a broken equation
 * in a check module stops the build instead of showing red text in a report.
 * `trust: false` forbids \href, \url and friends.
 */
export function renderEquation(tex: string, displayMode = true): string {
  return katex.renderToString(tex, { displayMode, throwOnError: true, trust: false, output: "htmlAndMathml", strict: "ignore" });
}

/** TeX derived from user text: never throws, never trusts. */
export function renderUserTex(tex: string, displayMode = false): string {
  return katex.renderToString(tex, { displayMode, throwOnError: false, trust: false, output: "htmlAndMathml", strict: "ignore" });
}
