import fs from "node:fs";
import path from "node:path";
import { parseAuditDefinition } from "../config/loadAudit.ts";
import { confinePath } from "../config/confinePath.ts";
import { ArchiveError, InputError } from "../errors.ts";
import { ingestDefinition } from "../ingest/loadAudit.ts";
import { canonicalJson } from "../report/canonicalJson.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { resultDocumentOf, runChecks } from "../report/runAudit.ts";
import { TOOL } from "../version.ts";
import { datasetDigest } from "../ingest/fileDigest.ts";
import { compareResultTexts, type ResultProblem } from "./resultDifferences.ts";
import { checkArchive, type IntegrityProblem } from "./integrity.ts";
import { DEFINITION_FILE, VERSIONS_DIR, listVersionNumbers } from "./layout.ts";
import { publicationDate } from "./manifest.ts";
import type { FrozenVersion } from "./readVersion.ts";

export type { ResultProblem } from "./resultDifferences.ts";

/** A data file whose bytes are not those the version was published with. */
export interface DataFileProblem {
  dataset: string;
  file: string;
  frozen: string;
  now: string | null; // null: missing
}

export interface VerifyReport {
  audit: string;
  version: number;
  /** The newest version: the hash chain is checked from version 1 to it, whichever version is verified. */
  newest: number;
  published: string;
  tool: { frozen: { name: string; version: string }; now: { name: string; version: string } };
  reproduced: boolean;
  chain: IntegrityProblem[];
  data: DataFileProblem[];
  /** Why the audit could not be re-run (a data file missing or unreadable), if it could not. */
  rerunError?: string;
  result: ResultProblem[];
  /** Result differences beyond those listed. */
  resultMore: number;
  notes: string[];
}

export interface VerifyOptions {
  version?: number;
  /** At most this many result differences are listed (the count of the rest is given). */
  maxDifferences?: number;
}

function pickVersion(auditDir: string, wanted: number | undefined): number {
  const numbers = listVersionNumbers(auditDir);
  if (numbers.length === 0) {
    throw new ArchiveError(`${path.join(auditDir, VERSIONS_DIR)}: no published version to verify; publish one first with: transport-audit publish ${auditDir}`);
  }
  if (wanted === undefined) return numbers[numbers.length - 1];
  if (!numbers.includes(wanted)) {
    throw new ArchiveError(`--version ${wanted}: ${auditDir} has no such version; published versions: ${numbers.join(", ")}`);
  }
  return wanted;
}

/** Compare each data file the version names with its frozen digest. */
function checkDataFiles(auditDir: string, v: FrozenVersion): DataFileProblem[] {
  const out: DataFileProblem[] = [];
  for (const input of v.manifest.inputs) {
    // A dataset's file may be a folder or a glob of parts: its digest is then the one over the parts' list.
    let now: string | null;
    try {
      now = datasetDigest(auditDir, input.file, "file");
    } catch (err) {
      const gone = (err as NodeJS.ErrnoException).code === "ENOENT";
      if (!(err instanceof InputError) && !gone) throw err;
      now = null; // gone, outside the audit, or no longer readable
    }
    if (now !== input.sha256) out.push({ dataset: input.id, file: input.file, frozen: input.sha256, now });
  }
  return out;
}

/**
 * Re-run a published version from the data and compare: the whole hash chain
 * (to the newest version), every data file's digest, and the result document to the last
 * digit (canonical JSON). The frozen audit.yaml of the version is what runs,
 * so later edits to the audit definition do not disturb older versions; the
 * data are read from the audit folder.
 */
