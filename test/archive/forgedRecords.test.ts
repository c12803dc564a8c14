/**
 * Issue 22 item 6: every field of every version record is covered by the hash
 * chain, and `verify` of any version checks the chain to the newest version,
 * naming the version, the field, and what was expected and found.
 */
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { publishAudit } from "../../src/archive/publish.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { TOOL } from "../../src/version.ts";
import { cli } from "../helpers/cliInProcess.ts";
import { expectedRecordDigest } from "./recordDigest.ts";
import { fixedClock, makeTempArchive } from "./tempArchive.ts";

type Json = Record<string, unknown>;

/** An archive with versions 1 (400 rows) and 2 (380 rows), published once and copied for each test. */
let template = "";
beforeAll(async () => {
  const a = makeTempArchive();
  await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
  a.writeData(380, 1, "second batch");
  await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
  template = a.auditDir;
});

function copyOfArchive(): string {
  const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-forged-")), "dot-lab-exchange");
  fs.cpSync(template, dir, { recursive: true });
  return dir;
}

const recordFile = (auditDir: string, n: number) => path.join(auditDir, "versions", String(n), "version.json");
const readRecord = (auditDir: string, n: number): Json => JSON.parse(fs.readFileSync(recordFile(auditDir, n), "utf8"));
const writeRecord = (auditDir: string, n: number, record: Json) => fs.writeFileSync(recordFile(auditDir, n), `${JSON.stringify(record, null, 2)}\n`);

/** Edit one field as a person with a text editor would, leaving the stored digest as it was. */
function editField(record: Json, field: string, value: unknown): Json {
  const copy = structuredClone(record);
  if (field === "tool.version") (copy.tool as Json).version = value;
  else if (field === "inputs[0].rows") ((copy.inputs as Json[])[0] as Json).rows = value;
  else copy[field] = value;
  return copy;
}

/** The lines of the verify report between its hash-chain heading and the data-files line. */
function chainLines(stdout: string): string[] {
  const lines = stdout.split("\n");
  const start = lines.findIndex((l) => l.startsWith("hash chain"));
  const end = lines.findIndex((l) => l.startsWith("data files"));
  return lines.slice(start, end);
}

const DIGEST_ONLY = "every field that result.json or the previous version can confirm agrees, so the edited one is covered by this digest alone";

/** Each forged field, the value written, and what the report says of that field (null: only the digest can tell). */
const FORGERIES: { field: string; value: unknown; says: (v: number, original: Json) => string | null }[] = [
  { field: "published", value: "2026-12-24T12:00:00Z", says: () => null },
  { field: "tool.version", value: "9.9.9", says: () => `field tool.version: expected ${TOOL.version}, found 9.9.9 (as result.json of this version states)` },
  {
    field: "inputs[0].rows",
    value: 100000,
    says: (_v, original) => `field inputs[0].rows: expected ${((original.inputs as Json[])[0] as Json).rows}, found 100000 (as result.json of this version states)`,
  },
  { field: "audit", value: "another-audit", says: () => "field audit: expected dot-lab-exchange, found another-audit (as result.json of this version states)" },
];

describe("an edited field of the newest record is caught by the record's own digest and by result.json", () => {
  it.each(FORGERIES.map((f) => [f.field, f] as const))("%s of version 2 (of 2): verify exits 1 and names version 2, the field and both values", async (_name, f) => {
    const dir = copyOfArchive();
    const original = readRecord(dir, 2);
    const forged = editField(original, f.field, f.value);
    writeRecord(dir, 2, forged);
    const r = await cli(["verify", dir]);
    expect(r.code).toBe(1);
    const named = f.says(2, original);
    const why = named ? "a field was edited after publication" : `a field was edited after publication; ${DIGEST_ONLY}: published (now ${f.value})`;
    expect(chainLines(r.stdout)).toEqual([
      `hash chain (versions 1 to 2): ${named ? 2 : 1} problem(s)`,
      ...(named ? [`  versions/2/version.json: ${named}`] : []),
      `  versions/2/version.json: field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(forged)} for the record's other fields as they now read: ${why}`,
    ]);
    expect(r.stdout).toContain("NOT REPRODUCED: version 2 of ");
  });
});

