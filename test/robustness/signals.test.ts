/**
 * Ctrl-C (SIGINT) and SIGTERM stop run, build and publish: the process removes
 * what it was writing aside and exits 130 / 143 (128 + the signal's number, as
 * a shell reports it). Real processes, signalled at a known point: a pause of
 * the fault hook (TRANSPORT_AUDIT_FAULT=<step>:pause), or the moment the data
 * file is open. No timing is asserted beyond generous limits.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { makeTempArchive } from "../archive/tempArchive.ts";
import { cli } from "./harness.ts";
import { endedProcessId, startCli } from "./processes.ts";
import { stagingFolders, treeDigest } from "../helpers/treeDigest.ts";
import { FAULT_ENV } from "../../src/output/faults.ts";

const LIMIT_MS = 120_000; // a loaded two-core machine starts tsx slowly; nothing here waits for a deadline

describe("publish stopped by a signal", () => {
  for (const [signal, status, step] of [
    ["SIGTERM", 143, "before-rename"],
    ["SIGINT", 130, "staged-result"],
  ] as const) {
    it(`${signal} at ${step}: exit ${status}, no version, no staging folder, no lock`, async () => {
      const a = makeTempArchive();
      const p = startCli(["publish", a.auditDir], { [FAULT_ENV]: `publish:${step}:pause` });
      await p.waitForStderr(`paused at publish:${step}`);
      expect(stagingFolders(path.join(a.auditDir, "versions"))).toHaveLength(1);
      p.child.kill(signal);
      const r = await p.done;
      expect(r.code).toBe(status);
      expect(r.stderr).toBe(`paused at publish:${step}\n\nstopped by ${signal}; unfinished output removed\n`);
      expect(r.stdout).toBe("");
      expect(fs.readdirSync(path.join(a.auditDir, "versions"))).toEqual([]);
    }, LIMIT_MS);
  }
});

describe("build stopped by a signal", () => {
  it("SIGINT with the new site staged: exit 130, the old site untouched, the staging folder removed", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    const before = treeDigest(out);
    a.writeData(300, 1, "changed data");
    const b = startCli(["build", "--root", a.root, "--out", out], { [FAULT_ENV]: "build:rendered:pause" });
    await b.waitForStderr("paused at build:rendered");
    expect(stagingFolders(a.root)).toHaveLength(1);
    b.child.kill("SIGINT");
    const r = await b.done;
    expect(r.code).toBe(130);
    expect(r.stderr).toBe("paused at build:rendered\n\nstopped by SIGINT; unfinished output removed\n");
    expect(treeDigest(out)).toEqual(before);
    expect(stagingFolders(a.root)).toEqual([]);
  }, LIMIT_MS);
});

describe("run stopped by a signal while it reads a large file", () => {
  it("SIGTERM while the data file is open: exit 143, the reading workers end with the process", async () => {
    const a = makeTempArchive();
    // 72 MB of rows: above the 64 MB from which samples are summarised on worker threads.
    const block = Buffer.from("0.123456,1\n-0.04321,0\n0.250000,-1\n".repeat(30_000));
    const fd = fs.openSync(a.dataFile, "w");
    fs.writeSync(fd, "q_meV,n\n");
    for (let written = 0; written < 72e6; written += block.length) fs.writeSync(fd, block);
    fs.closeSync(fd);
    const r = startCli(["run", a.auditDir]);
    // The marker: the process holds the data file open (Linux /proc), so the signal comes mid-read.
    const fdDir = `/proc/${r.child.pid}/fd`;
    const holdsData = () => {
      try {
        return fs.readdirSync(fdDir).some((n) => {
          try {
            return fs.readlinkSync(path.join(fdDir, n)) === a.dataFile;
          } catch {
            return false;
          }
        });
      } catch {
        return false;
      }
    };
    while (!holdsData() && r.child.exitCode === null) await new Promise((resolve) => setTimeout(resolve, 5));
    r.child.kill("SIGTERM");
    const out = await r.done;
    expect(out.code).toBe(143);
    expect(out.stderr).toBe("\nstopped by SIGTERM; unfinished output removed\n");
    expect(out.stdout).toBe("");
  }, LIMIT_MS);
});

describe("staging folders left by a killed process", () => {
  it("are removed by the next publish, run and build; those of running processes stay", async () => {
    const a = makeTempArchive();
    const host = os.hostname();
    const versions = path.join(a.auditDir, "versions");
    const stale = () => `.staging-${endedProcessId()}@${host}-AbC123`;
    const live = `.staging-${process.pid}@${host}-LiVe99`; // this test's own process: still running
    fs.mkdirSync(path.join(versions, stale()), { recursive: true });
    fs.mkdirSync(path.join(versions, live));
    fs.writeFileSync(path.join(versions, live, "result.json"), "{}");
    expect((await cli(["run", a.auditDir])).code).toBe(0);
    expect(stagingFolders(versions)).toEqual([live]);

    fs.mkdirSync(path.join(versions, stale()));
    expect((await cli(["publish", a.auditDir])).code).toBe(0);
    expect(stagingFolders(versions)).toEqual([live]);

    const besideSite = stale();
    fs.mkdirSync(path.join(a.root, besideSite));
    fs.mkdirSync(path.join(versions, stale()));
    expect((await cli(["build", "--root", a.root, "--out", path.join(a.root, "site")])).code).toBe(0);
    expect(stagingFolders(versions)).toEqual([live]);
    expect(stagingFolders(a.root)).toEqual([]);
  }, LIMIT_MS);
});
