import { stringify } from "yaml";
import { splitName } from "./personName.ts";
import type { CitationSubject } from "./citationSubject.ts";

/**
 * CITATION.cff for one published version, following the Citation File Format
 * 1.2.0 (Druskat et al., 2021, https://citation-file-format.github.io/):
 * the required keys cff-version, message, title and authors, then type
 * `dataset`, version, date-released, doi, url, repository, license and identifiers.
 */
export function citationCff(s: CitationSubject): string {
  const authors = s.authors.map((a) => {
    const n = splitName(a.name);
    return {
      ...(n.given ? { "given-names": n.given } : {}),
      ...(n.particle ? { "name-particle": n.particle } : {}),
      "family-names": n.family,
      ...(a.affiliation ? { affiliation: a.affiliation } : {}),
      ...(a.orcid ? { orcid: `https://orcid.org/${a.orcid}` } : {}),
    };
  });
  const identifiers = [
    ...(s.doi ? [{ type: "doi", value: s.doi, description: `DOI of version ${s.version}` }] : []),
    ...(s.url ? [{ type: "url", value: s.url, description: `Report page of version ${s.version}` }] : []),
    { type: "other", value: s.fingerprint, description: `Fingerprint of the audit definition, input digests and tool version; check it with: transport-audit verify audits/${s.auditId} --version ${s.version}` },
  ];
  const doc = {
    "cff-version": "1.2.0",
    message: `If you use this audit report, please cite version ${s.version} as below. It was published by ${s.publisher} in ${s.archiveName}.`,
    type: "dataset",
    title: `${s.title} (transport audit ${s.auditId}, version ${s.version})`,
    authors,
    version: String(s.version),
    "date-released": s.date,
    ...(s.doi ? { doi: s.doi } : {}),
    ...(s.url ? { url: s.url } : {}),
    ...(s.repository ? { repository: s.repository } : {}),
    license: s.license,
    identifiers,
    keywords: ["transport audit", "Onsager reciprocity", "fluctuation relations", ...(s.device ? [s.device] : [])],
  };
  // Every text value double-quoted: a YAML 1.1 reader (PyYAML, used by CFF tools) would otherwise read a
  // plain `no`, `on` or `1e3` as a boolean or number; the yaml package escapes what the quotes need.
  const body = stringify(doc, { lineWidth: 0, defaultStringType: "QUOTE_DOUBLE", defaultKeyType: "PLAIN" });
  return `# Citation File Format 1.2.0; written by ${s.tool.name} ${s.tool.version}\n${body}`;
}