describe("an edited field of an older record is caught when that version is verified, through the next version's link", () => {
  it.each(FORGERIES.map((f) => [f.field, f] as const))("%s of version 1 (of 2): verify --version 1 exits 1 and names the break", async (_name, f) => {
    const dir = copyOfArchive();
    const original = readRecord(dir, 1);
    const forged = editField(original, f.field, f.value);
    writeRecord(dir, 1, forged);
    const r = await cli(["verify", dir, "--version", "1"]);
    expect(r.code).toBe(1);
    const named = f.says(1, original);
    const why = named ? "a field was edited after publication" : `a field was edited after publication; ${DIGEST_ONLY}: published (now ${f.value})`;
    const lines = [
      ...(named ? [`  versions/1/version.json: ${named}`] : []),
      `  versions/1/version.json: field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(forged)} for the record's other fields as they now read: ${why}`,
      `  versions/1/version.json: altered after version 2 was published: its digest is ${expectedRecordDigest(forged)}, version 2 recorded ${original.digest} (hash chain broken)`,
    ];
    // A backdated version 2 would also be out of order; 2026-12-24 is after version 2's date, so it is.
    if (f.field === "published") lines.push("  versions/2/version.json: field published: expected 2026-12-24T12:00:00Z or later, found 2026-12-01T09:00:00Z (version 1 was published at 2026-12-24T12:00:00Z)");
    expect(chainLines(r.stdout)).toEqual([`hash chain (versions 1 to 2): ${lines.length} problem(s)`, ...lines]);
    expect(r.stdout).toMatch(/NOT REPRODUCED: version 1 of (dot-lab-exchange|another-audit)\n$/);
  });

  it("a forger who also recomputes version 1's digest is still caught by version 2's link", async () => {
    const dir = copyOfArchive();
    const original = readRecord(dir, 1);
    const forged = editField(original, "published", "2026-11-01T09:00:00Z");
    forged.digest = expectedRecordDigest(forged);
    writeRecord(dir, 1, forged);
    const r = await cli(["verify", dir, "--version", "1"]);
    expect(r.code).toBe(1);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 1 problem(s)",
      `  versions/1/version.json: altered after version 2 was published: its digest is ${forged.digest}, version 2 recorded ${original.digest} (hash chain broken)`,
    ]);
  });

  it("an edited link is blamed on the version that holds it when the earlier record still matches its own digest", async () => {
    const dir = copyOfArchive();
    const original = readRecord(dir, 2);
    const forgedLink = `sha256:${"0".repeat(64)}`;
    const forged = { ...original, previous: { version: 1, digest: forgedLink } };
    writeRecord(dir, 2, forged);
    const r = await cli(["verify", dir, "--version", "1"]);
    expect(r.code).toBe(1);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 2 problem(s)",
      `  versions/2/version.json: field previous.digest: expected ${readRecord(dir, 1).digest}, found ${forgedLink} (the chain digest of version 1's record, which matches its own digest)`,
      `  versions/2/version.json: field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(forged)} for the record's other fields as they now read: a field was edited after publication`,
    ]);
  });

  it("a date that does not exist is named", async () => {
    const dir = copyOfArchive();
    const original = readRecord(dir, 2);
    const forged = editField(original, "published", "2026-02-30T09:00:00Z");
    writeRecord(dir, 2, forged);
    const r = await cli(["verify", dir]);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 3 problem(s)",
      "  versions/2/version.json: field published: expected a date and time that exist, found 2026-02-30T09:00:00Z (no such instant)",
      "  versions/2/version.json: field published: expected 2026-11-30T09:00:00Z or later, found 2026-02-30T09:00:00Z (version 1 was published at 2026-11-30T09:00:00Z)",
      `  versions/2/version.json: field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(forged)} for the record's other fields as they now read: a field was edited after publication`,
    ]);
  });
});

/**
 * Version n of an archive as tool 0.1.0 wrote it: result.json and the record name that tool (the record
 * keeping the digest of the rewritten result.json), and the record is of format 1, with no digest of its own.
 */
