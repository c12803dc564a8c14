/**
 * The browser re-run, as a referee uses it: the demo archive built and served
 * on 127.0.0.1, each audit's newest version page opened in Chromium, its
 * "re-run" button pressed, and the verdict read from the page. The reference
 * for every comparison is outside the page: the frozen result.json the
 * archive holds (compared by the page, byte for byte), and `run --json` of the
 * same folder in Node for the drop-in panel.
 *
 * The demo versions are compared with whatever is frozen: once the demos are
 * republished with the current tool, every newest version must reproduce.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { zipSync } from "fflate";
import type { Page } from "playwright-core";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { buildSite } from "../../src/report/buildSite.ts";
import { publishAudit } from "../../src/archive/publish.ts";
import { cli } from "../helpers/cliInProcess.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { fixedClock, makeTempArchive, TEST_AUDIT_ID } from "../archive/tempArchive.ts";
import { PROJECT_ROOT, startDemoSite, type DemoSite } from "./demoSite.ts";
import { serveStatic } from "./staticServer.ts";

let site: DemoSite;
let chromium: LaunchedBrowser;

beforeAll(async () => {
  site = await startDemoSite();
  chromium = await launchChromium();
});

afterAll(async () => {
  await chromium?.close();
  await site?.close();
});

/** Each demo audit with its newest published version. */
function newestVersions(): { id: string; number: number }[] {
  const newest = new Map<string, number>();
  for (const p of site.outcome.versionPages) newest.set(p.id, Math.max(newest.get(p.id) ?? 0, p.versioning!.number!));
  return [...newest].map(([id, number]) => ({ id, number })).sort((a, b) => a.id.localeCompare(b.id));
}
const DEMO_AUDITS = fs
  .readdirSync(path.join(PROJECT_ROOT, "audits"))
  .filter((d) => fs.existsSync(path.join(PROJECT_ROOT, "audits", d, "versions")))
  .sort();

interface PanelOutcome {
  verdict: string | null;
  status: string;
  outcome: string;
  differences: string[][];
  errors: string[];
}

/** Open a page, press the panel's run button and wait until the run has ended (a verdict, an error or a cancel). */
async function runPanel(url: string, panel: string, before?: (page: Page) => Promise<void>, csp?: string): Promise<PanelOutcome & { page: Page }> {
  const context = await chromium.browser.newContext();
  const page = await context.newPage();
  if (csp) {
    // The header a careful host sends: every response of the site carries it, the worker's script included.
    await page.route("**/*", async (route) => {
      const response = await route.fetch();
      await route.fulfill({ response, headers: { ...response.headers(), "content-security-policy": csp } });
    });
  }
  const errors: string[] = [];
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(m.text());
  });
  await page.goto(url);
  await before?.(page);
  const run = page.locator(`${panel} [data-action="run"]`);
  await run.click();
  await page.waitForFunction(
    (sel) => {
      const root = document.querySelector(sel)!;
      return !root.hasAttribute("aria-busy") && (root.querySelector("[data-status]")?.textContent ?? "") !== "";
    },
    panel,
    { timeout: 280_000, polling: 200 },
  );
  const read = await page.evaluate((sel) => {
    const root = document.querySelector(sel)!;
    return {
      verdict: root.querySelector("[data-verdict]")?.getAttribute("data-verdict") ?? null,
      status: root.querySelector("[data-status]")?.textContent ?? "",
      outcome: (root.querySelector("[data-outcome]") as HTMLElement).innerText,
      differences: [...root.querySelectorAll(".rerun-differences tbody tr")].map((tr) => [...tr.querySelectorAll("td")].map((td) => td.textContent ?? "")),
    };
  }, panel);
  return { ...read, errors, page };
}

const versionUrl = (id: string, n: number) => `${site.server.origin}/${id}/v${n}/index.html`;
const versionDir = (id: string, n: number) => path.join(site.outcome.out, id, `v${n}`);

