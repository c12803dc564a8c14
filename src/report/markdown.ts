import MarkdownIt from "markdown-it";

// html: false — raw HTML in a user's description is shown as text, never injected.
const md = new MarkdownIt({ html: false, linkify: true, typographer: false });

/**
 * Link and image targets a report may carry: web addresses (http, https) and
 * relative ones (a path, a query or a fragment, with no scheme). Everything
 * else — javascript:, data:, vbscript:, file:, mailto: and schemes not yet
 * invented — is refused, and markdown-it then shows the Markdown as text.
 * A scheme is what RFC 3986 §3.1 calls one: a letter, then letters, digits,
 * "+", "-" or ".", then ":". Browsers ignore tabs and line breaks inside a
 * scheme (WHATWG URL Standard, "basic URL parser"), so they are removed first,
 * after percent-decoding.
 */
export function isAllowedLinkTarget(url: string): boolean {
  // markdown-it hands over the percent-encoded form (a tab arrives as %09): judge the decoded text.
  let decoded = url;
  try {
    decoded = decodeURIComponent(url);
  } catch {
    // A malformed escape stays as written; the scheme test below still applies.
  }
  const target = decoded.replace(/[\u0000-\u0020\u007f]/g, "");
  const scheme = /^([A-Za-z][A-Za-z0-9+.-]*):/.exec(target);
  if (!scheme) return !target.startsWith("//") && !target.startsWith("\\\\") && !target.startsWith("/\\") && !target.startsWith("\\/");
  return /^https?$/i.test(scheme[1]);
}

md.validateLink = isAllowedLinkTarget;

/** Render a user's Markdown description safely. */
export function renderMarkdown(text: string | undefined): string {
  return text ? md.render(text) : "";
}
