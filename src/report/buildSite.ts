import fs from "node:fs";
import path from "node:path";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import Eleventy from "@11ty/eleventy";
import { loadArchiveDefinition, type ArchiveDefinition } from "../config/archiveSchema.ts";
import { AUDIT_FILE } from "../config/loadAudit.ts";
import { InputError } from "../errors.ts";
import { TOOL } from "../version.ts";
import { runAuditFolders } from "./auditPool.ts";
import { pruneResultCache, resultCacheDir } from "./resultCache.ts";
import type { ResultDocument } from "./resultDocument.ts";
import { auditPageModel, type AuditPageModel } from "./viewModel.ts";
import { checkArchive } from "../archive/integrity.ts";
import { sha256Of } from "../archive/digest.ts";
import { planAuditVersions, type SiteFile } from "./versionView.ts";
import { refuseForeignOut, refuseOutInArchive, stageBeside, stampSite, swapIntoPlace } from "../output/siteFolder.ts";
import { removeStaleStaging } from "../output/staging.ts";
import { isWithin } from "../output/paths.ts";
import { faultPoint } from "../output/faults.ts";
import { onInterrupt } from "../interrupt/cancellation.ts";
import { removeStaleVersionStaging } from "../archive/layout.ts";
import { copyVersionData, DEFAULT_DATA_SIZE_LIMIT, planVersionData, type VersionDataPlan } from "./versionData.ts";
import { writePanelAssets } from "./panelAssets.ts";

const PROJECT_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const TEMPLATES = path.join(PROJECT_ROOT, "templates");

export interface BuildOptions {
  root: string; // archive root, holding audits/ and optionally archive.yaml
  out: string; // output folder
  onProgress?: (done: number, total: number, auditId: string) => void;
  /**
   * Result cache under `<root>/.cache/transport-audit/results`: "use" takes the
   * stored result of an unchanged audit (the default), "refresh" recomputes
   * every audit and stores the new results. Either way, entries the build did
   * not use are removed once the site is written.
   */
  cache?: "use" | "refresh";
  /** Worker threads that run the audits (default: one a core, at most four; below two, or for small archives, this thread). */
  threads?: number;
  /** Replace a non-empty output folder that build did not write (see output/siteFolder.ts). */
  force?: boolean;
  /**
   * Bytes of data copied into the site per audit (all its versions together) for the
   * browser re-run panel; versions past it link to their data instead. Default 300 MB.
   */
  dataSizeLimit?: number;
}

/** How many audits took their result from the cache and how many were run. */
export interface CacheStatistics {
  reused: number;
  recomputed: number;
  /** Recomputed results that could not be stored (read-only archive, full disk). */
  unstored: number;
}

/** An audit that could not be audited: listed on the index with its error, never silently dropped. */
export interface BrokenAudit {
  folder: string;
  error: string;
}

export interface BuildOutcome {
  out: string;
  index: string;
  /** Landing page of each audit: its latest version, or its draft when none is published. */
  audits: AuditPageModel[];
  /** One page per published version, at `<audit-id>/v<N>/`. */
  versionPages: AuditPageModel[];
  /** Unpublished changes since the latest version, at `<audit-id>/draft/`. */
  draftPages: AuditPageModel[];
  broken: BrokenAudit[];
  /** Audits whose published versions are damaged or unreadable (shown on their pages as well). */
  damaged: DamagedAudit[];
  /** Ids of the audits whose current state has a failed check. */
  failed: string[];
  cache: CacheStatistics;
}

/** An audit whose stored versions failed the integrity checks: each problem as a line naming its file. */
export interface DamagedAudit {
  folder: string;
  problems: string[];
}

export interface SiteData {
  archive: ArchiveDefinition;
  audits: AuditPageModel[];
  versionPages?: AuditPageModel[];
  draftPages?: AuditPageModel[];
  broken: BrokenAudit[];
  files?: SiteFile[];
  /** Data of published versions to copy beside their pages (versionData.ts). */
  versionData?: VersionDataPlan[];
}

/** Audit folders under `<root>/audits`, sorted by name. */
export function findAuditFolders(root: string): string[] {
  const dir = path.join(root, "audits");
  if (!fs.existsSync(dir)) throw new InputError(`${dir}: no audits folder; an archive keeps each audit in audits/<audit-id>/`);
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .filter((e) => e.isDirectory() && fs.existsSync(path.join(dir, e.name, AUDIT_FILE)))
    .map((e) => path.join(dir, e.name))
    .sort();
}