describe("re-running a published version in the browser", () => {
  test("every demo audit's newest version re-runs to REPRODUCED, byte for byte, with nothing logged as an error", async () => {
    const versions = newestVersions();
    expect(versions.map((v) => v.id)).toEqual(DEMO_AUDITS);
    const outcomes: string[] = [];
    for (const { id, number } of versions) {
      const r = await runPanel(versionUrl(id, number), "[data-rerun-panel]");
      outcomes.push(`${id} v${number}: ${r.verdict} | ${r.status} | ${r.differences.slice(0, 3).map((d) => d.join(" / ")).join(" ; ")}`);
      expect(r.errors).toEqual([]);
      await r.page.context().close();
    }
    expect(outcomes).toEqual(versions.map(({ id, number }) => `${id} v${number}: reproduced | REPRODUCED: the re-run matches version ${number}. | `));
  });

  test("one digit changed in the site's copy of a data file gives NOT REPRODUCED, naming the file and the values that moved", async () => {
    const { number } = newestVersions().find((v) => v.id === "vq3-heat-exchange")!;
    const file = path.join(versionDir("vq3-heat-exchange", number), "data", "exchange.csv");
    const original = fs.readFileSync(file, "utf8");
    // The first digit of the first data row (after the header line), 3 → 4 or anything else → 3.
    const at = original.indexOf("\n") + 1 + original.slice(original.indexOf("\n") + 1).search(/[0-9]/);
    const tampered = original.slice(0, at) + (original[at] === "3" ? "4" : "3") + original.slice(at + 1);
    fs.writeFileSync(file, tampered);
    try {
      const r = await runPanel(versionUrl("vq3-heat-exchange", number), "[data-rerun-panel]");
      expect(r.verdict).toBe("not-reproduced");
      expect(r.outcome).toMatch(/data\/exchange\.csv\s+differs: recorded [0-9a-f]{64}, found [0-9a-f]{64}/);
      // The dataset's digest in the result document differs, and so does the fingerprint that covers it.
      const where = r.differences.map((d) => `${d[0]} ${d[1]}`);
      expect(where.some((w) => /sha256/.test(w))).toBe(true);
      expect(r.status).toMatch(/^NOT REPRODUCED: \d+ difference\(s\), listed below\.$/);
      await r.page.context().close();
    } finally {
      fs.writeFileSync(file, original);
    }
  });

  test("one digit changed in the site's frozen result.json gives NOT REPRODUCED, naming the check and the value", async () => {
    const { number } = newestVersions().find((v) => v.id === "vq3-heat-exchange")!;
    const file = path.join(versionDir("vq3-heat-exchange", number), "result.json");
    const original = fs.readFileSync(file, "utf8");
    const doc = JSON.parse(original) as { checks: { check: string; dataset: string; values: Record<string, unknown> }[] };
    // The first check with a numeric value: its number's last digit changed in the text.
    const ci = doc.checks.findIndex((c) => Object.values(c.values).some((v) => typeof v === "number" && Number.isFinite(v) && v !== 0));
    const check = doc.checks[ci];
    const [key, value] = Object.entries(check.values).find(([, v]) => typeof v === "number" && Number.isFinite(v) && v !== 0) as [string, number];
    const written = JSON.stringify(value);
    const start = original.indexOf(`"${key}":${written}`, nthCheckOffset(original, ci));
    expect(start).toBeGreaterThan(0);
    const end = start + `"${key}":`.length + written.length - 1;
    const lastDigit = original[end];
    const changed = original.slice(0, end) + (lastDigit === "1" ? "2" : "1") + original.slice(end + 1);
    fs.writeFileSync(file, changed);
    try {
      const r = await runPanel(versionUrl("vq3-heat-exchange", number), "[data-rerun-panel]");
      expect(r.verdict).toBe("not-reproduced");
      const row = r.differences.find((d) => d[1] === `values.${key}`);
      expect(row?.[0]).toBe(`check ${check.check} on ${check.dataset}`);
      expect(row?.[2]).toBe(JSON.stringify(JSON.parse(changed).checks[ci].values[key]));
      expect(row?.[3]).toBe(written);
      await r.page.context().close();
    } finally {
      fs.writeFileSync(file, original);
    }
  });

  test("cancel stops a run and says so", async () => {
    const { id, number } = newestVersions()[0];
    const context = await chromium.browser.newContext();
    const page = await context.newPage();
    await page.goto(versionUrl(id, number));
    await page.locator('[data-rerun-panel] [data-action="run"]').click();
    await page.locator('[data-rerun-panel] [data-action="cancel"]').click();
    await page.waitForFunction(() => !document.querySelector("[data-rerun-panel]")!.hasAttribute("aria-busy"));
    expect(await page.locator("[data-rerun-panel] [data-status]").textContent()).toBe("Cancelled; nothing was compared.");
    expect(await page.locator("[data-rerun-panel] [data-verdict]").count()).toBe(0);
    await context.close();
  });
});

