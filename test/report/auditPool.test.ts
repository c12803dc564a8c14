// Building an archive on worker threads must give the site that one thread gives: every audit is
// computed from its own folder alone. The archive is the benchmark's generator (invented audits)
// at 13 audits, plus one folder whose audit.yaml is broken, so that the pool (used from
// POOL_FROM_AUDITS folders on) also carries an input error back.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ensureBenchArchive } from "../../bench/archiveGenerator.ts";
import { POOL_FROM_AUDITS, runAuditFolders } from "../../src/report/auditPool.ts";
import { buildSite } from "../../src/report/buildSite.ts";

function filesUnder(dir: string): Map<string, Buffer> {
  const out = new Map<string, Buffer>();
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out.set(path.relative(dir, p), fs.readFileSync(p));
    }
  };
  walk(dir);
  return out;
}

describe("audits on worker threads", () => {
  let root: string;
  let one: Awaited<ReturnType<typeof buildSite>>;
  let pooled: Awaited<ReturnType<typeof buildSite>>;
  beforeAll(async () => {
    root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-pool-"));
    await ensureBenchArchive(root, 13);
    const broken = path.join(root, "audits", "zz-broken");
    fs.mkdirSync(broken, { recursive: true });
    fs.writeFileSync(path.join(broken, "audit.yaml"), "id: zz-broken\ntitle: [unclosed\n");
    one = await buildSite({ root, out: path.join(root, "site-one"), cache: "refresh", threads: 1 });
    pooled = await buildSite({ root, out: path.join(root, "site-pooled"), cache: "refresh", threads: 2 });
  }, 240_000);
  afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

  it("uses the pool for this archive, and reports the same broken audit with the same message", () => {
    expect(fs.readdirSync(path.join(root, "audits")).length).toBeGreaterThanOrEqual(POOL_FROM_AUDITS);
    expect(pooled.broken).toEqual(one.broken);
    expect(one.broken.map((b) => b.folder)).toEqual(["audits/zz-broken"]);
    expect(pooled.cache).toEqual(one.cache);
  });

  it("writes the same site, byte for byte", () => {
    const a = filesUnder(path.join(root, "site-one"));
    const b = filesUnder(path.join(root, "site-pooled"));
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
    expect(a.size).toBeGreaterThan(13);
    for (const [file, bytes] of a) expect(b.get(file)?.equals(bytes), file).toBe(true);
  });

  it("returns outcomes in folder order whichever thread finished first, and tells of each folder once", async () => {
    const folders = fs
      .readdirSync(path.join(root, "audits"))
      .sort()
      .map((f) => path.join(root, "audits", f));
    const told: string[] = [];
    const outcomes = await runAuditFolders(folders, { dir: path.join(root, ".cache-test"), read: false }, { threads: 3, onDone: (_d, _t, folder) => told.push(folder) });
    expect(told.sort()).toEqual([...folders].sort());
    outcomes.forEach((o, i) => {
      if (o.kind === "run") expect(o.run.result.audit).toBe(path.basename(folders[i]));
      else expect(path.basename(folders[i])).toBe("zz-broken");
    });
  });
});
