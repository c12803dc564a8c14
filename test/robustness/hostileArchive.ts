/**
 * An archive whose every free-text field a user controls carries markup that
 * would run or inject elements if it were not escaped: title, author name and
 * affiliation, device, keywords, description (with raw HTML and links of every
 * scheme), the archive's own name and publisher, a sweep name that reaches
 * check summaries, and a CSV header that reaches the error shown for an audit
 * that cannot be run. Each payload opens a dialog, sets `window.__injected` or
 * adds an element with the class `injected`, so a browser test can see whether
 * any ran.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { VALID_CSV } from "./harness.ts";

export const PAYLOADS = {
  title: `Dot <script>alert("title")</script> & "quoted" 'single'`,
  author: `<img class="injected" src="x" onerror="window.__injected = 'author'">`,
  affiliation: `</span><script>window.__injected = "affiliation"</script><span>`,
  device: `<b class="injected" onmouseover="window.__injected = 'device'">VQ-X</b>`,
  keyword: `<svg class="injected" onload="window.__injected = 'keyword'"></svg>`,
  sweep: `<iframe class="injected" src="javascript:window.__injected='sweep'"></iframe>`,
  archiveName: `Lab <script>window.__injected = "archive"</script>`,
  publisher: `<style>body { display: none }</style>Varga Cryogenic Transport Laboratory`,
  header: `<img class="injected" src=x onerror="window.__injected='header'">`,
} as const;

/** Markdown description: raw HTML, a javascript: link, a data: image, a web link and a relative link, TeX that would link. */
export const DESCRIPTION = [
  `<script>alert("description")</script>`,
  ``,
  `<div class="injected" onclick="window.__injected='div'">raw block</div>`,
  ``,
  `A [bad link](javascript:window.__injected='link'), an image ![x](data:image/svg+xml;base64,PHN2Zy8+),`,
  `a [web link](https://example.org/report) and a [relative link](data/run.csv).`,
  ``,
  `Inline TeX is not typeset: $\\href{javascript:window.__injected='tex'}{x}$.`,
].join("\n");

/** YAML double-quoted scalar of any text (JSON strings are valid YAML). */
const q = (text: string) => JSON.stringify(text);

function hostileAuditYaml(id: string, withSweep: boolean): string {
  return `id: ${id}
title: ${q(PAYLOADS.title)}
authors:
  - { name: ${q(PAYLOADS.author)}, affiliation: ${q(PAYLOADS.affiliation)} }
device: ${q(PAYLOADS.device)}
keywords: [${q(PAYLOADS.keyword)}]
description: ${q(DESCRIPTION)}
datasets:
  - id: run-1
    kind: samples
    file: data/run.csv
    description: ${q(PAYLOADS.title)}
    columns: { Q: q, dN: n }
    energy_unit: meV
    reservoirs: { A: { T: 1.3, mu: 0 }, B: { T: 1.0, mu: 0 } }
    tau: 2.0e-9
    work: zero
${withSweep ? `    sweep: ${q(PAYLOADS.sweep)}\n` : ""}`;
}

/**
 * Write the archive into a new temporary folder: `audits/hostile-text` (runs),
 * `audits/hostile-broken` (its CSV lacks the mapped column, so its error, which
 * quotes the header, is shown on the index) and a hostile archive.yaml.
 */
export function makeHostileArchive(): string {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-hostile-"));
  fs.writeFileSync(path.join(root, "archive.yaml"), `name: ${q(PAYLOADS.archiveName)}\npublisher: ${q(PAYLOADS.publisher)}\n`);
  const write = (folder: string, yaml: string, csv: string) => {
    const dir = path.join(root, "audits", folder);
    fs.mkdirSync(path.join(dir, "data"), { recursive: true });
    fs.writeFileSync(path.join(dir, "audit.yaml"), yaml);
    fs.writeFileSync(path.join(dir, "data", "run.csv"), csv);
  };
  // A few dozen realisations so that the checks produce summaries (and the sweep check names the sweep).
  const rows = Array.from({ length: 60 }, (_, i) => `${((i % 7) - 2) * 0.05},${(i % 3) - 1}`).join("\n");
  write("hostile-text", hostileAuditYaml("hostile-text", true), `q,n\n${rows}\n`);
  write("hostile-broken", hostileAuditYaml("hostile-broken", false), VALID_CSV.replace("q,n", `q,${PAYLOADS.header.replaceAll('"', "'")}`));
  return root;
}
