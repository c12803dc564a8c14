import { createHash } from "node:crypto";
import { spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { checkArchive } from "../../src/archive/integrity.ts";
import { LOCK_FILE, listVersionNumbers, versionDir } from "../../src/archive/layout.ts";
import { KILL_AT_ENV, publishAudit, type PublishStep } from "../../src/archive/publish.ts";
import { readVersion } from "../../src/archive/readVersion.ts";
import { verifyVersion } from "../../src/archive/verify.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { TOOL } from "../../src/version.ts";
import { expectedRecordDigest } from "./recordDigest.ts";
import { fixedClock, makeTempArchive } from "./tempArchive.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");

/** SHA-256 computed here with node:crypto, independently of the archive code. */
const sha256Hex = (bytes: Buffer | string) => createHash("sha256").update(bytes).digest("hex");

/** Publish in a child process (for concurrency and kill tests); exit status 2 on a refusal, as the CLI. */
function publishInChild(auditDir: string, env: Record<string, string> = {}): Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["--import", "tsx", path.join(ROOT, "test", "archive", "publishProcess.ts"), auditDir], {
      cwd: ROOT,
      env: { ...process.env, ...env },
    });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += d));
    child.stderr.on("data", (d) => (stderr += d));
    child.on("close", (code, signal) => resolve({ code, signal, stdout, stderr }));
  });
}

/** Every file under the versions folder with its bytes: the archive state, to compare before and after. */
function snapshot(auditDir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const dir = path.join(auditDir, "versions");
  if (!fs.existsSync(dir)) return out;
  for (const entry of fs.readdirSync(dir, { recursive: true, withFileTypes: true })) {
    if (entry.isFile()) {
      const full = path.join(entry.parentPath, entry.name);
      out[path.relative(dir, full)] = sha256Hex(fs.readFileSync(full));
    }
  }
  return out;
}

