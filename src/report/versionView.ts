import type { Status } from "../checks/types.ts";
import type { ArchiveDefinition } from "../config/archiveSchema.ts";
import { changesBetween, snapshotOf, type VersionChanges, type VersionSnapshot } from "../archive/versionChanges.ts";
import { publicationDate } from "../archive/manifest.ts";
import type { FrozenVersion } from "../archive/readVersion.ts";
import type { IntegrityProblem } from "../archive/integrity.ts";
import { bibtexEntry, checksMacrosTex, checksTableTex, citationCff, citationSubject, plainCitation, pointsCsv, statusBadgeSvg, type CitationSubject } from "./citation/index.ts";
import type { ResultDocument, Stamp } from "./resultDocument.ts";
import { STATUS_LABEL, STATUS_SYMBOL } from "./viewModel.ts";
import type { RerunDataState, RerunManifest } from "./versionData.ts";
import { TOOL } from "../version.ts";

/** The files offered beside each published version's page. */
export const VERSION_DOWNLOADS = [
  { file: "result.json", label: "Result document (JSON, canonical form, exactly as frozen)" },
  { file: "version.json", label: "Version record: date, tool, input digests, fingerprint, link to the previous version" },
  { file: "CITATION.cff", label: "Citation File Format 1.2.0" },
  { file: "citation.bib", label: "BibTeX entry" },
  { file: "citation.txt", label: "Plain-text citation" },
  { file: "checks-table.tex", label: "LaTeX table of the checks and their verdicts (booktabs, siunitx)" },
  { file: "checks-macros.tex", label: "LaTeX macros: one per headline figure, for quoting the audit in a manuscript (siunitx)" },
  { file: "numbers.csv", label: "Per-point numbers of every check table (CSV, one cell a line)" },
  { file: "badge.svg", label: "Status badge (SVG)" },
] as const;

export interface VersionLink {
  number: number;
  date: string;
  stamp: Stamp;
  stampLabel: string;
  stampSymbol: string;
  fingerprint: string;
  href: string;
  current: boolean;
  latest: boolean;
}

export interface DownloadLink {
  file: string;
  label: string;
  href: string;
}

export interface ChangesView {
  sinceNumber: number;
  sinceHref: string;
  stamp: { from: string; to: string } | null;
  verdicts: { check: string; dataset: string; from: string; to: string; fromStatus: Status | null; toStatus: Status | null }[];
  data: { file: string; dataset: string; change: string; from?: string; to?: string }[];
  definitionChanged: boolean;
  tool: { from: string; to: string } | null;
  unchangedVerdicts: number;
  /** True when nothing a reader would see changed (only numbers moved). */
  quiet: boolean;
}

/** How a report page sits among the versions of its audit. All links are relative to the page. */
export interface PageVersioning {
  kind: "version" | "draft";
  /** Output path of the page, e.g. `vq3-heat-exchange/v2/index.html`. */
  path: string;
  number?: number;
  date?: string;
  publishedAt?: string;
  isLatest: boolean;
  latestNumber?: number;
  latestHref?: string;
  landingHref: string;
  selfUrl?: string;
  draftHref?: string;
  history: VersionLink[];
  changes?: ChangesView;
  downloads: DownloadLink[];
  citationText?: string;
  verifyCommand?: string;
  /** Where to clone the archive from, if archive.yaml says. */
  repository?: string;
  publishCommand: string;
  fingerprint: string;
  versionDigest?: string;
  previousDigest?: string;
  integrity: string[];
  /** The "re-run here" panel of a published version. */
  rerun?: RerunView;
}

/** What the re-run panel of a version page needs; links relative to the page. */
export interface RerunView {
  /** The version's folder on the site (`../v2/`), where its data, result.json, version.json and rerun.json lie. */
  base: string;
  data: RerunDataState;
  reason?: string;
  doiUrl?: string;
  repository?: string;
  /** The tool version that published the version, and whether it is the one that built this site. */
  toolVersion: string;
  sameTool: boolean;
  siteToolVersion: string;
}

/** A file to write beside the pages: path relative to the site root. */
export interface SiteFile {
  path: string;
  content: string | Uint8Array;
}

function changeWord(status: Status | null): string {
  return status === null ? "not run" : STATUS_LABEL[status];
}

