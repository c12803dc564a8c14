import { CHECKS } from "../checks/index.ts";
import { notApplicableResult } from "../checks/helpers.ts";
import type { CheckContext, CheckDefinition, CheckOptions, CheckResult } from "../checks/types.ts";
import type { AuditDefinition } from "../config/types.ts";
import { ingestAudit, type IngestOptions } from "../ingest/loadAudit.ts";
import { describeReduction } from "../ingest/reduce/describeReduction.ts";
import { FAITHFUL_CELL_WIDTH } from "../ingest/reduce/reduceSamples.ts";
import { fmt } from "../checks/helpers.ts";
import type { IngestedAudit } from "../ingest/types.ts";
import { rngFromText } from "../stats/rng.ts";
import { TOOL } from "../version.ts";
import { canonicalDigest } from "./canonicalJson.ts";
import { stampOf, type ResultDocument } from "./resultDocument.ts";

export interface SelectedCheck {
  definition: CheckDefinition;
  options: CheckOptions;
  explicit: boolean;
  /** Position in `checks:` (for messages), null with `checks: all`. */
  index: number | null;
}

/** Resolve `checks:` (all, or a list with options) to check definitions. */
export function selectChecks(definition: AuditDefinition, registry: readonly CheckDefinition[] = CHECKS): SelectedCheck[] {
  if (definition.checks === "all") return registry.map((d) => ({ definition: d, options: {}, explicit: false, index: null }));
  return definition.checks.map((entry, index) => {
    const [id, options] = typeof entry === "string" ? [entry, {}] : Object.entries(entry)[0];
    const found = registry.find((d) => d.id === id);
    // audit.yaml's check ids were validated when it was read (auditSchema.ts); only a registry given
    // by code can lack one.
    if (!found) throw new Error(`selectChecks: the registry has no check ${JSON.stringify(id)}`);
    return { definition: found, options: (options ?? {}) as CheckOptions, explicit: true, index };
  });
}

/**
 * The fingerprint of an audit: a hash of the normalised definition, the
 * digests of its inputs and the tool version. Two runs with the same
 * fingerprint must give the same result document.
 */
export function fingerprintOf(audit: IngestedAudit): string {
  return fingerprintFromDigests(
    audit.definition,
    audit.datasets.map((d) => ({ id: d.id, file: d.file, sha256: d.sha256 })),
  );
}

/** One input of the fingerprint: a dataset's id, its file as written in audit.yaml and the hex digest of its bytes. */
export interface InputDigest {
  id: string;
  file: string;
  sha256: string;
}

/**
 * The same fingerprint from the definition and the digests of its data files
 * alone, so that it can be formed without parsing the data (the result cache
 * of a site build looks results up by it). `inputs` are in the order of
 * `definition.datasets`.
 */
export function fingerprintFromDigests(definition: AuditDefinition, inputs: readonly InputDigest[]): string {
  return canonicalDigest({
    definition,
    inputs: inputs.map((d) => ({ id: d.id, file: d.file, sha256: d.sha256 })),
    tool: TOOL,
  });
}

export function contextFor(definition: AuditDefinition, options: CheckOptions, checkId: string): CheckContext {
  const settings = definition.settings;
  return {
    settings,
    options,
    // Seeded from content (or the declared seed), never from the clock.
    rngFor: (digest, stream = "") => rngFromText(`${settings.seed === "auto" ? digest : `seed:${settings.seed}`}|${checkId}|${stream}`),
  };
}

/**
 * Run the selected checks on ingested data: pure apart from the check code itself.
 * `onCheck` hears each check as it finishes (the browser's re-run shows progress with it).
 */
export function runChecks(audit: IngestedAudit, registry: readonly CheckDefinition[] = CHECKS, onCheck?: (done: number, total: number, check: string) => void): CheckResult[] {
  const results: CheckResult[] = [];
  const selection = selectChecks(audit.definition, registry);
  for (const [done, selected] of selection.entries()) {
    const ctx = contextFor(audit.definition, selected.options, selected.definition.id);
    const { included, skipped } = restrictDatasets(audit, selected);
    const out = selected.definition.run(included, ctx);
    if (out.length === 0 && selected.explicit && skipped.length === 0) {
      results.push(notApplicableResult({ check: selected.definition.id, dataset: "—", reason: `no dataset in this audit is of a kind that ${selected.definition.id} examines` }));
    }
    results.push(...out.map((r) => withReductionNotes(audit, r)));
    results.push(...skipped);
    onCheck?.(done + 1, selection.length, selected.definition.id);
  }
  return results;
}

