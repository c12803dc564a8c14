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

export function citationSubject(result: ResultDocument, version: { number: number; date: string }, archive: ArchiveDefinition): CitationSubject {
  const url = versionUrl(archive.base_url, result.audit, version.number);
  return {
    auditId: result.audit,
    title: result.title,
    authors: result.authors,
    version: version.number,
    date: version.date,
    ...(result.doi ? { doi: result.doi } : {}),
    ...(url ? { url } : {}),
    license: result.license ?? archive.license,
    publisher: archive.publisher,
    archiveName: archive.name,
    ...(archive.repository ? { repository: archive.repository } : {}),
    fingerprint: result.fingerprint,
    stamp: result.stamp,
    tool: result.tool,
    ...(result.device ? { device: result.device } : {}),
  };
}
