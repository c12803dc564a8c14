import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { loadArchiveDefinition, type ArchiveDefinition } from "../../config/archiveSchema.ts";
import { renderSite } from "../buildSite.ts";
import { runAudit } from "../runAudit.ts";
import { auditPageModel, type AuditPageModel } from "../viewModel.ts";
import { chromiumPath, launchChromium } from "./launchChromium.ts";
import { footerTemplate, headerTemplate } from "./printTemplates.ts";
import { refuseUnsafePdfTarget, writeFileReplacing } from "../../output/pdfTarget.ts";
import { onInterrupt } from "../../interrupt/cancellation.ts";
import { compactPageHtml } from "./compactPage.ts";

export interface PdfOptions {
  auditDir: string;
  /** Output file; default `<audit-id>.pdf` in the current folder. */
  out?: string;
  /** Chromium executable; default TRANSPORT_AUDIT_CHROMIUM or /usr/bin/chromium. */
  chromium?: string;
  /** The compact form: one page per dataset with its verdicts, key numbers and two most telling plots. */
  compact?: boolean;
}

export interface PdfOutcome {
  file: string;
  bytes: number;
  audit: AuditPageModel;
}

/** The archive an audit folder belongs to, when it sits in `<root>/audits/<id>`; otherwise the plain default. */
function archiveOf(auditDir: string): ArchiveDefinition {
  const parent = path.dirname(auditDir);
  const root = path.basename(parent) === "audits" ? path.dirname(parent) : auditDir;
  return loadArchiveDefinition(root);
}

/**
 * Print one audit's report to PDF: run the audit, render its report page as
 * the site would into a temporary folder, and let headless Chromium print it
 * with the report's print stylesheet (A4, vector plots and equations, fonts
 * embedded), a running header with the audit id and fingerprint, and page
 * numbers in the footer.
 */
export async function printAuditPdf(options: PdfOptions): Promise<PdfOutcome> {
  const auditDir = path.resolve(options.auditDir);
  // Refuse before any work when there is no browser to print with.
  const chromium = chromiumPath(options.chromium);
  const { result } = await runAudit(auditDir);
  const audit = auditPageModel(result);
  const out = path.resolve(options.out ?? `${audit.id}.pdf`);
  refuseUnsafePdfTarget(out, options.out ?? `${audit.id}.pdf`);
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-pdf-"));
  const forget = onInterrupt(() => fs.rmSync(tmp, { recursive: true, force: true }));
  try {
    await renderSite(tmp, { archive: archiveOf(auditDir), audits: [audit], broken: [] });
    const { browser, close } = await launchChromium(chromium);
    try {
      const page = await browser.newPage();
      await page.emulateMedia({ media: "print", colorScheme: "light" });
      let pageFile = path.join(tmp, audit.id, "index.html");
      if (options.compact) {
        pageFile = path.join(tmp, audit.id, "compact.html");
        fs.writeFileSync(pageFile, compactPageHtml(audit, "../"));
      }
      await page.goto(pathToFileURL(pageFile).href, { waitUntil: "load" });
      await page.evaluate("document.fonts.ready.then(() => true)");
      const pdf = await page.pdf({
        format: "A4",
        printBackground: true,
        displayHeaderFooter: true,
        headerTemplate: headerTemplate(audit.id, audit.fingerprint),
        footerTemplate: footerTemplate(audit.tool),
        margin: { top: "18mm", bottom: "18mm", left: "16mm", right: "16mm" },
        tagged: true,
        outline: true,
      });
      await writeFileReplacing(out, pdf, "pdf:printed");
      return { file: out, bytes: pdf.length, audit };
    } finally {
      await close();
    }
  } finally {
    fs.rmSync(tmp, { recursive: true, force: true });
    forget();
  }
}