export function changesView(c: VersionChanges, sinceHref: string): ChangesView {
  return {
    sinceNumber: c.from ?? 0,
    sinceHref,
    stamp: c.stamp ? { from: STATUS_LABEL[c.stamp.from], to: STATUS_LABEL[c.stamp.to] } : null,
    verdicts: c.verdicts.map((v) => ({ check: v.check, dataset: v.dataset, from: changeWord(v.from), to: changeWord(v.to), fromStatus: v.from, toStatus: v.to })),
    data: c.data.map((d) => ({
      file: d.file,
      dataset: d.dataset,
      change: d.change === "added" ? "added" : d.change === "removed" ? "removed" : "changed",
      ...(d.from ? { from: `sha256 ${d.from.sha256.slice(0, 12)}…, ${d.from.rows} rows` } : {}),
      ...(d.to ? { to: `sha256 ${d.to.sha256.slice(0, 12)}…, ${d.to.rows} rows` } : {}),
    })),
    definitionChanged: c.definitionChanged,
    tool: c.tool,
    unchangedVerdicts: c.unchangedVerdicts,
    quiet: !c.stamp && c.verdicts.length === 0 && c.data.length === 0 && !c.definitionChanged && !c.tool,
  };
}

export interface AuditVersionsInput {
  id: string;
  /** The audit folder relative to the archive root, posix separators (for commands). */
  folder: string;
  versions: FrozenVersion[];
  problems: IntegrityProblem[];
  /** The current (unpublished) result, when the audit can be run. */
  current: ResultDocument | null;
  /** Digest of the current audit.yaml text. */
  currentDefinitionDigest: string | null;
  archive: ArchiveDefinition;
  /** Each version's data as planned for the site (versionData.ts), by version number. */
  rerun?: ReadonlyMap<number, RerunManifest>;
}

/** Versioning of every page of one audit, and the files to write beside them. */
export interface AuditVersionsPlan {
  landing: { result: ResultDocument; versioning: PageVersioning };
  versions: { result: ResultDocument; versioning: PageVersioning }[];
  draft: { result: ResultDocument; versioning: PageVersioning } | null;
  files: SiteFile[];
}

/** `<prefix>v<N>/index.html`, where prefix leads from the page to the audit folder of the site. */
function versionHref(prefix: string, n: number): string {
  return `${prefix}v${n}/index.html`;
}

/**
 * Plan the pages of one audit: the landing page (latest version, or the
 * draft when nothing is published), one page per version at `v<N>/`, and a
 * draft page at `draft/` when the current state differs from the latest
 * version. Also the downloads of each version.
 */