/** Where the ci-th check's object starts in the canonical text (its `"check":` member). */
function nthCheckOffset(text: string, ci: number): number {
  let at = text.indexOf('"checks":');
  for (let i = 0; i <= ci; i++) at = text.indexOf('"check":', at + 1);
  return at;
}

describe("without JavaScript", () => {
  test("the panels say they need it, and the rest of the page reads as before", async () => {
    const { id, number } = newestVersions()[0];
    const context = await chromium.browser.newContext({ javaScriptEnabled: false });
    const page = await context.newPage();
    await page.goto(versionUrl(id, number));
    await expect(page.locator("[data-rerun-panel] [data-rerun-noscript]").isVisible()).resolves.toBe(true);
    await expect(page.locator("[data-rerun-panel] [data-rerun-noscript]").textContent()).resolves.toContain("needs JavaScript");
    await expect(page.locator("[data-rerun-panel] [data-rerun-controls]").isVisible()).resolves.toBe(false);
    await page.goto(`${site.server.origin}/index.html`);
    await expect(page.locator("[data-dropin-panel] [data-rerun-noscript]").textContent()).resolves.toContain("needs JavaScript");
    await expect(page.locator("[data-dropin-panel] [data-rerun-controls]").isVisible()).resolves.toBe(false);
    await context.close();
  });
});

describe("the drop-in panel on the index", () => {
  test.each(DEMO_AUDITS)("%s as a .zip gives the result document `run --json` prints (canonical form), and its report", async (id) => {
    const folder = path.join(PROJECT_ROOT, "audits", id);
    const members: Record<string, Uint8Array> = { [`${id}/audit.yaml`]: fs.readFileSync(path.join(folder, "audit.yaml")) };
    for (const f of fs.readdirSync(path.join(folder, "data"), { recursive: true }) as string[]) {
      const full = path.join(folder, "data", f);
      if (fs.statSync(full).isFile()) members[`${id}/data/${f.split(path.sep).join("/")}`] = fs.readFileSync(full);
    }
    const zip = zipSync(members);
    const reference = await cli(["run", folder, "--json"]);
    expect(reference.stderr).toBe("");
    const r = await runPanel(`${site.server.origin}/index.html`, "[data-dropin-panel]", async (page) => {
      await page.locator("[data-dropin-panel] [data-file-input]").setInputFiles({ name: `${id}.zip`, mimeType: "application/zip", buffer: Buffer.from(zip) });
    });
    expect(r.errors).toEqual([]);
    const json = await r.page.evaluate(async () => (await fetch(document.querySelector<HTMLAnchorElement>("[data-result-json]")!.href)).text());
    // The engine gives the canonical form publish freezes; run --json prints the same document indented.
    expect(json).toBe(canonicalJson(JSON.parse(reference.stdout)));
    // The report as the site renders it: a section per check result with its verdict, and every plot drawn.
    const doc = JSON.parse(json) as { checks: { plots: unknown[] }[] };
    const shown = await r.page.evaluate(() => ({
      checks: document.querySelectorAll(".dropin-report section.check").length,
      verdicts: document.querySelectorAll(".dropin-report section.check .verdict .stamp").length,
      plots: document.querySelectorAll(".dropin-report figure.plot-figure svg").length,
    }));
    expect(shown).toEqual({ checks: doc.checks.length, verdicts: doc.checks.length, plots: doc.checks.reduce((s, c) => s + c.plots.length, 0) });
    await r.page.context().close();
  });
});

