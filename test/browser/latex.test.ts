/**
 * The LaTeX supplement compiles, and its macros print the result document's
 * numbers. Each demo audit is run, its `checks-table.tex` and
 * `checks-macros.tex` are written as a version would offer them, and a small
 * document that loads both is compiled with pdfLaTeX and with LuaLaTeX
 * (Debian: texlive-latex-base, texlive-latex-recommended, texlive-science for
 * siunitx, texlive-luatex, texlive-fonts-recommended, lmodern). The printed
 * PDF is read back with pdftotext (poppler-utils) as an independent reader,
 * and every figure is compared with the value in the result document,
 * formatted here by plain `toPrecision` (not by the module under test).
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { loadArchiveDefinition } from "../../src/config/archiveSchema.ts";
import { findAuditFolders } from "../../src/report/buildSite.ts";
import { checksMacrosTex, checksTableTex, citationSubject, macroNameOf } from "../../src/report/citation/index.ts";
import { figuresOfResult } from "../../src/report/citation/latexMacros.ts";
import { LATEX_PACKAGES } from "../../src/report/citation/latexTable.ts";
import type { ResultDocument } from "../../src/report/resultDocument.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { PROJECT_ROOT } from "./demoSite.ts";

let tmp: string;
const results: ResultDocument[] = [];

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-latex-"));
  for (const dir of findAuditFolders(PROJECT_ROOT)) results.push((await runAudit(dir)).result);
});

afterAll(() => {
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

const archive = () => loadArchiveDefinition(PROJECT_ROOT);
const subjectOf = (r: ResultDocument) => citationSubject(r, { number: 1, date: "2026-12-02" }, archive());

/** Compile `main.tex` in a folder of its own; the log is returned on failure so the assertion shows the TeX error. */
function compile(engine: "pdflatex" | "lualatex", dir: string): { ok: boolean; log: string } {
  try {
    execFileSync(engine, ["-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape", "main.tex"], { cwd: dir, stdio: "pipe", timeout: 240_000 });
    return { ok: true, log: "" };
  } catch {
    const log = fs.existsSync(path.join(dir, "main.log")) ? fs.readFileSync(path.join(dir, "main.log"), "utf8") : "";
    return { ok: false, log: log.split("\n").filter((l) => l.startsWith("!") || l.startsWith("l.")).join("\n") || log.slice(-2000) };
  }
}

function documentWith(files: Record<string, string>, body: string): string {
  const dir = fs.mkdtempSync(path.join(tmp, "doc-"));
  for (const [name, text] of Object.entries(files)) fs.writeFileSync(path.join(dir, name), text);
  fs.writeFileSync(
    path.join(dir, "main.tex"),
    [`\\documentclass{article}`, `\\usepackage{lmodern}`, `\\usepackage{${LATEX_PACKAGES.join(",")}}`, `\\begin{document}`, body, `\\end{document}`, ""].join("\n"),
  );
  return dir;
}

