/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import type { RerunManifest } from "../../report/versionData.ts";
import { compareResultJson, type ResultJsonComparison } from "../engine/compare.ts";
import { el, enablePanel, part, textTable } from "./dom.ts";
import { EngineError, RunCancelled, runInWorker } from "./engineClient.ts";
import { fetchAll, fetchBytes, fetchText } from "./fetchFiles.ts";
import { PanelState } from "./panelState.ts";
import { sha256Hex, partsDigestHex } from "./sha256.ts";
import { droppedFiles } from "./readDropped.ts";

/**
 * The "re-run here" panel of a published version page: fetch the version's
 * data and frozen result from the site (or take the files a reader dropped,
 * when the data are not on the site), check every file's SHA-256 against the
 * version record, run the checks in the engine's worker and compare the new
 * result document with the frozen one as `verify` does.
 */

/** The fields of version.json the panel reads. */
interface VersionRecord {
  version: number;
  tool: { name: string; version: string };
  inputs: { id: string; file: string; sha256: string; rows: number }[];
}

/** One input's digest as recorded and as found in the files at hand. */
interface DigestCheck {
  dataset: string;
  file: string;
  recorded: string;
  found: string | null;
}

export function wireRerunPanel(root: HTMLElement): void {
  const ui = new PanelState(root);
  const base = root.dataset.base ?? "";
  const worker = root.dataset.worker ?? "";
  const onSite = root.dataset.data === "copied";
  /** Files the reader dropped (when the data are not on the site), by their path in the audit folder. */
  let dropped: Map<string, Uint8Array> | null = null;
  enablePanel(root);

  const zone = root.querySelector<HTMLElement>("[data-drop-zone]");
  if (zone) {
    const input = part<HTMLInputElement>(zone, "[data-file-input]");
    const take = async (files: File[]) => {
      const signal = ui.begin();
      try {
        dropped = await matchDropped(base, files, signal, ui);
        ui.run.disabled = dropped === null;
      } catch (err) {
        showError(ui, err);
      } finally {
        ui.end();
        if (dropped) ui.run.disabled = false;
      }
    };
    input.addEventListener("change", () => void take([...(input.files ?? [])]));
    acceptDrops(zone, async (items) => take((await droppedFiles(items)).map((f) => f.file)));
  }

  ui.run.addEventListener("click", async () => {
    const signal = ui.begin();
    try {
      ui.say("Fetching the version record and the frozen result document.");
      const record = JSON.parse(await fetchText(`${base}version.json`, signal)) as VersionRecord;
      const manifest = JSON.parse(await fetchText(`${base}rerun.json`, signal)) as RerunManifest;
      const frozen = await fetchText(`${base}result.json`, signal);
      const definition = await fetchBytes(`${base}audit.yaml`, signal, () => {});
      let data: Map<string, Uint8Array>;
      if (onSite && manifest.data === "copied") data = await fetchAll(base, manifest.files, signal, (n, total, file) => ui.fetched(n, total, file));
      // The worker takes the buffers it is given: a copy keeps the reader's files for another run.
      else if (dropped) data = new Map([...dropped].map(([k, v]) => [k, v.slice()]));
      else throw new EngineError(manifest.reason ?? "The data of this version are not on this site.", "input");
      ui.say("Checking the SHA-256 digest of every data file against the version record.");
      const digests = await checkDigests(record, manifest, data);
      const files = new Map<string, Uint8Array>([["audit.yaml", definition], ...data]);
      const fresh = await runInWorker(worker, files, signal, (p) => ui.engine(p));
      const comparison = compareResultJson(frozen, fresh);
      showOutcome(ui, record, digests, comparison, frozen === fresh, root.dataset.siteTool ?? "");
    } catch (err) {
      showError(ui, err);
    } finally {
      ui.end();
      ui.run.disabled = !onSite && dropped === null;
    }
  });
}

/** Every input's digest: a file's own, or for a folder or glob of parts the digest of their listing. */
async function checkDigests(record: VersionRecord, manifest: RerunManifest, data: ReadonlyMap<string, Uint8Array>): Promise<DigestCheck[]> {
  const out: DigestCheck[] = [];
  for (const [i, input] of record.inputs.entries()) {
    const parts = manifest.inputs[i]?.parts ?? null;
    let found: string | null = null;
    if (parts) {
      if (parts.every((p) => data.has(p))) found = await partsDigestHex(await Promise.all(parts.map(async (p) => ({ path: p, sha256: await sha256Hex(data.get(p)!) }))));
    } else if (data.has(input.file)) found = await sha256Hex(data.get(input.file)!);
    out.push({ dataset: input.id, file: input.file, recorded: input.sha256, found });
  }
  return out;
}

/**
 * Files a reader downloaded: each one's digest compared with the version's
 * single-file inputs, and parts of a multi-part dataset placed by name. The
 * files are shown with what they matched; returns the data ready for a re-run
 * when every input is covered, else null.
 */
