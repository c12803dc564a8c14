import { InputError } from "../errors.ts";
import { canonicalJson } from "../report/canonicalJson.ts";
import { sha256Of } from "./digest.ts";
import { DEFINITION_FILE, MANIFEST_FILE, RESULT_FILE, listVersionNumbers } from "./layout.ts";
import { LAST_FORMAT_1_TOOL_VERSION, MANIFEST_FORMAT, MANIFEST_FORMAT_1, recordDigest, type VersionManifest } from "./manifest.ts";
import { readVersion, versionFileLabel, type FrozenVersion } from "./readVersion.ts";

/** Something wrong with the stored versions: which file, and what. */
export interface IntegrityProblem {
  version: number;
  file: string; // e.g. versions/2/result.json
  message: string;
}

export interface ArchiveState {
  /** Versions that could be read, ascending. */
  versions: FrozenVersion[];
  /** The highest version number present (0 when none). */
  newest: number;
  problems: IntegrityProblem[];
}

/**
 * Read every version and check that each is whole and that the hash chain
 * holds to the newest: every file's digest matches its version record, every
 * field of the record agrees with the result it describes, a format-2 record
 * matches its own digest, and each version names the chain digest of the
 * previous version's record. Altering any field of an earlier version
 * therefore breaks the link from the version after it, whichever version is
 * being verified.
 */
export function checkArchive(auditDir: string): ArchiveState {
  const numbers = listVersionNumbers(auditDir);
  const versions: FrozenVersion[] = [];
  const problems: IntegrityProblem[] = [];
  const newest = numbers.length ? numbers[numbers.length - 1] : 0;
  let previous: FrozenVersion | null = null;
  for (let n = 1; n <= newest; n++) {
    if (!numbers.includes(n)) {
      problems.push({ version: n, file: versionFileLabel(n, ""), message: `version ${n} is missing: versions are numbered 1, 2, 3, … without gaps` });
      previous = null;
      continue;
    }
    let v: FrozenVersion;
    try {
      v = readVersion(auditDir, n);
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push({ version: n, file: versionFileLabel(n, ""), message: err.message });
      previous = null;
      continue;
    }
    problems.push(...checkVersion(v, previous));
    versions.push(v);
    previous = v;
  }
  return { versions, newest, problems };
}

/** `0.10.2` > `0.9.0`: numeric comparison of the dotted parts (a pre-release suffix is ignored). */
function compareToolVersions(a: string, b: string): number {
  const parts = (s: string) => s.split(/[-+]/)[0].split(".").map((p) => Number.parseInt(p, 10) || 0);
  const [x, y] = [parts(a), parts(b)];
  for (let i = 0; i < Math.max(x.length, y.length); i++) {
    const d = (x[i] ?? 0) - (y[i] ?? 0);
    if (d !== 0) return d;
  }
  return 0;
}

const shown = (value: unknown): string => (typeof value === "string" ? value : canonicalJson(value));

/** Fields of the record that result.json also states, as [field, record's value, result's value]. */
function fieldsStatedTwice(m: VersionManifest, v: FrozenVersion): [string, unknown, unknown][] {
  const r = v.result;
  const out: [string, unknown, unknown][] = [
    ["audit", m.audit, r.audit],
    ["tool.name", m.tool.name, r.tool?.name],
    ["tool.version", m.tool.version, r.tool?.version],
    ["fingerprint", m.fingerprint, r.fingerprint],
    ["stamp", m.stamp, r.stamp],
  ];
  const datasets = Array.isArray(r.datasets) ? r.datasets : [];
  if (m.inputs.length !== datasets.length) out.push(["inputs", `${m.inputs.length} input(s)`, `${datasets.length} dataset(s)`]);
  m.inputs.forEach((input, i) => {
    const d = datasets[i];
    if (!d) return;
    for (const key of ["id", "file", "sha256", "rows"] as const) out.push([`inputs[${i}].${key}`, input[key], d[key]]);
  });
  return out;
}

