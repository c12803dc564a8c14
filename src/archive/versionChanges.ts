import type { Status } from "../checks/types.ts";
import type { Stamp } from "../report/resultDocument.ts";
import type { VersionManifest } from "./manifest.ts";

/** The minimum of a version (or of the unpublished state) that a comparison needs. */
export interface VersionSnapshot {
  /** null for the unpublished current state */
  version: number | null;
  stamp: Stamp;
  tool: { name: string; version: string };
  inputs: readonly { id: string; file: string; sha256: string; rows: number }[];
  /** Digest of the audit.yaml text. */
  definitionDigest: string;
  checks: readonly { check: string; dataset: string; status: Status }[];
}

/** The snapshot of a published version. */
export function snapshotOf(manifest: VersionManifest, checks: VersionSnapshot["checks"]): VersionSnapshot {
  return { version: manifest.version, stamp: manifest.stamp, tool: manifest.tool, inputs: manifest.inputs, definitionDigest: manifest.files["audit.yaml"], checks };
}

export interface VerdictChange {
  check: string;
  dataset: string;
  from: Status | null; // null: the check did not run in the earlier version
  to: Status | null; // null: the check no longer runs
}

export interface DataFileChange {
  file: string;
  dataset: string;
  change: "added" | "removed" | "changed";
  from?: { sha256: string; rows: number };
  to?: { sha256: string; rows: number };
}

export interface VersionChanges {
  from: number | null;
  to: number | null;
  stamp: { from: Stamp; to: Stamp } | null;
  verdicts: VerdictChange[];
  data: DataFileChange[];
  definitionChanged: boolean;
  tool: { from: string; to: string } | null;
  /** Checks whose verdict stayed the same (their numbers may still have moved). */
  unchangedVerdicts: number;
}

/** Key each check result by check and target, numbering repeats so that none is lost. */
function keyed(checks: VersionSnapshot["checks"]): Map<string, { check: string; dataset: string; status: Status }> {
  const out = new Map<string, { check: string; dataset: string; status: Status }>();
  const seen = new Map<string, number>();
  for (const c of checks) {
    const base = `${c.check}\u0000${c.dataset}`;
    const n = (seen.get(base) ?? 0) + 1;
    seen.set(base, n);
    out.set(`${base}\u0000${n}`, { check: c.check, dataset: c.dataset, status: c.status });
  }
  return out;
}

/** What changed from one published version to the next: verdicts, data files, definition, tool. */
export function changesBetween(prev: VersionSnapshot, next: VersionSnapshot): VersionChanges {
  const a = keyed(prev.checks);
  const b = keyed(next.checks);
  const verdicts: VerdictChange[] = [];
  let unchanged = 0;
  for (const [k, c] of b) {
    const before = a.get(k);
    if (!before) verdicts.push({ check: c.check, dataset: c.dataset, from: null, to: c.status });
    else if (before.status !== c.status) verdicts.push({ check: c.check, dataset: c.dataset, from: before.status, to: c.status });
    else unchanged++;
  }
  for (const [k, c] of a) if (!b.has(k)) verdicts.push({ check: c.check, dataset: c.dataset, from: c.status, to: null });

  const data: DataFileChange[] = [];
  const before = new Map(prev.inputs.map((i) => [i.file, i]));
  const after = new Map(next.inputs.map((i) => [i.file, i]));
  for (const [file, i] of after) {
    const old = before.get(file);
    if (!old) data.push({ file, dataset: i.id, change: "added", to: { sha256: i.sha256, rows: i.rows } });
    else if (old.sha256 !== i.sha256) data.push({ file, dataset: i.id, change: "changed", from: { sha256: old.sha256, rows: old.rows }, to: { sha256: i.sha256, rows: i.rows } });
  }
  for (const [file, i] of before) if (!after.has(file)) data.push({ file, dataset: i.id, change: "removed", from: { sha256: i.sha256, rows: i.rows } });

  const pt = prev.tool;
  const nt = next.tool;
  return {
    from: prev.version,
    to: next.version,
    stamp: prev.stamp !== next.stamp ? { from: prev.stamp, to: next.stamp } : null,
    verdicts,
    data,
    definitionChanged: prev.definitionDigest !== next.definitionDigest,
    tool: pt.name !== nt.name || pt.version !== nt.version ? { from: `${pt.name} ${pt.version}`, to: `${nt.name} ${nt.version}` } : null,
    unchangedVerdicts: unchanged,
  };
}
