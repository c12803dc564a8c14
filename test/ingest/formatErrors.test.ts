import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it, vi } from "vitest";
import { cli } from "../robustness/harness.ts";
import { formatsAudit } from "../helpers/formatsAudit.ts";

/**
 * Bad binary files (test/ingest/fixtures/formats/bad, written by NumPy and h5py through
 * scripts/fixtures/write_formats.py) end the run with exit status 2 and one message that
 * names the file, the row and the column (or the dataset and column where every row is
 * affected), with no stack and nothing from the HDF5 library's own diagnostics.
 */

const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-format-errors-"));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

async function runBad(file: string, keys: string[]): Promise<{ code: number; stderr: string; stdout: string }> {
  const dir = await formatsAudit(work, path.basename(file), keys, (target) => fs.copyFileSync(path.resolve("test/ingest/fixtures/formats", file), target));
  return cli(["run", dir, "--json"]);
}

describe("bad binary data files are refused with file, row and column named", () => {
  it("an HDF5 compound table with a string member", async () => {
    const r = await runBad("bad/string-member.h5", ["dataset: /runs/exchange", "columns: { Q: Q_meV, dN: label }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "error: data/string-member.h5, dataset /runs/exchange, column \"label\": expected numbers (an integer of 1 to 8 bytes, or a float of 2, 4 or 8 bytes), found fixed-length strings of 4 bytes\n",
    );
  });

  it("a truncated HDF5 file: the reason in our words, nothing from the HDF5 library's diagnostics", async () => {
    // The library's C code writes diagnostics to descriptor 2 directly (Emscripten's
    // NODERAWFS), past process.stderr: watch that door too.
    const direct = vi.spyOn(fs, "writeSync");
    const printed = vi.spyOn(console, "error");
    try {
      const r = await runBad("bad/truncated.h5", ["dataset: /runs/exchange", "columns: { Q: Q_meV, dN: n }"]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr).toBe(
        "error: data/truncated.h5: not a readable HDF5 file: the file is truncated: it holds 4967 bytes where its superblock records 9934 (was it copied while still being written?)\n",
      );
      expect(direct.mock.calls.filter(([fd]) => fd === 1 || fd === 2)).toEqual([]);
      expect(printed).not.toHaveBeenCalled();
    } finally {
      direct.mockRestore();
      printed.mockRestore();
    }
  });

  // The fixture's third chunk of 64 rows (rows 129–192) has 8 bytes of its deflated data flipped.
  it("an HDF5 table with a damaged chunk: the chunk's rows named", async () => {
    const r = await runBad("bad/damaged-chunk.h5", ["dataset: /runs/exchange", "columns: { Q: Q_meV, dN: n }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      'error: data/damaged-chunk.h5, dataset /runs/exchange, rows 129–192, columns "Q_meV", "n": the HDF5 library cannot read these rows (filter returned failure during read); the file is damaged: copy it again from its source\n',
    );
  });

  it("a .npy array of Python objects", async () => {
    const r = await runBad("bad/object.npy", ["columns: { Q: 2, dN: 3 }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      [
        'error: data/object.npy, column "2": expected numbers (a float: f2, f4, f8; or an integer: i1 to i8, u1 to u8), found Python objects, dtype "|O"',
        'data/object.npy, column "3": expected numbers (a float: f2, f4, f8; or an integer: i1 to i8, u1 to u8), found Python objects, dtype "|O"',
        "",
      ].join("\n"),
    );
  });

  it("a .npy file whose data stop inside the last row", async () => {
    const r = await runBad("bad/truncated.npy", ["columns: { Q: 2, dN: 3 }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "error: data/truncated.npy, row 10, column \"1\": the data end inside this row: the header (shape (10, 3)) promises 240 bytes of data after its 128-byte header, the file holds 220; the file is truncated (was it copied while still being written?)\n",
    );
  });

  it("a .npy structured array with a text field", async () => {
    const r = await runBad("bad/string-field.npy", ["columns: { Q: Q_meV, dN: n }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "error: data/string-field.npy, column \"n\": expected numbers (a float: f2, f4, f8; or an integer: i1 to i8, u1 to u8), found text (Unicode strings), dtype \"<U3\"\n",
    );
  });

  it("a .npz whose deflated member is damaged", async () => {
    const r = await runBad("bad/corrupt-member.npz", ["columns: { Q: Q_meV, dN: n }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "error: data/corrupt-member.npz, row 40, column \"Q_meV\": the deflated data are damaged (invalid distance) in member \"Q_meV.npy\": decompression fails at this row; copy the file again from its source\n",
    );
  });

  it("a .npz with a NaN and an integer beyond 2^53", async () => {
    const r = await runBad("bad/not-finite.npz", ["columns: { Q: Q_meV, dN: n }"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      [
        'error: data/not-finite.npz, row 5, column "Q_meV": expected a finite number, found NaN',
        'data/not-finite.npz, row 8, column "n": expected an integer of magnitude at most 2^53 = 9007199254740992 (beyond it not every integer has an exact double), found 1152921504606846976',
        "",
      ].join("\n"),
    );
  });
});
