import type { CheckResult, Status, TableSpec } from "../checks/types.ts";
import { CHECKS } from "../checks/index.ts";
import { fmt } from "../checks/helpers.ts";
import { renderEquation } from "./equations.ts";
import { renderMarkdown } from "./markdown.ts";
import { renderPlot } from "./plots/renderPlot.ts";
import { statusCounts, type ResultDocument } from "./resultDocument.ts";
import type { PageVersioning } from "./versionView.ts";

export const STATUS_LABEL: Record<Status, string> = {
  pass: "Pass",
  fail: "Fail",
  inconclusive: "Inconclusive",
  "not-applicable": "Not applicable",
  info: "Information",
};

/** A text symbol for each status, so that status never rests on colour alone. */
export const STATUS_SYMBOL: Record<Status, string> = { pass: "✓", fail: "✗", inconclusive: "?", "not-applicable": "–", info: "i" };

export interface TableView {
  id: string;
  title: string;
  headers: string[];
  rows: string[][];
}

export interface CheckView {
  anchor: string;
  check: string;
  title: string;
  dataset: string;
  status: Status;
  statusLabel: string;
  statusSymbol: string;
  summary: string;
  reason?: string;
  criteria: string;
  assumptions: string[];
  references: string[];
  equationsHtml: string[];
  tables: TableView[];
  plots: { id: string; title: string; alt: string; svg: string }[];
}

export interface AuditPageModel {
  id: string;
  title: string;
  authors: { name: string; orcid?: string; orcidUrl?: string; affiliation?: string }[];
  authorNames: string;
  license?: string;
  descriptionHtml: string;
  device?: string;
  date?: string;
  doi?: string;
  stamp: string;
  stampLabel: string;
  stampSymbol: string;
  fingerprint: string;
  tool: { name: string; version: string };
  settings: ResultDocument["settings"];
  counts: Record<Status, number>;
  checks: CheckView[];
  datasets: ResultDocument["datasets"];
  result: ResultDocument;
  /** Where this page sits among the published versions (absent outside a site build). */
  versioning?: PageVersioning;
}

function formatCell(v: unknown): string {
  if (v === null || v === undefined) return "—";
  if (typeof v === "number") return fmt(v);
  if (typeof v === "boolean") return v ? "yes" : "no";
  return String(v);
}

export function tableView(t: TableSpec): TableView {
  return {
    id: t.id,
    title: t.title,
    headers: t.columns.map((c) => (c.unit ? `${c.label} (${c.unit})` : c.label)),
    rows: t.rows.map((r) => t.columns.map((c) => formatCell(r[c.key]))),
  };
}

function criteriaText(c: CheckResult["criteria"]): string {
  const parts: string[] = [];
  if (c.alpha !== undefined) parts.push(`α = ${c.alpha}`);
  if (c.margin !== undefined) parts.push(`margin ${c.margin}`);
  if (c.confidence !== undefined) parts.push(`confidence ${c.confidence * 100}%`);
  return parts.join(", ");
}

const TITLES = new Map(CHECKS.map((c) => [c.id as string, c.title]));

/** The page anchor of a check's section before duplicates are numbered. */
function anchorOf(c: CheckResult): string {
  return `${c.check}-${c.dataset}`.toLowerCase().replace(/[^a-z0-9_-]+/g, "-");
}

/**
 * The view of one check. `anchor` must be unique on the page; `plotOrdinal`
 * numbers its plots among the page's (element ids then depend only on the
 * page, so the same result always gives the same bytes).
 */
export function checkView(c: CheckResult, anchor = anchorOf(c), plotOrdinal?: () => number): CheckView {
  return {
    anchor,
    check: c.check,
    title: TITLES.get(c.check) ?? c.check,
    dataset: c.dataset,
    status: c.status,
    statusLabel: STATUS_LABEL[c.status],
    statusSymbol: STATUS_SYMBOL[c.status],
    summary: c.summary,
    ...(c.reason ? { reason: c.reason } : {}),
    criteria: criteriaText(c.criteria ?? {}),
    // Frozen results from older tool versions may lack members added since; show what they have.
    assumptions: c.assumptions ?? [],
    references: c.references ?? [],
    equationsHtml: (c.equations ?? []).map((tex) => renderEquation(tex, true)),
    tables: (c.tables ?? []).map(tableView),
    plots: (c.plots ?? []).map((p) => ({ id: `${anchor}-${p.id}`, title: p.title, alt: p.alt, svg: renderPlot(p, `${anchor}-`, plotOrdinal?.()) })),
  };
}

/** Everything a report page shows, precomputed: equations typeset, plots drawn, numbers formatted. */
export function auditPageModel(doc: ResultDocument, versioning?: PageVersioning): AuditPageModel {
  const seen = new Map<string, number>();
  let plots = 0;
  const nextPlot = () => ++plots;
  const checks = doc.checks.map((c) => {
    const base = anchorOf(c);
    const n = seen.get(base) ?? 0;
    seen.set(base, n + 1);
    return checkView(c, n > 0 ? `${base}-${n + 1}` : base, nextPlot);
  });
  return {
    id: doc.audit,
    title: doc.title,
    authors: doc.authors.map((a) => ({ ...a, ...(a.orcid ? { orcidUrl: `https://orcid.org/${a.orcid}` } : {}) })),
    authorNames: doc.authors.map((a) => a.name).join(", "),
    ...(doc.license ? { license: doc.license } : {}),
    descriptionHtml: renderMarkdown(doc.description),
    ...(doc.device ? { device: doc.device } : {}),
    ...(doc.date ? { date: doc.date } : {}),
    ...(doc.doi ? { doi: doc.doi } : {}),
    stamp: doc.stamp,
    stampLabel: STATUS_LABEL[doc.stamp],
    stampSymbol: STATUS_SYMBOL[doc.stamp],
    fingerprint: doc.fingerprint,
    tool: doc.tool,
    settings: doc.settings,
    counts: statusCounts(doc.checks),
    checks,
    datasets: doc.datasets,
    result: doc,
    ...(versioning ? { versioning } : {}),
  };
}
