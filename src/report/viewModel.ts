import type { CheckResult, Status, TableSpec } from "../checks/types.ts";
import { CHECKS } from "../checks/index.ts";
import { renderEquation } from "./equations.ts";
import { displayContextFor } from "./format/displayContext.ts";
import type { DisplayContext } from "./format/displayUnit.ts";
import { labelHtml, notationHtml } from "./format/notationHtml.ts";
import { tableDisplay } from "./format/tableDisplay.ts";
import { displayPlotSpec } from "./plots/displayPlot.ts";
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
  /** The caption typeset (HTML). */
  titleHtml: string;
  /** Header label and unit (HTML), numeric columns marked for right alignment. */
  headers: { label: string; unit: string; numeric: boolean }[];
  /** Cells as HTML: numbers in display units, notation typeset. */
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
  /** The summary for the page: numbers in display units, notation typeset (HTML). */
  summaryHtml: string;
  reason?: string;
  reasonHtml?: string;
  criteria: string;
  assumptions: string[];
  references: string[];
  equationsHtml: string[];
  tables: TableView[];
  plots: { id: string; title: string; alt: string; titleHtml: string; altHtml: string; svg: string }[];
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

export function tableView(t: TableSpec, ctx: DisplayContext = {}): TableView {
  const shown = tableDisplay(t, ctx);
  return { id: t.id, title: t.title, titleHtml: notationHtml(t.title, ctx), headers: shown.headers, rows: shown.rows };
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
export function checkView(c: CheckResult, anchor = anchorOf(c), plotOrdinal?: () => number, ctx: DisplayContext = {}): CheckView {
  return {
    anchor,
    check: c.check,
    title: TITLES.get(c.check) ?? c.check,
    dataset: c.dataset,
    status: c.status,
    statusLabel: STATUS_LABEL[c.status],
    statusSymbol: STATUS_SYMBOL[c.status],
    summary: c.summary,
    summaryHtml: notationHtml(c.summary, ctx),
    ...(c.reason ? { reason: c.reason, reasonHtml: notationHtml(c.reason, ctx) } : {}),
    criteria: criteriaText(c.criteria ?? {}),
    // Frozen results from older tool versions may lack members added since; show what they have.
    assumptions: c.assumptions ?? [],
    references: c.references ?? [],
    equationsHtml: (c.equations ?? []).map((tex) => renderEquation(tex, true)),
    tables: (c.tables ?? []).map((t) => tableView(t, ctx)),
    plots: (c.plots ?? []).map((p) => ({
      id: `${anchor}-${p.id}`,
      title: p.title,
      alt: p.alt,
      titleHtml: labelHtml(p.title),
      altHtml: notationHtml(p.alt, ctx),
      svg: renderPlot(displayPlotSpec(p, ctx), `${anchor}-`, plotOrdinal?.()),
    })),
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
    return checkView(c, n > 0 ? `${base}-${n + 1}` : base, nextPlot, displayContextFor(doc, c.dataset));
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