describe("publishAudit", () => {
  it("freezes the result, the date, the tool, the input digests and the fingerprint as version 1", async () => {
    const a = makeTempArchive();
    const out = await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:15:42.517Z") });
    expect(out.version).toBe(1);
    const dir = versionDir(a.auditDir, 1);
    expect(fs.readdirSync(dir).sort()).toEqual(["audit.yaml", "result.json", "version.json"]);
    const { result } = await runAudit(a.auditDir);
    // The frozen result is the canonical JSON of exactly what `run` computes.
    expect(fs.readFileSync(path.join(dir, "result.json"), "utf8")).toBe(canonicalJson(result));
    expect(fs.readFileSync(path.join(dir, "audit.yaml"), "utf8")).toBe(fs.readFileSync(path.join(a.auditDir, "audit.yaml"), "utf8"));
    const m = JSON.parse(fs.readFileSync(path.join(dir, "version.json"), "utf8"));
    expect(m).toEqual({
      audit: "dot-lab-exchange",
      digest: expectedRecordDigest(m),
      files: {
        "audit.yaml": `sha256:${sha256Hex(fs.readFileSync(path.join(dir, "audit.yaml")))}`,
        "result.json": `sha256:${sha256Hex(fs.readFileSync(path.join(dir, "result.json")))}`,
      },
      fingerprint: result.fingerprint,
      format: "transport-audit-version/2",
      inputs: [{ file: "data/exchange.csv", id: "pulse", rows: 400, sha256: sha256Hex(fs.readFileSync(a.dataFile)) }],
      previous: null,
      published: "2026-11-30T09:15:42Z",
      stamp: "pass",
      tool: { name: TOOL.name, version: TOOL.version },
      version: 1,
    });
  });

  it("refuses to publish when nothing changed since the latest version, and leaves the archive as it was", async () => {
    const a = makeTempArchive();
    const first = await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const before = snapshot(a.auditDir);
    await expect(publishAudit(a.auditDir, { now: fixedClock("2026-11-30T10:00:00Z") })).rejects.toThrow(
      `${a.auditDir}: nothing changed since version 1 (fingerprint ${first.manifest.fingerprint}): the audit definition, every data file and the tool version are the same, so a new version would repeat it. Change the data or audit.yaml before publishing again.`,
    );
    expect(snapshot(a.auditDir)).toEqual(before);
    expect(fs.existsSync(path.join(a.auditDir, "versions", LOCK_FILE))).toBe(false);
  });

  it("chains version 2 to the digest of version 1's record (every field but the digest itself) and never rewrites version 1", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const v1 = snapshot(a.auditDir);
    a.writeData(380, 1, "second batch");
    const second = await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    expect(second.version).toBe(2);
    const v1Record = JSON.parse(fs.readFileSync(path.join(versionDir(a.auditDir, 1), "version.json"), "utf8"));
    expect(v1Record.digest).toBe(expectedRecordDigest(v1Record));
    expect(second.manifest.previous).toEqual({ version: 1, digest: expectedRecordDigest(v1Record) });
    const after = snapshot(a.auditDir);
    for (const [file, digest] of Object.entries(v1)) expect(after[file]).toBe(digest);
    expect(checkArchive(a.auditDir).problems).toEqual([]);
  });

  it("refuses to add a version on top of a damaged one, naming the damaged file", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const file = path.join(versionDir(a.auditDir, 1), "audit.yaml");
    const original = fs.readFileSync(file, "utf8");
    const edited = original.replace("margin: 0.05", "margin: 0.5");
    fs.writeFileSync(file, edited);
    a.writeData(380, 1, "second batch");
    await expect(publishAudit(a.auditDir)).rejects.toThrow(
      `${path.join(a.auditDir, "versions")}: the published versions are damaged, so no version is added on top of them:\n` +
        `  versions/1/audit.yaml: altered after publication: its digest is sha256:${sha256Hex(edited)}, the version record says sha256:${sha256Hex(original)}`,
    );
    expect(listVersionNumbers(a.auditDir)).toEqual([1]);
  });

  it("does not take a number another publisher took while it was writing (rename onto a non-empty folder fails)", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    a.writeData(380, 1, "second batch");
    const intruder = "written by the other publisher\n";
    await expect(
      publishAudit(a.auditDir, {
        now: fixedClock("2026-12-01T09:00:00Z"),
        fault: (step) => {
          if (step !== "before-rename") return;
          // Another process publishes version 2 at this very moment (bypassing the lock).
          fs.mkdirSync(versionDir(a.auditDir, 2));
          fs.writeFileSync(path.join(versionDir(a.auditDir, 2), "version.json"), intruder);
        },
      }),
    ).rejects.toThrow(`${versionDir(a.auditDir, 2)}: version 2 was published by another process at the same moment; run publish again`);
    expect(fs.readFileSync(path.join(versionDir(a.auditDir, 2), "version.json"), "utf8")).toBe(intruder);
    expect(fs.readdirSync(path.join(a.auditDir, "versions")).sort()).toEqual(["1", "2"]); // no staging folder left
  });

  it("refuses while another live process holds the lock, and takes over a lock whose process is gone", async () => {
    const a = makeTempArchive();
    const lock = path.join(a.auditDir, "versions", LOCK_FILE);
    fs.mkdirSync(path.dirname(lock), { recursive: true });
    const os = await import("node:os");
    fs.writeFileSync(lock, JSON.stringify({ pid: process.pid, host: os.hostname(), since: "2026-12-01T08:00:00.000Z" }));
    await expect(publishAudit(a.auditDir)).rejects.toThrow(
      `${path.join(a.auditDir, "versions")}: another publish of this audit is running (process ${process.pid} on ${os.hostname()} since 2026-12-01T08:00:00.000Z); wait for it to finish. If no publish is running, delete ${LOCK_FILE} and try again.`,
    );
    expect(listVersionNumbers(a.auditDir)).toEqual([]);
    // A process that has exited cannot hold a lock: run one to completion and use its pid.
    const gone = await new Promise<number>((resolve) => {
      const child = spawn(process.execPath, ["-e", ""]);
      child.on("close", () => resolve(child.pid!));
    });
    fs.writeFileSync(lock, JSON.stringify({ pid: gone, host: os.hostname(), since: "2026-12-01T08:00:00.000Z" }));
    const out = await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    expect(out.version).toBe(1);
    expect(fs.existsSync(lock)).toBe(false);
  });

  it("lets exactly one of two publishes started at the same time take the next number", async () => {
    const a = makeTempArchive();
    const [p, q] = await Promise.all([publishInChild(a.auditDir), publishInChild(a.auditDir)]);
    const codes = [p.code, q.code].sort();
    expect(codes).toEqual([0, 2]);
    const loser = p.code === 2 ? p : q;
    // The loser either found the lock taken or, having waited for nothing, found the same fingerprint published.
    expect(loser.stderr).toMatch(/another publish of this audit is running|nothing changed since version 1/);
    expect(listVersionNumbers(a.auditDir)).toEqual([1]);
    expect((await verifyVersion(a.auditDir)).reproduced).toBe(true);
  });
});