/**
 * `datasets:` under a check limits it to the named datasets and the members of the named sweeps and
 * series; every other dataset gets a not-applicable result that says it was skipped and why, so the
 * report and the result document show the choice.
 */
export function restrictDatasets(audit: IngestedAudit, selected: SelectedCheck): { included: IngestedAudit; skipped: CheckResult[] } {
  const names = selected.options.datasets;
  if (!Array.isArray(names)) return { included: audit, skipped: [] };
  const wanted = new Set(names as string[]);
  const keep = (d: IngestedAudit["datasets"][number]): boolean => {
    const groups = d.config as { sweep?: string; series?: string };
    return wanted.has(d.id) || (groups.sweep !== undefined && wanted.has(groups.sweep)) || (groups.series !== undefined && wanted.has(groups.series));
  };
  const id = selected.definition.id;
  const where = `audit.yaml checks[${selected.index}].${id}.datasets`;
  const skipped = audit.datasets
    .filter((d) => !keep(d))
    .map((d) =>
      notApplicableResult({
        check: id,
        dataset: d.id,
        reason: `skipped: ${where} limits ${id} to ${(names as string[]).join(", ")}`,
        summary: `Skipped by choice: ${where} limits ${id} to ${(names as string[]).join(", ")}, which does not include this dataset.`,
        values: { skipped: true, selected: names },
      }),
    );
  return { included: { ...audit, datasets: audit.datasets.filter(keep) }, skipped };
}

/** Checks whose failure coarse pooling can fake: they test exact relations through nonlinear averages. */
const POOLING_SENSITIVE = new Set(["exchange-fluctuation", "weighted-identity", "fluctuation-dissipation"]);

/**
 * A check on a dataset summarised while read (large files) states how, among
 * its assumptions; and where the cells are wider than FAITHFUL_CELL_WIDTH, a
 * failure of a relation that pooling can fake is not reported as a violation.
 */
function withReductionNotes(audit: IngestedAudit, result: CheckResult): CheckResult {
  const notes: string[] = [];
  let widest = 0;
  for (const d of audit.datasets) {
    if (d.kind !== "samples" || d.reduction === null) continue;
    if (d.id !== result.dataset && d.config.sweep !== result.dataset && d.config.series !== result.dataset) continue;
    notes.push(describeReduction(d)!);
    widest = Math.max(widest, d.reduction.steps.sigma, d.reduction.steps.betaW ?? 0);
  }
  if (!notes.length) return result;
  const noted = { ...result, assumptions: [...result.assumptions, ...notes] };
  if (result.status !== "fail" || !POOLING_SENSITIVE.has(result.check) || widest <= FAITHFUL_CELL_WIDTH) return noted;
  const reason = `the file was summarised into cells ${fmt(widest, 3)} k_B wide in Σ (more distinct realisations than the summary holds), and pooling that coarse can by itself produce a departure of this size; the departure found was: ${result.summary} Audit a part of the file (fewer realisations) or data printed with fewer distinct values to decide.`;
  return { ...noted, status: "inconclusive", reason, summary: `Inconclusive: ${reason}` };
}
export function resultDocumentOf(audit: IngestedAudit, checks: CheckResult[]): ResultDocument {
  const d = audit.definition;
  return {
    audit: d.id,
    title: d.title,
    authors: d.authors,
    ...(d.license !== undefined ? { license: d.license } : {}),
    ...(d.description !== undefined ? { description: d.description } : {}),
    ...(d.device !== undefined ? { device: d.device } : {}),
    ...(d.date !== undefined ? { date: d.date } : {}),
    ...(d.doi !== undefined ? { doi: d.doi } : {}),
    tool: { ...TOOL },
    fingerprint: fingerprintOf(audit),
    stamp: stampOf(checks),
    settings: d.settings,
    ...(d.display !== undefined ? { display: d.display } : {}),
    datasets: audit.datasets.map((x) => ({ id: x.id, file: x.file, sha256: x.sha256, rows: x.rows, ...("energyUnit" in x ? { energy_unit: x.energyUnit.name } : {}), ...(x.format ? { format: x.format } : {}) })),
    checks,
  };
}

/** audit folder → result document. */
export async function runAudit(dir: string, options: IngestOptions = {}): Promise<{ audit: IngestedAudit; result: ResultDocument }> {
  const audit = await ingestAudit(dir, options);
  return { audit, result: resultDocumentOf(audit, runChecks(audit)) };
}