export async function verifyVersion(auditDir: string, options: VerifyOptions = {}): Promise<VerifyReport> {
  const number = pickVersion(auditDir, options.version);
  const max = options.maxDifferences ?? 40;
  // The whole chain to the newest version: a later version's link is what proves an earlier record unaltered.
  const state = checkArchive(auditDir);
  const v = state.versions.find((x) => x.number === number);
  const report: VerifyReport = {
    audit: v?.manifest.audit ?? path.basename(path.resolve(auditDir)),
    version: number,
    newest: state.newest,
    published: v ? publicationDate(v.manifest) : "unknown",
    tool: { frozen: v ? v.manifest.tool : { name: "unknown", version: "unknown" }, now: { name: TOOL.name, version: TOOL.version } },
    reproduced: false,
    chain: state.problems,
    data: [],
    result: [],
    resultMore: 0,
    notes: [],
  };
  if (!v) return report; // unreadable: the chain problems say why
  if (v.manifest.tool.version !== TOOL.version || v.manifest.tool.name !== TOOL.name) {
    report.notes.push(
      `version ${number} was published with ${v.manifest.tool.name} ${v.manifest.tool.version}; this is ${TOOL.name} ${TOOL.version}. ` +
        `The fingerprint includes the tool version, so only that version can reproduce it exactly.`,
    );
  }
  const current = path.join(auditDir, DEFINITION_FILE);
  if (fs.existsSync(current) && fs.readFileSync(current, "utf8") !== v.definitionText) {
    report.notes.push(`audit.yaml has changed since version ${number}; the version's own frozen copy (${VERSIONS_DIR}/${number}/${DEFINITION_FILE}) is what was re-run.`);
  }
  report.data = checkDataFiles(auditDir, v);
  let rerun: ResultDocument | null = null;
  try {
    const audit = await ingestDefinition(auditDir, parseAuditDefinition(v.definitionText, `${VERSIONS_DIR}/${number}/${DEFINITION_FILE}`));
    rerun = resultDocumentOf(audit, runChecks(audit));
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    report.rerunError = err.message;
  }
  if (rerun) {
    // The digests of data files reported changed above are not repeated among the result's differences.
    const skip = new Set(v.result.datasets.map((d, i) => [d, i] as const).filter(([d]) => report.data.some((p) => p.file === d.file)).map(([, i]) => i));
    const compared = compareResultTexts(v.resultText, canonicalJson(rerun), { maxDifferences: max, skipDigestsOf: skip, dataChanged: report.data.length > 0 });
    report.result = compared.differences;
    report.resultMore = compared.more;
  }
  report.reproduced = report.chain.length === 0 && report.data.length === 0 && !report.rerunError && report.result.length === 0;
  return report;
}

/** The report as lines a person reads. */
export function formatVerifyReport(r: VerifyReport, auditDir: string): string {
  const lines: string[] = [];
  lines.push(`verifying ${r.audit} version ${r.version} (published ${r.published} with ${r.tool.frozen.name} ${r.tool.frozen.version}) in ${auditDir}`);
  for (const n of r.notes) lines.push(`note: ${n}`);
  lines.push(r.chain.length === 0 ? `hash chain: versions 1 to ${r.newest} intact` : `hash chain (versions 1 to ${r.newest}): ${r.chain.length} problem(s)`);
  for (const p of r.chain) lines.push(`  ${p.file}: ${p.message}`);
  if (r.data.length === 0) lines.push("data files: every digest matches");
  else {
    lines.push(`data files: ${r.data.length} changed`);
    for (const d of r.data) {
      lines.push(d.now === null ? `  ${d.file} (dataset ${d.dataset}): missing; published with sha256 ${d.frozen}` : `  ${d.file} (dataset ${d.dataset}): changed; published sha256 ${d.frozen}, now ${d.now}`);
    }
  }
  if (r.rerunError) lines.push(`re-run: could not run the audit:\n${r.rerunError.replace(/^/gm, "  ")}`);
  else if (r.result.length === 0) lines.push("result: identical to the frozen result document (canonical JSON, every digit)");
  else {
    lines.push(`result: ${r.result.length + r.resultMore} difference(s) from the frozen result document`);
    for (const d of r.result) lines.push(d.summary ? `  ${d.where}: ${d.path}: ${d.summary}` : `  ${d.where}: ${d.path}: published ${d.frozen}, re-run ${d.now}`);
    if (r.resultMore > 0) lines.push(`  … and ${r.resultMore} more`);
  }
  lines.push(r.reproduced ? `REPRODUCED: version ${r.version} of ${r.audit}` : `NOT REPRODUCED: version ${r.version} of ${r.audit}`);
  return lines.join("\n");
}