describe("a publish that fails half-way", () => {
  const steps: PublishStep[] = ["staged-result", "staged-definition", "staged-manifest", "before-rename"];

  for (const step of steps) {
    it(`leaves the previous state intact when it fails at ${step}`, async () => {
      const a = makeTempArchive();
      await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
      a.writeData(380, 1, "second batch");
      const before = snapshot(a.auditDir);
      await expect(
        publishAudit(a.auditDir, {
          fault: (s) => {
            if (s === step) throw new Error(`injected failure at ${s}`);
          },
        }),
      ).rejects.toThrow(`injected failure at ${step}`);
      expect(snapshot(a.auditDir)).toEqual(before);
      expect(fs.readdirSync(path.join(a.auditDir, "versions"))).toEqual(["1"]);
      expect(checkArchive(a.auditDir).problems).toEqual([]);
      // And the next publish goes through as if nothing had happened.
      expect((await publishAudit(a.auditDir)).version).toBe(2);
    });
  }

  it("holds the complete new version when it fails just after the rename", async () => {
    const a = makeTempArchive();
    await expect(
      publishAudit(a.auditDir, {
        now: fixedClock("2026-11-30T09:00:00Z"),
        fault: (s) => {
          if (s === "after-rename") throw new Error("injected failure at after-rename");
        },
      }),
    ).rejects.toThrow("injected failure at after-rename");
    expect(listVersionNumbers(a.auditDir)).toEqual([1]);
    expect(readVersion(a.auditDir, 1).manifest.version).toBe(1);
    expect((await verifyVersion(a.auditDir)).reproduced).toBe(true);
  });

  it("survives SIGKILL before the rename: old state, a stray staging folder that nothing reads and the next publish removes, and a stale lock taken over", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    a.writeData(380, 1, "second batch");
    const before = snapshot(a.auditDir);
    const killed = await publishInChild(a.auditDir, { [KILL_AT_ENV]: "staged-manifest" });
    expect(killed.signal).toBe("SIGKILL");
    expect(listVersionNumbers(a.auditDir)).toEqual([1]);
    for (const [file, digest] of Object.entries(before)) expect(snapshot(a.auditDir)[file]).toBe(digest);
    expect(fs.existsSync(path.join(a.auditDir, "versions", LOCK_FILE))).toBe(true);
    expect(fs.readdirSync(path.join(a.auditDir, "versions")).filter((e) => e.startsWith(".staging-"))).toHaveLength(1);
    expect(checkArchive(a.auditDir).problems).toEqual([]);
    expect((await publishAudit(a.auditDir)).version).toBe(2);
    expect(listVersionNumbers(a.auditDir)).toEqual([1, 2]);
    // The killed process's staging folder is gone: the next publish removed it.
    expect(fs.readdirSync(path.join(a.auditDir, "versions")).filter((e) => e.startsWith(".staging-"))).toEqual([]);
    expect((await verifyVersion(a.auditDir)).reproduced).toBe(true);
  });
});
