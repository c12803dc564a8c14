import type { ArchiveDefinition } from "../../config/archiveSchema.ts";
import type { Author } from "../../config/types.ts";
import type { ResultDocument, Stamp } from "../resultDocument.ts";

/** Everything a citation of one published version says, gathered once for every format. */
export interface CitationSubject {
  auditId: string;
  title: string;
  authors: Author[];
  version: number;
  /** Publication date of the version, YYYY-MM-DD. */
  date: string;
  doi?: string;
  /** Absolute address of the version's page, when the archive declares a base URL. */
  url?: string;
  license: string;
  publisher: string;
  archiveName: string;
  /** Where the archive (definitions, data, versions) can be cloned, if declared. */
  repository?: string;
  fingerprint: string;
  stamp: Stamp;
  tool: { name: string; version: string };
  device?: string;
}

/** The stable address of a version's page: `<base_url><audit-id>/v<N>/`. */
export function versionUrl(baseUrl: string | undefined, auditId: string, version: number): string | undefined {
  if (!baseUrl) return undefined;
  const base = baseUrl.endsWith("/") ? baseUrl : `${baseUrl}/`;
  return `${base}${auditId}/v${version}/`;
}

/**
 * A citation is one line per field: line breaks, tabs, runs of spaces and
 * control or format characters (which no reference list can show, and which
 * could end a line of a BibTeX or YAML file early) become single spaces.
 */
export function oneLine(text: string): string {
  return text.replace(/[\s\p{C}]+/gu, " ").trim();
}

export function citationSubject(result: ResultDocument, version: { number: number; date: string }, archive: ArchiveDefinition): CitationSubject {
  const url = versionUrl(archive.base_url, result.audit, version.number);
  const license = result.license ?? archive.license;
  return {
    auditId: result.audit,
    title: oneLine(result.title),
    authors: result.authors.map((a) => ({
      name: oneLine(a.name),
      ...(a.orcid ? { orcid: a.orcid } : {}),
      ...(a.affiliation ? { affiliation: oneLine(a.affiliation) } : {}),
    })),
    version: version.number,
    date: version.date,
    ...(result.doi ? { doi: result.doi } : {}),
    ...(url ? { url } : {}),
    license: oneLine(license),
    publisher: oneLine(archive.publisher),
    archiveName: oneLine(archive.name),
    ...(archive.repository ? { repository: archive.repository } : {}),
    fingerprint: result.fingerprint,
    stamp: result.stamp,
    tool: { name: oneLine(result.tool.name), version: oneLine(result.tool.version) },
    ...(result.device ? { device: oneLine(result.device) } : {}),
  };
}
