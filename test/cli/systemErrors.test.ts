/**
 * Errors of the user's machine print one line naming the file and the cause
 * and exit 2; the same error wrapped by the site generator (Eleventy keeps
 * the original in `originalError`) or in a `cause` is found too; an error
 * that more likely means a mistake of ours still prints a stack (exit 3).
 */
import { describe, expect, it, vi } from "vitest";
import { reportError } from "../../src/cli/exit.ts";
import { systemError } from "../../src/output/systemError.ts";
import { ANSI } from "../helpers/cliInProcess.ts";

function reported(err: unknown): { code: number; stderr: string } {
  let stderr = "";
  const spy = vi.spyOn(process.stderr, "write").mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  try {
    return { code: reportError(err), stderr: stderr.replace(ANSI, "") };
  } finally {
    spy.mockRestore();
  }
}

describe("reportError on errors of the operating system", () => {
  it("a full disk: one line with the file, the cause in words, the code and the call", () => {
    expect(reported(systemError("ENOSPC", "write", "/srv/site/index.html"))).toEqual({
      code: 2,
      stderr: "error: /srv/site/index.html: no space left on the device (ENOSPC, write)\n",
    });
  });

  it("finds the error inside the site generator's wrapper and inside a cause", () => {
    const wrapped = Object.assign(new Error("Having trouble writing to \"site/a/index.html\" from \"./templates/audit.njk\""), {
      originalError: systemError("EROFS", "open", "/srv/site/a/index.html"),
    });
    expect(reported(wrapped)).toEqual({ code: 2, stderr: "error: /srv/site/a/index.html: the file system is read-only (EROFS, open)\n" });
    const caused = new Error("copying the fonts failed", { cause: systemError("EIO", "read", "/mnt/lab/katex/fonts/KaTeX_Main-Regular.woff2") });
    expect(reported(caused)).toEqual({
      code: 2,
      stderr: "error: /mnt/lab/katex/fonts/KaTeX_Main-Regular.woff2: input/output error (a failing disk or a lost network file system) (EIO, read)\n",
    });
  });

  it("keeps the stack and exit 3 for ENOENT, which more likely is our own mistake", () => {
    const r = reported(Object.assign(new Error("ENOENT: no such file or directory, open '/x/templates/base.njk'"), { code: "ENOENT", path: "/x/templates/base.njk" }));
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^internal error \(a bug in transport-audit; please report it with the stack below\)\nError: ENOENT: no such file or directory, open '\/x\/templates\/base\.njk'\n\s+at /);
  });
});