export function planAuditVersions(input: AuditVersionsInput): AuditVersionsPlan {
  const { id, folder, versions, current, archive } = input;
  const latest = versions[versions.length - 1];
  const verifyCommand = (n: number) => `npx transport-audit verify ${folder} --version ${n}`;
  const publishCommand = `npx transport-audit publish ${folder}`;
  const hasDraft = current !== null && (!latest || latest.manifest.fingerprint !== current.fingerprint);
  const integrity = input.problems.map((p) => `${p.file}: ${p.message}`);
  const files: SiteFile[] = [];

  const history = (prefix: string, currentNumber: number | null): VersionLink[] =>
    [...versions].reverse().map((v) => ({
      number: v.number,
      date: publicationDate(v.manifest),
      stamp: v.manifest.stamp,
      stampLabel: STATUS_LABEL[v.manifest.stamp],
      stampSymbol: STATUS_SYMBOL[v.manifest.stamp],
      fingerprint: v.manifest.fingerprint,
      href: versionHref(prefix, v.number),
      current: v.number === currentNumber,
      latest: v === latest,
    }));

  const subjects = new Map<number, CitationSubject>();
  for (const v of versions) subjects.set(v.number, citationSubject(v.result, { number: v.number, date: publicationDate(v.manifest) }, archive));

  /** Versioning of a version's content shown on a page whose way to the audit folder is `prefix`. */
  const versionVersioning = (v: FrozenVersion, prefix: string, path: string): PageVersioning => {
    const s = subjects.get(v.number)!;
    const i = versions.indexOf(v);
    const prev = i > 0 ? versions[i - 1] : undefined;
    const downloadPrefix = `${prefix}v${v.number}/`;
    return {
      kind: "version",
      path,
      number: v.number,
      date: publicationDate(v.manifest),
      publishedAt: v.manifest.published,
      isLatest: v === latest,
      latestNumber: latest.number,
      latestHref: versionHref(prefix, latest.number),
      landingHref: `${prefix}index.html`,
      ...(s.url ? { selfUrl: s.url } : {}),
      ...(hasDraft ? { draftHref: `${prefix}draft/index.html` } : {}),
      history: history(prefix, v.number),
      ...(prev
        ? { changes: changesView(changesBetween(snapshotOf(prev.manifest, prev.result.checks), snapshotOf(v.manifest, v.result.checks)), versionHref(prefix, prev.number)) }
        : {}),
      downloads: VERSION_DOWNLOADS.map((d) => ({ ...d, href: `${downloadPrefix}${d.file}` })),
      citationText: plainCitation(s).trim(),
      verifyCommand: verifyCommand(v.number),
      ...(archive.repository ? { repository: archive.repository } : {}),
      publishCommand,
      fingerprint: v.manifest.fingerprint,
      versionDigest: v.manifestDigest,
      ...(v.manifest.previous ? { previousDigest: v.manifest.previous.digest } : {}),
      integrity,
      ...(input.rerun?.has(v.number) ? { rerun: rerunView(input.rerun.get(v.number)!, v, downloadPrefix) } : {}),
    };
  };

  const out: AuditVersionsPlan = {
    landing: null as unknown as AuditVersionsPlan["landing"],
    versions: versions.map((v) => ({ result: v.result, versioning: versionVersioning(v, "../", `${id}/v${v.number}/index.html`) })),
    draft: null,
    files,
  };

  for (const v of versions) {
    const s = subjects.get(v.number)!;
    const dir = `${id}/v${v.number}/`;
    files.push(
      { path: `${dir}result.json`, content: v.resultText },
      { path: `${dir}version.json`, content: v.manifestText },
      // The definition as frozen: what the re-run panel gives the checks, beside the data copied for it.
      { path: `${dir}audit.yaml`, content: v.definitionText },
      { path: `${dir}CITATION.cff`, content: citationCff(s) },
      { path: `${dir}citation.bib`, content: bibtexEntry(s) },
      { path: `${dir}citation.txt`, content: plainCitation(s) },
      { path: `${dir}checks-table.tex`, content: checksTableTex(v.result, s) },
      { path: `${dir}checks-macros.tex`, content: checksMacrosTex(v.result, s) },
      { path: `${dir}numbers.csv`, content: pointsCsv(v.result, s) },
      { path: `${dir}badge.svg`, content: statusBadgeSvg(v.manifest.stamp, v.number, s.doi ? `doi ${s.doi}` : undefined) },
    );
  }

  const draftVersioning = (prefix: string, path: string, resultHref: string): PageVersioning => {
    const since = latest && current ? changesBetween(snapshotOf(latest.manifest, latest.result.checks), draftSnapshot(current, input.currentDefinitionDigest ?? "")) : null;
    return {
      kind: "draft",
      path,
      isLatest: false,
      ...(latest ? { latestNumber: latest.number, latestHref: versionHref(prefix, latest.number) } : {}),
      landingHref: `${prefix}index.html`,
      history: history(prefix, null),
      ...(since && latest ? { changes: changesView(since, versionHref(prefix, latest.number)) } : {}),
      downloads: [{ file: "result.json", label: "Draft result document (JSON, unpublished: not citable)", href: resultHref }],
      publishCommand,
      fingerprint: current!.fingerprint,
      integrity,
    };
  };

  if (latest) {
    out.landing = { result: latest.result, versioning: versionVersioning(latest, "", `${id}/index.html`) };
    const s = subjects.get(latest.number)!;
    files.push({ path: `${id}/badge.svg`, content: statusBadgeSvg(latest.manifest.stamp, latest.number, s.doi ? `doi ${s.doi}` : undefined) });
    if (hasDraft && current) {
      out.draft = { result: current, versioning: draftVersioning("../", `${id}/draft/index.html`, "result.json") };
      files.push({ path: `${id}/draft/result.json`, content: `${JSON.stringify(current, null, 2)}\n` });
      files.push({ path: `${id}/draft/badge.svg`, content: statusBadgeSvg("draft", null) });
    }
  } else if (current) {
    // Nothing published yet: the landing page is the draft, marked as such.
    out.landing = { result: current, versioning: draftVersioning("", `${id}/index.html`, "draft-result.json") };
    files.push({ path: `${id}/draft-result.json`, content: `${JSON.stringify(current, null, 2)}\n` });
    files.push({ path: `${id}/badge.svg`, content: statusBadgeSvg("draft", null) });
  } else {
    throw new Error(`planAuditVersions: audit ${id} has neither a version nor a current result`);
  }
  return out;
}

function rerunView(m: RerunManifest, v: FrozenVersion, base: string): RerunView {
  return {
    base,
    data: m.data,
    ...(m.reason ? { reason: m.reason } : {}),
    ...(m.links.doi ? { doiUrl: `https://doi.org/${m.links.doi.split("/").map(encodeURIComponent).join("/")}` } : {}),
    ...(m.links.repository ? { repository: m.links.repository } : {}),
    toolVersion: v.manifest.tool.version,
    sameTool: v.manifest.tool.name === TOOL.name && v.manifest.tool.version === TOOL.version,
    siteToolVersion: TOOL.version,
  };
}

function draftSnapshot(current: ResultDocument, definitionDigest: string): VersionSnapshot {
  return {
    version: null,
    stamp: current.stamp,
    tool: current.tool,
    inputs: current.datasets,
    definitionDigest,
    checks: current.checks,
  };
}
