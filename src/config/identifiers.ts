import { z } from "zod";

/**
 * DOI syntax of the DOI Handbook (International DOI Foundation, DOI Handbook,
 * §2.2 "Syntax", and ISO 26324:2022): `10.<registrant>/<suffix>`, where the
 * registrant code is digits with optional dot-separated subdivisions
 * (10.1000.10) and the suffix is any printable characters.
 *
 * Refused in the suffix, beyond what the Handbook forbids (white space,
 * control and other non-printing characters, e.g. U+202E that reverses text):
 * `{` `}` `\` and `"`. They occur in no registered DOI we know of (Crossref
 * advises suffixes of letters, digits and `-._;()/:`), and each has a meaning
 * in the formats a DOI is copied into: braces and backslash in BibTeX and
 * LaTeX, the double quote in BibTeX and HTML attributes. Accepting them would
 * let a DOI close a field and open another (`10.1234/x},title={…`).
 */
const DOI_SYNTAX = /^10\.\d+(?:\.\d+)*\/[^\s\p{C}\p{Z}{}\\"]+$/u;

const DOI_EXPECTED =
  "must be a DOI written 10.<registrant>/<suffix>, such as 10.5281/zenodo.1234567 (registrant: digits and dots; suffix: printable characters other than white space, braces, backslash and double quote)";

/** Why a DOI is refused, or null when it is well formed. */
export function doiProblem(doi: string): string | null {
  if (DOI_SYNTAX.test(doi)) return null;
  const prefixed = /^(?:https?:\/\/(?:dx\.)?doi\.org\/|doi:\s*)(10\..*)$/i.exec(doi);
  if (prefixed && DOI_SYNTAX.test(prefixed[1])) return `must be the DOI alone, without its resolver or "doi:" prefix: write ${prefixed[1]}`;
  return DOI_EXPECTED;
}

export const doiSchema = z.string({ invalid_type_error: DOI_EXPECTED }).superRefine((doi, ctx) => {
  const problem = doiProblem(doi);
  if (problem) ctx.addIssue({ code: "custom", message: problem });
});

/** White space or a control/format character: never part of an address as written (RFC 3986 §2). */
const NOT_IN_ADDRESS = /[\s\p{C}]/u;

/** Why a web address is refused, or null when it is an absolute http(s) URL. */
export function webAddressProblem(text: string, example: string): string | null {
  const bad = NOT_IN_ADDRESS.exec(text);
  if (bad) {
    const code = bad[0].codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0");
    return `must be a web address without white space or control characters (U+${code} at character ${bad.index + 1}), such as ${example}`;
  }
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    return `must be an absolute web address (WHATWG URL Standard), such as ${example}`;
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") return `must start with https:// or http://, such as ${example}`;
  return null;
}

/**
 * An absolute http(s) address, written back in the URL Standard's serialised
 * form (characters such as `{`, `}`, `"` and `<` percent-encoded), so that
 * it can be copied into any export as it is.
 */
export const webAddress = (example: string) =>
  z
    .string({ invalid_type_error: `must be a web address such as ${example}` })
    .superRefine((text, ctx) => {
      const problem = webAddressProblem(text, example);
      if (problem) ctx.addIssue({ code: "custom", message: problem });
    })
    .transform((text) => new URL(text).href);
