import { initials, splitName } from "./personName.ts";
import type { CitationSubject } from "./citationSubject.ts";

function shortName(name: string): string {
  const n = splitName(name);
  const family = [n.particle, n.family].filter(Boolean).join(" ");
  return n.given ? `${family}, ${initials(n.given)}` : family;
}

/** "Varga, I., Okafor, T. and Beltrão, A." */
function authorList(names: string[]): string {
  const parts = names.map(shortName);
  if (parts.length <= 1) return parts.join("");
  return `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
}

/**
 * One paragraph to paste into a reference list: authors, year, title,
 * audit id and version with its date, publisher, DOI (or address) and the
 * fingerprint that ties the citation to exactly one result.
 */
/**
 * A DOI as an address at the DOI resolver: characters that a URL cannot carry
 * as they are (`%`, `"`, `<`, `>`, `#`, `?`, non-ASCII, …) percent-encoded, as
 * the DOI Handbook (§2.5.2.4, "Encoding rules for URL presentation") asks.
 */
export function doiAddress(doi: string): string {
  return `https://doi.org/${encodeURI(doi).replace(/[#?]/g, (c) => encodeURIComponent(c))}`;
}

export function plainCitation(s: CitationSubject): string {
  const link = s.doi ? doiAddress(s.doi) : s.url;
  const title = /[.?!]$/.test(s.title) ? s.title : `${s.title}.`;
  return (
    `${authorList(s.authors.map((a) => a.name))} (${s.date.slice(0, 4)}). ${title} ` +
    `Transport audit ${s.auditId}, version ${s.version}, published ${s.date}. ${s.publisher}.` +
    `${link ? ` ${link}.` : ""} Fingerprint ${s.fingerprint}.\n`
  );
}
