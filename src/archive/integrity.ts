import fs from "node:fs";
import path from "node:path";
import { InputError } from "../errors.ts";
import { sha256Of } from "./digest.ts";
import { DEFINITION_FILE, MANIFEST_FILE, RESULT_FILE, listVersionNumbers, versionDir } from "./layout.ts";
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
  problems: IntegrityProblem[];
}

/**
 * Read versions 1…upTo (default: all) and check that each is whole and that
 * the hash chain holds: every file's digest matches its version record, the
 * record matches the result it describes, and each version names the digest
 * of the previous version's record. Altering any byte of an earlier version
 * therefore breaks the link from the version after it.
 */
export function checkArchive(auditDir: string, upTo?: number): ArchiveState {
  const numbers = listVersionNumbers(auditDir).filter((n) => upTo === undefined || n <= upTo);
  const versions: FrozenVersion[] = [];
  const problems: IntegrityProblem[] = [];
  const last = numbers.length ? numbers[numbers.length - 1] : 0;
  for (let n = 1; n <= last; n++) {
    if (!numbers.includes(n)) {
      problems.push({ version: n, file: versionFileLabel(n, ""), message: `version ${n} is missing: versions are numbered 1, 2, 3, … without gaps` });
      continue;
    }
    let v: FrozenVersion;
    try {
      v = readVersion(auditDir, n);
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push({ version: n, file: versionFileLabel(n, ""), message: err.message });
      continue;
    }
    problems.push(...checkVersion(auditDir, v));
    versions.push(v);
  }
  return { versions, problems };
}

function checkVersion(auditDir: string, v: FrozenVersion): IntegrityProblem[] {
  const n = v.number;
  const m = v.manifest;
  const out: IntegrityProblem[] = [];
  const at = (file: string, message: string) => out.push({ version: n, file: versionFileLabel(n, file), message });
  if (m.version !== n) at(MANIFEST_FILE, `records version ${m.version} but sits in folder ${n}`);
  const resultDigest = sha256Of(v.resultText);
  if (resultDigest !== m.files["result.json"]) {
    at(RESULT_FILE, `altered after publication: its digest is ${resultDigest}, the version record says ${m.files["result.json"]}`);
  }
  const definitionDigest = sha256Of(v.definitionText);
  if (definitionDigest !== m.files["audit.yaml"]) {
    at(DEFINITION_FILE, `altered after publication: its digest is ${definitionDigest}, the version record says ${m.files["audit.yaml"]}`);
  }
  if (v.result.fingerprint !== m.fingerprint) at(RESULT_FILE, `fingerprint ${v.result.fingerprint} differs from the version record's ${m.fingerprint}`);
  if (v.result.stamp !== m.stamp) at(RESULT_FILE, `stamp ${v.result.stamp} differs from the version record's ${m.stamp}`);
  if (n === 1) {
    if (m.previous !== null) at(MANIFEST_FILE, `version 1 must not link to a previous version, but links to version ${m.previous.version}`);
  } else if (m.previous === null) {
    at(MANIFEST_FILE, `the link to version ${n - 1} is missing: the hash chain is broken`);
  } else {
    if (m.previous.version !== n - 1) at(MANIFEST_FILE, `links to version ${m.previous.version} instead of ${n - 1}`);
    const prevManifest = path.join(versionDir(auditDir, n - 1), MANIFEST_FILE);
    if (fs.existsSync(prevManifest)) {
      const actual = sha256Of(fs.readFileSync(prevManifest));
      if (actual !== m.previous.digest) {
        out.push({
          version: n - 1,
          file: versionFileLabel(n - 1, MANIFEST_FILE),
          message: `altered after version ${n} was published: its digest is ${actual}, version ${n} recorded ${m.previous.digest} (hash chain broken)`,
        });
      }
    }
  }
  return out;
}
