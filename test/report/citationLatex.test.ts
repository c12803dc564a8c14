/**
 * Issue 22 item 7, checked by the programs a reader runs: the BibTeX entry
 * with hostile text goes through BibTeX 0.99d (style plain) and pdfLaTeX, and
 * the text of the printed reference (pdftotext, poppler-utils) reads exactly
 * as written in audit.yaml. BibTeX counts braces its own way (Patashnik,
 * BibTeXing, 1988, §4), so this is what proves the escaping. Needs texlive and
 * poppler-utils (.ci/run installs both); skipped where they are missing.
 */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import type { ArchiveDefinition } from "../../src/config/archiveSchema.ts";
import { bibtexEntry, citationSubject } from "../../src/report/citation/index.ts";
import type { ResultDocument } from "../../src/report/resultDocument.ts";

const has = (program: string) => spawnSync("sh", ["-c", `command -v ${program}`]).status === 0;
const tools = has("bibtex") && has("pdflatex") && has("pdftotext");

// Latin-1 letters only: pdfLaTeX's T1 fonts have no Σ or ⟨ (LuaLaTeX with a Unicode font would).
const TITLE = "Close } then open { and {FORGED}, \"quoted\" ''single'' \\textbf{x} 100% #1 $x$ a_b ^~ <|> & -- ?` !`\nsecond line Ümlaut";

const result = {
  audit: "dot-lab-exchange",
  title: TITLE,
  authors: [{ name: "Tom and Jerry Smith" }, { name: "Smith, John, Jr" }, { name: "Ana 100% Beltrão\\x" }],
  license: "CC-BY-4.0},note={forged",
  tool: { name: "transport-audit", version: "0.1.0" },
  fingerprint: `sha256:${"5a".repeat(32)}`,
  stamp: "pass",
  settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 },
  datasets: [],
  checks: [],
} as ResultDocument;
const archive: ArchiveDefinition = { name: "Archive #1 & {two}", publisher: "P & Q", license: "CC-BY-4.0" };

function run(cwd: string, program: string, args: string[]): string {
  const r = spawnSync(program, args, { cwd, encoding: "utf8", timeout: 120_000 });
  if (r.status !== 0) throw new Error(`${program} ${args.join(" ")} exited ${r.status}:\n${r.stdout}\n${r.stderr}`);
  return r.stdout;
}

describe.skipIf(!tools)("BibTeX entry through BibTeX and pdfLaTeX", () => {
  it("prints every field as written: three authors, the whole title, no forged field", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-bibtex-"));
    fs.writeFileSync(path.join(dir, "refs.bib"), bibtexEntry(citationSubject(result, { number: 3, date: "2026-12-01" }, archive)));
    fs.writeFileSync(path.join(dir, "doc.aux"), "\\relax\n\\citation{dot-lab-exchange-v3}\n\\bibstyle{plain}\n\\bibdata{refs}\n");
    const log = run(dir, "bibtex", ["doc"]);
    expect(log).not.toMatch(/Warning|error message/);
    fs.writeFileSync(path.join(dir, "doc.tex"), "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n\\usepackage{lmodern}\n\\input{glyphtounicode}\\pdfgentounicode=1\n\\begin{document}\n\\input{doc.bbl}\n\\end{document}\n");
    run(dir, "pdflatex", ["-interaction=nonstopmode", "-halt-on-error", "doc.tex"]);
    const printed = run(dir, "pdftotext", ["doc.pdf", "-"])
      // TeX prints ' and ` as typographic single quotes, which is right for O'Brien; what matters is that
      // two of them stay two (no ” or “ ligature), as `--` stays two hyphens.
      .replace(/\u2019/g, "'")
      .replace(/\u2018/g, "`")
      .replace(/\s+/g, " ")
      .replace(/ 1 $/, " ") // the page number
      .trim();
    expect(printed).toBe(
      "References [1] Tom and Jerry Smith, John, Jr Smith, and Ana 100% Beltrão\\x. " +
        "Close } then open { and {FORGED}, \"quoted\" ''single'' \\textbf{x} 100% #1 $x$ a_b ^~ <|> & -- ?` !` second line Ümlaut. " +
        "Transport audit report dot-lab-exchange, version 3, Archive #1 & {two}, December 2026. " +
        `Published 2026-12-01; overall verdict pass; fingerprint sha256:${"5a".repeat(32)}; licence CC-BY-4.0},note={forged; ` +
        "verify with transport-audit verify audits/dot-lab-exchange --version 3.",
    );
  });
});
