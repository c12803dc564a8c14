import type { Status } from "../../checks/types.ts";
import { escapeHtml } from "../escape.ts";
import type { AuditPageModel, CheckView } from "../viewModel.ts";

/**
 * Which plots tell most, by check: the law's own test first (the log-ratio of
 * the exchange relation, the running ⟨e^−Σ⟩, the Kelvin relation), then the
 * distributions and sweeps. A failed check's plots come before all others:
 * that is what a referee needs to see.
 */
const TELLING: readonly string[] = [
  "exchange-fluctuation",
  "integral-fluctuation",
  "reciprocity",
  "fluctuation-dissipation",
  "linear-growth",
  "second-law",
  "positivity",
  "weighted-identity",
  "figures-of-merit",
  "lorenz-ratio",
  "uncertainty-relation",
  "work",
];
const STATUS_ORDER: Record<Status, number> = { fail: 0, inconclusive: 1, pass: 2, info: 3, "not-applicable": 4 };

/** The two most telling plots among a dataset's checks (see TELLING). */
export function tellingPlots(checks: readonly CheckView[], count = 2): CheckView["plots"] {
  const rank = (c: CheckView) => STATUS_ORDER[c.status] * 100 + (TELLING.indexOf(c.check) + 1 || 99);
  return [...checks]
    .filter((c) => c.plots.length > 0)
    .sort((a, b) => rank(a) - rank(b))
    .flatMap((c) => (c.check === "exchange-fluctuation" && c.plots.length > 1 ? [c.plots[1], c.plots[0], ...c.plots.slice(2)] : c.plots))
    .slice(0, count);
}

const stamp = (c: { status: Status; statusSymbol: string; statusLabel: string }) =>
  `<span class="stamp stamp-${c.status}"><span class="stamp-symbol" aria-hidden="true">${escapeHtml(c.statusSymbol)}</span> ${escapeHtml(c.statusLabel)}</span>`;

/**
 * The compact printed form: one page per dataset (or group of datasets), each
 * with its checks' verdicts and summaries (the key numbers, in display units)
 * and its two most telling plots. Built from the same page model as the full
 * report, so every number is the one the report shows.
 */
export function compactPageHtml(audit: AuditPageModel, root: string): string {
  const groups = new Map<string, CheckView[]>();
  for (const c of audit.checks) groups.set(c.dataset, [...(groups.get(c.dataset) ?? []), c]);
  const sections = [...groups].map(([dataset, checks]) => {
    const rows = checks
      .map((c) => `<tr><td>${escapeHtml(c.title)}</td><td>${stamp(c)}</td><td>${c.summaryHtml}</td></tr>`)
      .join("");
    const plots = tellingPlots(checks)
      .map((p) => `<figure class="plot-figure">${p.svg}<figcaption><strong>${p.titleHtml}.</strong></figcaption></figure>`)
      .join("");
    return `<section class="compact-dataset"><h2>${escapeHtml(dataset)}</h2><table class="compact-verdicts"><thead><tr><th scope="col">Check</th><th scope="col">Verdict</th><th scope="col">Summary</th></tr></thead><tbody>${rows}</tbody></table><div class="compact-plots">${plots}</div></section>`;
  });
  return [
    "<!doctype html>",
    `<html lang="en" class="compact"><head><meta charset="utf-8"><title>${escapeHtml(audit.title)} (compact)</title>`,
    `<link rel="stylesheet" href="${root}assets/katex/katex.min.css"><link rel="stylesheet" href="${root}assets/style.css"></head>`,
    `<body><main id="main"><article class="report">`,
    `<header class="report-header"><p class="kicker">Transport audit <code>${escapeHtml(audit.id)}</code> · compact form</p><h1>${escapeHtml(audit.title)}</h1>`,
    `<p>Overall verdict: ${stamp({ status: audit.stamp as Status, statusSymbol: audit.stampSymbol, statusLabel: audit.stampLabel })} · ${audit.counts.pass} passed · ${audit.counts.fail} failed · ${audit.counts.inconclusive} inconclusive. Fingerprint <code>${escapeHtml(audit.fingerprint)}</code>. Assumptions, criteria, equations, tables and references are in the full report.</p></header>`,
    ...sections,
    "</article></main></body></html>",
  ].join("\n");
}