describe("LaTeX supplement", () => {
  for (const engine of ["pdflatex", "lualatex"] as const) {
    test(`every demo audit's table and macros compile with ${engine}`, () => {
      for (const r of results) {
        const s = subjectOf(r);
        const dir = documentWith(
          { "checks-table.tex": checksTableTex(r, s), "checks-macros.tex": checksMacrosTex(r, s) },
          `\\input{checks-macros.tex}\n\\input{checks-table.tex}\nOverall: \\${macroNameOf(r.audit)}{stamp}.`,
        );
        const out = compile(engine, dir);
        expect(out.log, `${r.audit} with ${engine}`).toBe("");
        expect(out.ok).toBe(true);
      }
    });
  }

  test("the written files are plain ASCII (nothing for pdfLaTeX's input encoding to refuse)", () => {
    for (const r of results) {
      const s = subjectOf(r);
      expect(/[^\x00-\x7f]/.exec(checksTableTex(r, s) + checksMacrosTex(r, s).replace(/^%.*$/gm, ""))?.[0], r.audit).toBeUndefined();
    }
  });

  test("the macros print the values of the result document", () => {
    const lines: string[] = [];
    const expected: [string, string][] = [];
    const four = (x: number) => String(Number(x.toPrecision(4))).replace("-", "−");
    for (const r of results) {
      const cmd = macroNameOf(r.audit);
      lines.push(`\\noindent[${r.audit}/stamp]=\\${cmd}{stamp}\\par`);
      expected.push([`[${r.audit}/stamp]`, r.stamp]);
      for (const c of r.checks) {
        const base = `${c.check}/${c.dataset}`;
        lines.push(`\\noindent[${r.audit}/${base}/verdict]=\\${cmd}{${base}/verdict}\\par`);
        expected.push([`[${r.audit}/${base}/verdict]`, c.status]);
        const v = c.values as Record<string, unknown>;
        if (c.check === "exchange-fluctuation" && typeof v.slope === "number") {
          lines.push(`\\noindent[${r.audit}/${base}/slope]=\\${cmd}{${base}/slope}\\par`);
          expected.push([`[${r.audit}/${base}/slope]`, four(v.slope)]);
          const eff = v.effective_reservoirs as Record<string, number | null> | undefined;
          if (eff && typeof eff.T_A === "number") {
            lines.push(`\\noindent[${r.audit}/${base}/effective-TA]=\\${cmd}{${base}/effective-TA}\\par`);
            // Below 1 K in millikelvin (the prefix keeping 1 ≤ mantissa < 1000, SI Brochure 9th ed.).
            expected.push([`[${r.audit}/${base}/effective-TA]`, eff.T_A < 1 ? `${four(eff.T_A * 1000)}mK` : `${four(eff.T_A)}K`]);
          }
        }
        if (c.check === "integral-fluctuation" && typeof v.mean === "number") {
          lines.push(`\\noindent[${r.audit}/${base}/mean]=\\${cmd}{${base}/mean}\\par`);
          expected.push([`[${r.audit}/${base}/mean]`, four(v.mean)]);
        }
      }
    }
    // Every figure the file defines prints (none stops the run), and the ones checked above print their values.
    const all = results.flatMap((r) => figuresOfResult(r, subjectOf(r)).map((f) => `\\${macroNameOf(r.audit)}{${f.name}}\\par`));
    const files = Object.fromEntries(results.map((r) => [`${r.audit}.tex`, checksMacrosTex(r, subjectOf(r))]));
    const dir = documentWith(files, [...results.map((r) => `\\input{${r.audit}.tex}`), ...lines, ...all].join("\n"));
    const out = compile("pdflatex", dir);
    expect(out.log).toBe("");
    const text = execFileSync("pdftotext", ["-layout", path.join(dir, "main.pdf"), "-"], { encoding: "utf8" }).replace(/[ \f\u2009\u202f]+/g, "");
    expect(expected.length).toBeGreaterThan(results.length * 2);
    for (const [label, value] of expected) {
      const line = text.split("\n").find((l) => l.startsWith(label.replace(/ /g, "")));
      expect(line, label).toBe(`${label}=${value}`.replace(/ /g, ""));
    }
  });

  test("an unknown figure name stops the LaTeX run with a message naming it", () => {
    const r = results[0];
    const dir = documentWith({ "m.tex": checksMacrosTex(r, subjectOf(r)) }, `\\input{m.tex}\\${macroNameOf(r.audit)}{no-such-figure}`);
    const out = compile("pdflatex", dir);
    expect(out.ok).toBe(false);
    // TeX wraps its log at 79 characters: read the message with the line breaks taken out.
    const log = fs.readFileSync(path.join(dir, "main.log"), "utf8").replace(/\n/g, "");
    expect(log).toContain(`! Package transport-audit Error: No figure 'no-such-figure' in audit ${r.audit}.`);
  });
});
