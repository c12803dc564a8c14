/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import { el, enablePanel, part } from "./dom.ts";
import { runInWorker } from "./engineClient.ts";
import { PanelState } from "./panelState.ts";
import { auditFiles, chosenFiles, droppedFiles, type PathedFile } from "./readDropped.ts";
import { acceptDrops, showError } from "./rerunPanel.ts";
import { byteSizeText } from "../../report/format/byteSize.ts";
import type { ResultDocument } from "../../report/resultDocument.ts";

/**
 * The index page's panel for a reader's own audit folder: the files are read
 * here, audited by the engine's worker (the checks `run` runs, with the same
 * streaming summaries for large files) and the report is rendered on the page
 * by the report's own view model and templates (report-render.js, loaded when
 * first needed). Nothing leaves the browser.
 */
export function wireDropInPanel(root: HTMLElement): void {
  const ui = new PanelState(root);
  const worker = root.dataset.worker ?? "";
  const renderUrl = root.dataset.render ?? "";
  let given: PathedFile[] = [];
  enablePanel(root);

  const choose = (files: PathedFile[]) => {
    given = files;
    const bytes = files.reduce((s, f) => s + f.file.size, 0);
    ui.run.disabled = files.length === 0;
    ui.say(files.length ? `${files.length} file(s), ${byteSizeText(bytes)}, ready to be audited.` : "");
  };
  const zone = part(root, "[data-drop-zone]");
  for (const input of zone.querySelectorAll<HTMLInputElement>("input[type=file]")) input.addEventListener("change", () => choose(chosenFiles(input.files)));
  acceptDrops(zone, async (transfer) => choose(await droppedFiles(transfer)));

  ui.run.addEventListener("click", async () => {
    const signal = ui.begin();
    try {
      ui.say("Reading the files.");
      const files = await auditFiles(given);
      const json = await runInWorker(worker, files, signal, (p) => ui.engine(p));
      ui.say("Rendering the report.");
      const { renderReport } = (await import(/* @vite-ignore */ new URL(renderUrl, document.baseURI).href)) as { renderReport: (doc: ResultDocument) => string };
      const doc = JSON.parse(json) as ResultDocument;
      const report = el("div", { class: "dropin-report" });
      // The report's own templates escape every text they insert (autoescape), as on the site's pages.
      report.innerHTML = renderReport(doc);
      const download = el("a", { href: URL.createObjectURL(new Blob([json], { type: "application/json" })), download: "result.json", "data-result-json": "" }, "result.json");
      ui.outcome.replaceChildren(
        el(
          "p",
          {},
          `Audit ${doc.audit} computed in this browser with ${doc.tool.name} ${doc.tool.version}: nothing was sent anywhere. The result document (the one `,
          el("code", {}, "run --json"),
          " prints, in the canonical form ",
          el("code", {}, "publish"),
          " freezes): ",
          download,
          ".",
        ),
        report,
      );
      ui.say(`Done: ${doc.checks.length} check result(s), overall verdict ${doc.stamp}. The report follows below.`);
    } catch (err) {
      showError(ui, err);
    } finally {
      ui.end();
      ui.run.disabled = given.length === 0;
    }
  });
}