function asWrittenBy010(dir: string, n: number, previous?: { version: number; digest: string }): void {
  const resultPath = path.join(dir, "versions", String(n), "result.json");
  const result = JSON.parse(fs.readFileSync(resultPath, "utf8"));
  result.tool.version = "0.1.0";
  const resultText = canonicalJson(result);
  fs.writeFileSync(resultPath, resultText);
  const { digest: _d, ...record } = readRecord(dir, n);
  record.format = "transport-audit-version/1";
  record.tool = { ...(record.tool as Json), version: "0.1.0" };
  record.files = { ...(record.files as Json), "result.json": `sha256:${createHash("sha256").update(resultText).digest("hex")}` };
  if (previous) record.previous = previous;
  writeRecord(dir, n, record);
}

/** Rewrite the copy's records in format 1, as tool 0.1.0 wrote them: no digest of their own, linked by the digest of the bytes. */
function asFormat1(dir: string): void {
  const sha = (text: string) => `sha256:${createHash("sha256").update(text).digest("hex")}`;
  asWrittenBy010(dir, 1);
  asWrittenBy010(dir, 2, { version: 1, digest: sha(fs.readFileSync(recordFile(dir, 1), "utf8")) });
}

describe("records of format 1 (tool 0.1.0) are checked by their own rule", () => {
  it("an intact format-1 chain verifies", async () => {
    const dir = copyOfArchive();
    asFormat1(dir);
    const r = await cli(["verify", dir]);
    expect(r.stdout).toContain("hash chain: versions 1 to 2 intact");
    expect(r.stdout).toContain("data files: every digest matches");
    // The re-run is by this tool, not 0.1.0, so the result itself is not expected to reproduce here.
  });

  it("an edited field of an old record is caught through the next version's link", async () => {
    const dir = copyOfArchive();
    asFormat1(dir);
    const before = fs.readFileSync(recordFile(dir, 1), "utf8");
    writeRecord(dir, 1, editField(readRecord(dir, 1), "published", "2026-11-29T09:00:00Z"));
    const after = fs.readFileSync(recordFile(dir, 1), "utf8");
    const sha = (text: string) => `sha256:${createHash("sha256").update(text).digest("hex")}`;
    const r = await cli(["verify", dir, "--version", "1"]);
    expect(r.code).toBe(1);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 1 problem(s)",
      `  versions/1/version.json: altered after version 2 was published: its digest is ${sha(after)}, version 2 recorded ${sha(before)} (hash chain broken)`,
    ]);
  });

  it("a version published on top of a format-1 record links to the digest of its bytes, and the mixed chain verifies", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    asWrittenBy010(a.auditDir, 1);
    const v1Bytes = fs.readFileSync(recordFile(a.auditDir, 1), "utf8");
    a.writeData(380, 1, "second batch");
    const second = await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    expect(second.manifest.previous).toEqual({ version: 1, digest: `sha256:${createHash("sha256").update(v1Bytes).digest("hex")}` });
    expect(second.manifest.format).toBe("transport-audit-version/2");
    const r = await cli(["verify", a.auditDir]);
    expect(r.stdout).toContain("hash chain: versions 1 to 2 intact");
    expect(r.code).toBe(0);
  });

  it("a format-1 record claiming a tool version that writes format 2 is refused", async () => {
    const dir = copyOfArchive();
    asFormat1(dir);
    writeRecord(dir, 2, editField(readRecord(dir, 2), "tool.version", "0.2.0"));
    const r = await cli(["verify", dir]);
    expect(r.code).toBe(1);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 2 problem(s)",
      "  versions/2/version.json: field tool.version: expected 0.1.0, found 0.2.0 (as result.json of this version states)",
      "  versions/2/version.json: field format: expected transport-audit-version/2, found transport-audit-version/1 (transport-audit 0.2.0 writes format 2; format 1 ended with 0.1.0)",
    ]);
  });

  it("a format-2 record rewritten as format 1 to escape its digest is refused", async () => {
    const dir = copyOfArchive();
    const { digest: _d, ...record } = readRecord(dir, 2);
    writeRecord(dir, 2, { ...record, format: "transport-audit-version/1" });
    const r = await cli(["verify", dir]);
    expect(r.code).toBe(1);
    expect(chainLines(r.stdout)).toEqual([
      "hash chain (versions 1 to 2): 1 problem(s)",
      "  versions/2/version.json: field format: expected transport-audit-version/2, found transport-audit-version/1 (version 1 uses it, and the format of records never goes back)",
    ]);
  });
});