/** KaTeX's stylesheet and fonts, and our own assets, beside the pages. */
function copyAssets(out: string): void {
  const require = createRequire(import.meta.url);
  const katexDist = path.dirname(require.resolve("katex/dist/katex.min.css"));
  fs.mkdirSync(path.join(out, "assets", "katex"), { recursive: true });
  fs.copyFileSync(path.join(katexDist, "katex.min.css"), path.join(out, "assets", "katex", "katex.min.css"));
  fs.cpSync(path.join(katexDist, "fonts"), path.join(out, "assets", "katex", "fonts"), { recursive: true });
  fs.cpSync(path.join(TEMPLATES, "assets"), path.join(out, "assets"), { recursive: true });
}

/**
 * The place of a site file, refused when its path (made from ids in frozen
 * documents, which are validated when read) would leave the output folder.
 */
export function confinedSitePath(out: string, relative: string): string {
  const target = path.resolve(out, ...relative.split("/"));
  if (relative === "" || path.isAbsolute(relative) || relative.includes("\\") || !isWithin(target, out) || target === path.resolve(out)) {
    throw new InputError(`site path ${JSON.stringify(relative)} would be written outside the output folder ${out}; refused`);
  }
  return target;
}

/** Every page's permalink and every download stays inside the output folder (checked before Eleventy writes anything). */
function refuseEscapingPages(out: string, data: SiteData): void {
  for (const a of data.audits) confinedSitePath(out, `${a.id}/index.html`);
  for (const p of [...(data.versionPages ?? []), ...(data.draftPages ?? [])]) confinedSitePath(out, p.versioning?.path ?? `${p.id}/index.html`);
  for (const f of data.files ?? []) confinedSitePath(out, f.path);
  for (const v of data.versionData ?? []) for (const f of v.manifest.files) confinedSitePath(out, `${v.siteDir}${f.path}`);
}

/** Render pages with Eleventy from prepared models. */
export async function renderSite(out: string, data: SiteData): Promise<void> {
  refuseEscapingPages(out, data);
  const elev = new Eleventy(TEMPLATES, out, {
    configPath: path.join(PROJECT_ROOT, ".eleventy.js"),
    quietMode: true,
    source: "cli",
    config: (c) => {
      c.addGlobalData("archive", data.archive);
      c.addGlobalData("audits", data.audits);
      c.addGlobalData("versionPages", data.versionPages ?? []);
      c.addGlobalData("draftPages", data.draftPages ?? []);
      c.addGlobalData("broken", data.broken);
      c.addGlobalData("tool", TOOL);
    },
  });
  // Eleventy still prints its "Wrote N files" summary in quiet mode; the build reports for itself.
  elev.disableLogger();
  await elev.write();
  copyAssets(out);
  for (const f of data.files ?? []) {
    const target = confinedSitePath(out, f.path);
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, f.content);
  }
  for (const plan of data.versionData ?? []) copyVersionData(plan, (relative) => confinedSitePath(out, relative));
  await writePanelAssets(path.join(out, "assets"));
}

/**
 * Run every audit of an archive and render the static site. An audit whose
 * fingerprint has a trusted entry in the result cache is not run again (see
 * resultCache.ts); published versions are shown as frozen. The site is written
 * into a staging folder beside the output folder and swapped in only when it
 * is complete, so a failure (a full disk) or a signal leaves the previous site
 * as it was; an output folder inside the archive, or one holding files build
 * did not write, is refused before any work (output/siteFolder.ts).
 */