describe("under a Content-Security-Policy that forbids eval and inline script", () => {
  // MDN, "Content-Security-Policy: script-src": without 'unsafe-eval', eval() and new Function() throw.
  // 'wasm-unsafe-eval' allows compiling WebAssembly only (not JavaScript from text): the engine's Parquet
  // reader (hyparquet-compressors, through hysnappy) compiles a small WebAssembly module when the worker loads.
  const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; worker-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:";

  test("a version re-runs and a dropped folder is audited and rendered", async () => {
    const { number } = newestVersions().find((v) => v.id === "lc60-growth-series")!;
    const rerun = await runPanel(versionUrl("lc60-growth-series", number), "[data-rerun-panel]", undefined, CSP);
    expect([rerun.verdict, rerun.status, rerun.errors]).toEqual(["reproduced", `REPRODUCED: the re-run matches version ${number}.`, []]);
    await rerun.page.context().close();

    const folder = path.join(PROJECT_ROOT, "audits", "lc60-growth-series");
    const files = [
      { name: "audit.yaml", mimeType: "text/yaml", buffer: fs.readFileSync(path.join(folder, "audit.yaml")) },
      ...fs.readdirSync(path.join(folder, "data")).map((f) => ({ name: f, mimeType: "text/csv", buffer: fs.readFileSync(path.join(folder, "data", f)) })),
    ];
    // Loose files, without their data/ folder: placed where audit.yaml names them.
    const dropped = await runPanel(`${site.server.origin}/index.html`, "[data-dropin-panel]", (page) => page.locator("[data-dropin-panel] [data-file-input]").setInputFiles(files), CSP);
    expect(dropped.errors).toEqual([]);
    expect(dropped.status).toMatch(/^Done: \d+ check result\(s\), overall verdict \w+\. The report follows below\.$/);
    await expect(dropped.page.locator(".dropin-report section.check").count()).resolves.toBeGreaterThan(0);
    await dropped.page.context().close();
  });
});

describe("a version whose data are over the build's --data-size-limit", () => {
  test("links to the archive and checks a file the reader downloaded against the version record, then re-runs it", async () => {
    const repository = "https://audits.example.org/lab/transport-audits.git";
    const a = makeTempArchive({
      archiveYaml: `name: Test archive\npublisher: Varga Cryogenic Transport Laboratory\nbase_url: https://audits.example.org/\nrepository: ${repository}\nlicense: CC-BY-4.0\n`,
    });
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const out = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-rerun-limit-")), "site");
    await buildSite({ root: a.root, out, dataSizeLimit: 0 });
    expect(fs.existsSync(path.join(out, TEST_AUDIT_ID, "v1", "data"))).toBe(false);
    const server = await serveStatic(out);
    try {
      const context = await chromium.browser.newContext();
      const page = await context.newPage();
      await page.goto(`${server.origin}/${TEST_AUDIT_ID}/v1/index.html`);
      const panel = page.locator("[data-rerun-panel]");
      await expect(panel.locator(`a[href="${repository}"]`).count()).resolves.toBe(1);
      await expect(panel.locator('[data-action="run"]').isDisabled()).resolves.toBe(true);

      // A file that is not the published one: named as such, and the run stays off.
      const bytes = fs.readFileSync(a.dataFile);
      const other = Buffer.from(bytes.toString("utf8").replace(/\d/, (d) => (d === "1" ? "2" : "1")));
      await panel.locator("[data-file-input]").setInputFiles({ name: "exchange.csv", mimeType: "text/csv", buffer: other });
      await page.waitForFunction(() => !document.querySelector("[data-rerun-panel]")!.hasAttribute("aria-busy") && document.querySelector("[data-rerun-panel] .rerun-files"));
      await expect(panel.locator(".rerun-files").innerText()).resolves.toContain("matches no data file of version 1");
      await expect(panel.locator("[data-status]").textContent()).resolves.toBe("Still missing: data/exchange.csv.");
      await expect(panel.locator('[data-action="run"]').isDisabled()).resolves.toBe(true);

      // The published file: its SHA-256 matches the record, and the version re-runs from it.
      await panel.locator("[data-file-input]").setInputFiles({ name: "exchange.csv", mimeType: "text/csv", buffer: bytes });
      await page.waitForFunction(() => !document.querySelector("[data-rerun-panel]")!.hasAttribute("aria-busy") && !document.querySelector<HTMLButtonElement>('[data-rerun-panel] [data-action="run"]')!.disabled);
      await expect(panel.locator(".rerun-files").innerText()).resolves.toContain("matches data/exchange.csv (dataset pulse) as recorded by version 1");
      await panel.locator('[data-action="run"]').click();
      await page.waitForSelector("[data-rerun-panel] [data-verdict]", { timeout: 280_000 });
      await expect(panel.locator("[data-verdict]").getAttribute("data-verdict")).resolves.toBe("reproduced");
      await context.close();
    } finally {
      await server.close();
    }
  });
});