function checkVersion(v: FrozenVersion, prev: FrozenVersion | null): IntegrityProblem[] {
  const n = v.number;
  const m = v.manifest;
  const out: IntegrityProblem[] = [];
  const at = (file: string, message: string) => out.push({ version: n, file: versionFileLabel(n, file), message });
  const field = (name: string, expected: unknown, found: unknown, why: string) =>
    at(MANIFEST_FILE, `field ${name}: expected ${shown(expected)}, found ${shown(found)} (${why})`);

  const resultDigest = sha256Of(v.resultText);
  if (resultDigest !== m.files["result.json"]) {
    at(RESULT_FILE, `altered after publication: its digest is ${resultDigest}, the version record says ${m.files["result.json"]}`);
  }
  const definitionDigest = sha256Of(v.definitionText);
  if (definitionDigest !== m.files["audit.yaml"]) {
    at(DEFINITION_FILE, `altered after publication: its digest is ${definitionDigest}, the version record says ${m.files["audit.yaml"]}`);
  }
  if (m.version !== n) field("version", n, m.version, `the record sits in folder ${n}`);
  for (const [name, recorded, stated] of fieldsStatedTwice(m, v)) {
    if (canonicalJson(recorded) !== canonicalJson(stated)) field(name, stated, recorded, `as ${RESULT_FILE} of this version states`);
  }
  if (!isRealTimestamp(m.published)) field("published", "a date and time that exist", m.published, "no such instant");
  if (m.format === MANIFEST_FORMAT_1 && prev?.manifest.format === MANIFEST_FORMAT) {
    field("format", MANIFEST_FORMAT, m.format, `version ${n - 1} uses it, and the format of records never goes back`);
  } else if (m.format === MANIFEST_FORMAT_1 && compareToolVersions(m.tool.version, LAST_FORMAT_1_TOOL_VERSION) > 0) {
    field("format", MANIFEST_FORMAT, m.format, `${m.tool.name} ${m.tool.version} writes format 2; format 1 ended with ${LAST_FORMAT_1_TOOL_VERSION}`);
  }
  if (n === 1) {
    if (m.previous !== null) field("previous", null, m.previous, "version 1 has no previous version");
  } else if (m.previous === null) {
    field("previous", `a link to version ${n - 1}`, null, "the hash chain is broken");
  } else {
    if (m.previous.version !== n - 1) field("previous.version", n - 1, m.previous.version, "each version links to the one before it");
    if (prev && prev.manifestDigest !== m.previous.digest) {
      const sealed = (x: VersionManifest) => x.format === MANIFEST_FORMAT && x.digest === recordDigest(x);
      if (sealed(prev.manifest) && !sealed(m)) {
        // The previous record still matches its own digest and this one does not: the link itself was edited.
        field("previous.digest", prev.manifestDigest, m.previous.digest, `the chain digest of version ${n - 1}'s record, which matches its own digest`);
      } else {
        out.push({
          version: n - 1,
          file: versionFileLabel(n - 1, MANIFEST_FILE),
          message: `altered after version ${n} was published: its digest is ${prev.manifestDigest}, version ${n} recorded ${m.previous.digest} (hash chain broken)`,
        });
      }
    }
    if (prev && m.published < prev.manifest.published) {
      field("published", `${prev.manifest.published} or later`, m.published, `version ${n - 1} was published at ${prev.manifest.published}`);
    }
  }
  if (m.format === MANIFEST_FORMAT) {
    const now = recordDigest(m);
    if (now !== m.digest) {
      const named = out.some((p) => p.version === n && p.message.startsWith("field "));
      const which = named
        ? "a field was edited after publication"
        : `a field was edited after publication; every field that ${RESULT_FILE} or the previous version can confirm agrees, so the edited one is covered by this digest alone: published (now ${m.published})`;
      at(MANIFEST_FILE, `field digest: expected ${m.digest} (written at publication), found ${now} for the record's other fields as they now read: ${which}`);
    }
  }
  return out;
}

/** `2026-02-30T10:00:00Z` is refused: the instant must exist (Date would roll it over to March). */
export function isRealTimestamp(text: string): boolean {
  const t = Date.parse(text);
  return Number.isFinite(t) && `${new Date(t).toISOString().slice(0, 19)}Z` === text;
}