export async function buildSite(options: BuildOptions): Promise<BuildOutcome> {
  const archive = loadArchiveDefinition(options.root);
  const folders = findAuditFolders(options.root);
  refuseOutInArchive(options.out, { root: options.root, auditsDir: path.join(options.root, "audits"), auditFolders: folders });
  refuseForeignOut(options.out, options.force ?? false);
  removeStaleStaging(path.dirname(options.out));
  const audits: AuditPageModel[] = [];
  const versionPages: AuditPageModel[] = [];
  const draftPages: AuditPageModel[] = [];
  const files: SiteFile[] = [];
  const versionData: VersionDataPlan[] = [];
  const dataSizeLimit = options.dataSizeLimit ?? DEFAULT_DATA_SIZE_LIMIT;
  const broken: BrokenAudit[] = [];
  const damaged: DamagedAudit[] = [];
  const failed: string[] = [];
  const cache: CacheStatistics = { reused: 0, recomputed: 0, unstored: 0 };
  const cacheUse = { dir: resultCacheDir(options.root), read: (options.cache ?? "use") === "use" };
  const usedFingerprints = new Set<string>();
  options.onProgress?.(0, folders.length, "");
  const outcomes = await runAuditFolders(folders, cacheUse, {
    threads: options.threads,
    onDone: (done, total, folder) => options.onProgress?.(done, total, path.basename(folder)),
  });
  for (const [i, folder] of folders.entries()) {
    const folderRel = path.relative(options.root, folder).split(path.sep).join("/");
    let stored: ReturnType<typeof checkArchive>;
    try {
      stored = checkArchive(folder);
      removeStaleVersionStaging(folder);
    } catch (err) {
      // A versions folder that cannot be trusted at all (a symbolic link elsewhere): the audit is left off the site.
      if (!(err instanceof InputError)) throw err;
      broken.push({ folder: folderRel, error: err.message });
      continue;
    }
    if (stored.problems.length > 0) damaged.push({ folder: folderRel, problems: stored.problems.map(problemLine) });
    let current: ResultDocument | null = null;
    const outcome = outcomes[i];
    if (outcome.kind === "run") {
      const { run } = outcome;
      current = run.result;
      usedFingerprints.add(run.result.fingerprint);
      if (run.fromCache) cache.reused++;
      else cache.recomputed++;
      if (!run.stored) cache.unstored++;
      if (current.stamp === "fail") failed.push(current.audit);
    } else broken.push({ folder: folderRel, error: outcome.message });
    // Published versions stay on the site even when the current state cannot be run.
    if (!current && stored.versions.length === 0) continue;
    const latest = stored.versions[stored.versions.length - 1];
    const auditId = current?.audit ?? latest.result.audit;
    const dataPlans = planVersionData(folder, auditId, stored.versions, dataSizeLimit, archive.repository);
    versionData.push(...dataPlans);
    const plan = planAuditVersions({
      id: current?.audit ?? latest.result.audit,
      folder: folderRel,
      versions: stored.versions,
      problems: stored.problems,
      current,
      currentDefinitionDigest: current ? sha256Of(fs.readFileSync(path.join(folder, AUDIT_FILE))) : null,
      archive,
      rerun: new Map(dataPlans.map((d) => [d.version.number, d.manifest])),
    });
    audits.push(auditPageModel(plan.landing.result, plan.landing.versioning));
    for (const v of plan.versions) versionPages.push(auditPageModel(v.result, v.versioning));
    if (plan.draft) draftPages.push(auditPageModel(plan.draft.result, plan.draft.versioning));
    files.push(...plan.files);
  }
  const ids = new Set<string>();
  for (const a of audits) {
    if (ids.has(a.id)) throw new InputError(`two audits in ${options.root}/audits share the id ${JSON.stringify(a.id)}; ids must be unique in an archive`);
    ids.add(a.id);
  }
  await writeSiteInPlace(options.out, { archive, audits, versionPages, draftPages, broken, files, versionData }, options.force ?? false);
  // Entries of states the audits no longer have are dropped once the site stands.
  pruneResultCache(cacheUse.dir, usedFingerprints);
  return { out: options.out, index: path.join(options.out, "index.html"), audits, versionPages, draftPages, broken, damaged, failed, cache };
}

/** `versions/2/result.json: altered after publication: …`, without repeating a file the message already starts with. */
function problemLine(p: { file: string; message: string }): string {
  return p.message.startsWith(p.file) ? p.message : `${p.file}: ${p.message}`;
}

/**
 * Render into a staging folder beside `out`, stamp it, and swap it in. The
 * staging folder is removed on any failure and on Ctrl-C or SIGTERM. The
 * output folder is checked again just before the swap: a user may have put
 * files there while the audits ran.
 */
async function writeSiteInPlace(out: string, data: SiteData, force: boolean): Promise<void> {
  const staging = stageBeside(out);
  const forget = onInterrupt(() => fs.rmSync(staging, { recursive: true, force: true }));
  try {
    await renderSite(staging, data);
    stampSite(staging);
    await faultPoint("build:rendered", path.join(staging, "index.html"));
    refuseForeignOut(out, force);
    swapIntoPlace(staging, out);
  } finally {
    fs.rmSync(staging, { recursive: true, force: true });
    forget();
  }
}
