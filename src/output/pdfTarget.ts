import fs from "node:fs";
import path from "node:path";
import { PathError } from "../errors.ts";
import { realPathOf } from "./paths.ts";
import { onInterrupt } from "../interrupt/cancellation.ts";
import { faultPoint } from "./faults.ts";

/** The definition file that makes a folder an audit folder (config/loadAudit.ts AUDIT_FILE; repeated to keep this module below config). */
const AUDIT_DEFINITION = "audit.yaml";

/** The nearest folder at or above `dir` that holds an audit definition, or null. */
export function enclosingAuditFolder(dir: string): string | null {
  for (let d = dir; ; d = path.dirname(d)) {
    if (fs.existsSync(path.join(d, AUDIT_DEFINITION))) return d;
    if (path.dirname(d) === d) return null;
  }
}

/**
 * Refuse a PDF target that would destroy something: a folder, anything but a
 * regular file, any existing file inside an audit folder (its data, its
 * audit.yaml, its versions), and any new file among the versions. Checked on
 * real paths, so a symbolic link to such a file is refused as well. `given`
 * is the path as the user wrote it, for the message.
 */
export function refuseUnsafePdfTarget(out: string, given = out): void {
  const said = `--out ${given}`;
  let stat: fs.Stats | null = null;
  try {
    stat = fs.statSync(out);
  } catch {
    // nothing there yet (or a dangling link, which the real path below follows)
  }
  if (stat?.isDirectory()) throw new PathError(`${said}: is a folder; name the PDF file to write in it, for example ${path.join(given, "report.pdf")}`);
  if (stat && !stat.isFile()) throw new PathError(`${said}: is not a regular file (a device, pipe or socket); name a PDF file`);
  const real = realPathOf(out);
  const audit = enclosingAuditFolder(path.dirname(real));
  if (!audit) return;
  if (stat) {
    throw new PathError(`${said}: is a file of the audit folder ${audit} (${path.relative(audit, real)}); pdf never writes over an audit's data, definition or versions. Name a file outside the audit folder`);
  }
  if (path.relative(audit, real).split(path.sep)[0] === "versions") {
    throw new PathError(`${said}: lies among the published versions of ${audit}, which are never changed; name a file outside the audit folder`);
  }
}

/**
 * Write `bytes` to `out` through a temporary file beside it, renamed over it
 * when complete: a full disk or a signal leaves the previous file whole and no
 * half-written one (the temporary file is removed).
 */
export async function writeFileReplacing(out: string, bytes: Uint8Array, step: string): Promise<void> {
  fs.mkdirSync(path.dirname(out), { recursive: true });
  const temporary = path.join(path.dirname(out), `.${path.basename(out)}.${process.pid}.partial`);
  const forget = onInterrupt(() => fs.rmSync(temporary, { force: true }));
  try {
    fs.rmSync(temporary, { force: true }); // left by a killed process that had this id
    fs.writeFileSync(temporary, bytes, { flag: "wx" }); // never through a link planted under that name
    await faultPoint(step, temporary);
    fs.renameSync(temporary, out);
  } finally {
    fs.rmSync(temporary, { force: true });
    forget();
  }
}
