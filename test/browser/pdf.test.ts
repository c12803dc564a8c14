/**
 * `transport-audit pdf`: the printed report, read back with poppler-utils
 * (pdfinfo, pdftotext, pdfimages, pdffonts, pdftoppm) as an independent reader
 * of the PDF. The audit printed is the demo archive's smallest by bytes on
 * disk, whichever that is (the quickest to run twice); expectations come from
 * that audit's own result.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { findAuditFolders } from "../../src/report/buildSite.ts";
import { printAuditPdf, type PdfOutcome } from "../../src/report/pdf/printAuditPdf.ts";
import { main } from "../../src/cli/program.ts";
import { InputError } from "../../src/errors.ts";
import { ARTIFACTS, PROJECT_ROOT } from "./demoSite.ts";

const run = (cmd: string, args: string[]) => execFileSync(cmd, args, { encoding: "utf8" });

/** Text of one page (or all, without a page number), as pdftotext lays it out. */
const textOf = (file: string, page?: number) => run("pdftotext", [...(page ? ["-f", String(page), "-l", String(page)] : []), "-layout", file, "-"]);

/** A grey-scale rendering of one page as a binary PGM (P5), decoded to pixel values. */
function greyPage(file: string, page: number, dpi: number): { width: number; height: number; pixels: Buffer } {
  const buf = execFileSync("pdftoppm", ["-gray", "-r", String(dpi), "-f", String(page), "-l", String(page), file]);
  const header = /^P5\s+(\d+)\s+(\d+)\s+(\d+)\s/.exec(buf.subarray(0, 40).toString("latin1"));
  if (!header) throw new Error("pdftoppm did not return a PGM image");
  const [, w, h] = header.map(Number);
  return { width: w, height: h, pixels: buf.subarray(header[0].length) };
}

/** Bytes of every file below a folder. */
function bytesBelow(dir: string): number {
  return fs.readdirSync(dir, { withFileTypes: true }).reduce((n, e) => n + (e.isDirectory() ? bytesBelow(path.join(dir, e.name)) : fs.statSync(path.join(dir, e.name)).size), 0);
}
const smallestAudit = () => findAuditFolders(PROJECT_ROOT).sort((a, b) => bytesBelow(a) - bytesBelow(b))[0];

let tmp: string;
let outcome: PdfOutcome;
let pages: number;

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-pdf-test-"));
  outcome = await printAuditPdf({ auditDir: smallestAudit(), out: path.join(tmp, "report.pdf") });
  pages = Number(/^Pages:\s+(\d+)/m.exec(run("pdfinfo", [outcome.file]))?.[1]);
});

afterAll(() => {
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

describe("transport-audit pdf", () => {
  test("writes an A4 PDF, tagged for assistive technology, titled with the audit", () => {
    const info = run("pdfinfo", [outcome.file]);
    expect(info.startsWith("Title:")).toBe(true);
    expect(info).toContain(outcome.audit.id);
    // A4 is 210 × 297 mm = 595.3 × 841.9 pt (ISO 216); Chromium rounds its page box up to whole device pixels.
    const [, w, h] = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(info) ?? [];
    expect(Math.abs(Number(w) - 595.3)).toBeLessThan(1.5);
    expect(Math.abs(Number(h) - 841.9)).toBeLessThan(1.5);
    expect(info).toMatch(/^Tagged:\s+yes$/m);
    expect(pages).toBeGreaterThanOrEqual(1);
  });

  test("the first page shows the title, the overall verdict in words, the fingerprint and the limits of a verdict", () => {
    const first = textOf(outcome.file, 1).replace(/\s+/g, " ");
    expect(first).toContain(outcome.audit.title.replace(/\s+/g, " ").slice(0, 30));
    expect(first).toContain(`Overall verdict: ${outcome.audit.stampSymbol} ${outcome.audit.stampLabel}`);
    expect(first.replace(/ /g, "")).toContain(outcome.audit.fingerprint);
    expect(first).toContain("does not certify that the measurement itself is right");
    expect(first).toContain("what more data would settle it");
  });

  test("every page carries the audit id and fingerprint above and its number below", () => {
    for (let p = 1; p <= pages; p++) {
      const text = textOf(outcome.file, p);
      expect(text, `page ${p}`).toContain(`Transport audit ${outcome.audit.id}`);
      expect(text, `page ${p}`).toContain(outcome.audit.fingerprint);
      expect(text, `page ${p}`).toContain(`page ${p} of ${pages}`);
    }
  });

  test("every check is printed with its title, and equations and plots stay vector with embedded fonts", () => {
    const all = textOf(outcome.file).replace(/\s+/g, " ");
    for (const c of outcome.audit.checks) expect(all, c.check).toContain(c.title.replace(/\s+/g, " "));
    // pdfimages lists raster images: plots are SVG and equations text, so there are none.
    const images = run("pdfimages", ["-list", outcome.file]).trim().split("\n").slice(2);
    expect(images).toEqual([]);
    const fonts = run("pdffonts", [outcome.file]).trim().split("\n").slice(2);
    expect(fonts.length).toBeGreaterThan(0);
    // Column "emb": every font is embedded, so the PDF prints the same anywhere.
    for (const line of fonts) expect(line, line).toMatch(/\s+yes\s+(yes|no)\s+(yes|no)\s+\d+\s+\d+$/);
    if (outcome.audit.checks.some((c) => c.equationsHtml.length > 0)) expect(fonts.some((l) => l.includes("KaTeX_"))).toBe(true);
  });

  test("the first page renders to an image with ink on it, kept as a test artefact", () => {
    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const png = path.join(ARTIFACTS, "pdf-page-1");
    fs.rmSync(`${png}.png`, { force: true });
    run("pdftoppm", ["-png", "-singlefile", "-r", "80", "-f", "1", "-l", "1", outcome.file, png]);
    expect(fs.statSync(`${png}.png`).size).toBeGreaterThan(5000);
    // Grey levels: a printed page of text is mostly white paper, with a few per cent of dark ink.
    const { width, height, pixels } = greyPage(outcome.file, 1, 30);
    expect(pixels.length).toBe(width * height);
    const ink = pixels.filter((v) => v < 128).length / pixels.length;
    expect(ink).toBeGreaterThan(0.005);
    expect(ink).toBeLessThan(0.5);
  });

  test("the command line writes the PDF named by --out and exits 0", async () => {
    const file = path.join(tmp, "cli.pdf");
    const code = await main(["pdf", smallestAudit(), "--out", file]);
    expect(code).toBe(0);
    expect(fs.readFileSync(file).subarray(0, 5).toString("latin1")).toBe("%PDF-");
  });

  test("a missing Chromium is an input error that says how to get one", async () => {
    const attempt = printAuditPdf({ auditDir: smallestAudit(), out: path.join(tmp, "never.pdf"), chromium: "/nonexistent/chromium" });
    await expect(attempt).rejects.toBeInstanceOf(InputError);
    await expect(attempt).rejects.toThrow(
      "/nonexistent/chromium: no Chromium there; printing needs a headless Chromium (on Debian: apt-get install chromium), or name another with --chromium <file> or TRANSPORT_AUDIT_CHROMIUM",
    );
    expect(fs.existsSync(path.join(tmp, "never.pdf"))).toBe(false);
  });
});