async function matchDropped(base: string, files: File[], signal: AbortSignal, ui: PanelState): Promise<Map<string, Uint8Array> | null> {
  const record = JSON.parse(await fetchText(`${base}version.json`, signal)) as VersionRecord;
  const manifest = JSON.parse(await fetchText(`${base}rerun.json`, signal)) as RerunManifest;
  const data = new Map<string, Uint8Array>();
  const rows: (string | HTMLElement)[][] = [];
  for (const [i, file] of files.entries()) {
    if (signal.aborted) throw new RunCancelled();
    ui.say(`Computing the SHA-256 digest of ${file.name} (${i + 1} of ${files.length}).`);
    const bytes = new Uint8Array(await file.arrayBuffer());
    const digest = await sha256Hex(bytes);
    const single = record.inputs.find((input, k) => !manifest.inputs[k]?.parts && input.sha256 === digest);
    const partPath = manifest.inputs.flatMap((input) => input.parts ?? []).find((p) => p.split("/").pop() === file.name);
    let verdict: HTMLElement;
    if (single) {
      data.set(single.file, bytes);
      verdict = el("span", { class: "rerun-file-ok" }, `matches ${single.file} (dataset ${single.id}) as recorded by version ${record.version}`);
    } else if (partPath) {
      data.set(partPath, bytes);
      verdict = el("span", {}, `taken as the part ${partPath}; checked with the other parts of its dataset`);
    } else {
      verdict = el("span", { class: "rerun-file-bad" }, `matches no data file of version ${record.version}: not the file this version was computed from`);
    }
    rows.push([file.name, el("code", { class: "digest" }, digest), verdict]);
  }
  const digests = await checkDigests(record, manifest, data);
  const missing = digests.filter((d) => d.found === null).map((d) => d.file);
  const wrongParts = digests.filter((d) => d.found !== null && d.found !== d.recorded).map((d) => d.file);
  ui.outcome.replaceChildren(textTable("The files you gave, with their SHA-256 digests", ["File", "SHA-256", "Compared with the version record"], rows, "rerun-files"));
  const complete = missing.length === 0 && wrongParts.length === 0;
  ui.say(
    complete
      ? "Every data file of this version is at hand and matches its recorded digest; the checks can be re-run."
      : `${wrongParts.length ? `The parts of ${wrongParts.join(", ")} do not give the recorded digest. ` : ""}${missing.length ? `Still missing: ${missing.join(", ")}.` : ""}`,
  );
  return complete ? data : null;
}

function showOutcome(
  ui: PanelState,
  record: VersionRecord,
  digests: DigestCheck[],
  comparison: ResultJsonComparison,
  identical: boolean,
  siteTool: string,
): void {
  const badDigests = digests.filter((d) => d.found !== d.recorded);
  const reproduced = comparison.reproduced && badDigests.length === 0;
  const word = reproduced ? "REPRODUCED" : "NOT REPRODUCED";
  const nodes: Node[] = [
    el(
      "p",
      {},
      el("strong", { class: `rerun-verdict ${reproduced ? "rerun-verdict-same" : "rerun-verdict-differs"}`, "data-verdict": reproduced ? "reproduced" : "not-reproduced" }, word),
      " ",
      reproduced
        ? `Every check of version ${record.version} was recomputed in this browser and gives the frozen result${identical ? ", byte for byte" : ""}.`
        : `Version ${record.version} was recomputed in this browser and differs from what was frozen:`,
    ),
  ];
  if (record.tool.version !== siteTool) {
    nodes.push(el("p", { class: "rerun-tool-note" }, `This version was published with ${record.tool.name} ${record.tool.version} and re-run here with ${siteTool}; only ${record.tool.version} is certain to reproduce it exactly.`));
  }
  nodes.push(
    textTable(
      "Data files and their SHA-256 digests",
      ["Dataset", "File", "Digest"],
      digests.map((d) => [
        d.dataset,
        el("code", {}, d.file),
        d.found === d.recorded
          ? el("span", { class: "rerun-file-ok" }, `as recorded (${d.recorded.slice(0, 16)}…)`)
          : el("span", { class: "rerun-file-bad" }, d.found === null ? "missing" : `differs: recorded ${d.recorded}, found ${d.found}`),
      ]),
      "rerun-files",
    ),
  );
  if (comparison.differences.length > 0) {
    nodes.push(
      textTable(
        `Differences between the frozen result and the re-run${comparison.more ? ` (the first ${comparison.differences.length}; ${comparison.more} more)` : ""}`,
        ["Where", "Value", "Frozen", "Re-run"],
        comparison.differences.map((d) => [d.where, el("code", {}, d.path), d.summary ?? d.frozen, d.summary ? "" : d.now]),
        "rerun-differences",
      ),
    );
  }
  ui.outcome.replaceChildren(...nodes);
  ui.say(reproduced ? `${word}: the re-run matches version ${record.version}.` : `${word}: ${badDigests.length + comparison.differences.length + comparison.more} difference(s), listed below.`);
}

export function showError(ui: PanelState, err: unknown): void {
  if (err instanceof RunCancelled || (err instanceof DOMException && err.name === "AbortError")) {
    ui.say("Cancelled; nothing was compared.");
    return;
  }
  const message = err instanceof Error ? err.message : String(err);
  ui.outcome.replaceChildren(el("p", { class: "rerun-file-bad" }, message));
  ui.say(`Stopped: ${message}`);
}

/** Drag-and-drop onto a zone (the file inputs beside it do the same for keyboards). */
export function acceptDrops(zone: HTMLElement, onDrop: (items: DataTransfer) => Promise<void>): void {
  zone.addEventListener("dragover", (e) => {
    e.preventDefault();
    zone.classList.add("is-over");
  });
  zone.addEventListener("dragleave", () => zone.classList.remove("is-over"));
  zone.addEventListener("drop", (e) => {
    e.preventDefault();
    zone.classList.remove("is-over");
    if (e.dataTransfer) void onDrop(e.dataTransfer);
  });
}
