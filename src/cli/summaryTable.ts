import pc from "picocolors";
import type { ResultDocument } from "../report/resultDocument.ts";
import type { Status } from "../checks/types.ts";
import { displayContextFor } from "../report/format/displayContext.ts";
import { plainNotation } from "../report/format/notation.ts";
import { rewriteNumbers } from "../report/format/rewriteNumbers.ts";

const MARK: Record<Status, string> = { pass: "✓ pass", fail: "✗ fail", inconclusive: "? inconclusive", "not-applicable": "– n/a", info: "i info" };

function paint(status: Status | "pass" | "fail" | "inconclusive", text: string, color: boolean): string {
  if (!color) return text;
  switch (status) {
    case "pass":
      return pc.green(text);
    case "fail":
      return pc.red(text);
    case "inconclusive":
      return pc.yellow(text);
    default:
      return pc.dim(text);
  }
}

function wrap(text: string, width: number): string[] {
  // Breaks only at ordinary spaces: the narrow no-break spaces inside numbers and before units hold.
  const words = text.split(/[ \t\n]+/);
  const lines: string[] = [];
  let line = "";
  for (const w of words) {
    if (line && line.length + 1 + w.length > width) {
      lines.push(line);
      line = w;
    } else line = line ? `${line} ${w}` : w;
  }
  if (line) lines.push(line);
  return lines.length ? lines : [""];
}

/**
 * A summary as the terminal shows it: numbers in display units and without
 * e-notation, notation in its plain form with Unicode sub- and superscripts
 * where they exist (the report typesets the same text).
 */
export function terminalSummary(doc: ResultDocument, summary: string, dataset: string): string {
  return plainNotation(rewriteNumbers(summary, displayContextFor(doc, dataset)));
}

/** A plain-text table of every check and its verdict, for the terminal. */
export function summaryTable(doc: ResultDocument, color: boolean, width = 100): string {
  const rows = doc.checks.map((c) => [c.check, c.dataset, MARK[c.status], terminalSummary(doc, c.summary, c.dataset), c.status] as const);
  const w0 = Math.max(5, ...rows.map((r) => r[0].length));
  const w1 = Math.max(7, ...rows.map((r) => r[1].length));
  const w2 = 14;
  const w3 = Math.max(30, width - w0 - w1 - w2 - 6);
  const out: string[] = [];
  out.push(`${doc.title}  [${doc.audit}]`);
  out.push(`${"check".padEnd(w0)}  ${"dataset".padEnd(w1)}  ${"status".padEnd(w2)}  summary`);
  out.push(`${"-".repeat(w0)}  ${"-".repeat(w1)}  ${"-".repeat(w2)}  ${"-".repeat(Math.min(w3, 40))}`);
  for (const [check, dataset, mark, summary, status] of rows) {
    const lines = wrap(summary, w3);
    out.push(`${check.padEnd(w0)}  ${dataset.padEnd(w1)}  ${paint(status, mark.padEnd(w2), color)}  ${lines[0]}`);
    for (const l of lines.slice(1)) out.push(`${"".padEnd(w0)}  ${"".padEnd(w1)}  ${"".padEnd(w2)}  ${l}`);
  }
  out.push("");
  out.push(`stamp: ${paint(doc.stamp, doc.stamp.toUpperCase(), color)}   fingerprint: ${doc.fingerprint}`);
  return out.join("\n");
}
