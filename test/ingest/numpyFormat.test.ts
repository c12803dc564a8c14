import { describe, expect, it } from "vitest";
import { halfToDouble } from "../../src/ingest/sources/binary/numericType.ts";
import { npyDtype } from "../../src/ingest/sources/numpy/npyDtype.ts";
import { parseNpyHeader } from "../../src/ingest/sources/numpy/npyHeader.ts";
import { parsePythonLiteral, PyDict, PyTuple } from "../../src/ingest/sources/numpy/pythonLiteral.ts";
import { crc32 } from "../../src/ingest/sources/crc32.ts";

/** A version 1.0 .npy header as numpy.lib.format writes it: magic, version, 2-byte length, dict padded to 64 bytes. */
function headerV1(dict: string): Uint8Array {
  const body = dict + " ".repeat(64 - ((10 + dict.length + 1) % 64)) + "\n";
  const bytes = new Uint8Array(10 + body.length);
  bytes.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
  new DataView(bytes.buffer).setUint16(8, body.length, true);
  bytes.set(new TextEncoder().encode(body), 10);
  return bytes;
}

describe("parsePythonLiteral reads the header dict numpy.save writes, evaluating nothing", () => {
  it("a plain header: descr, fortran_order, shape", () => {
    const value = parsePythonLiteral("{'descr': '<f8', 'fortran_order': False, 'shape': (240, 3), }");
    expect(value).toBeInstanceOf(PyDict);
    const d = value as PyDict;
    expect(d.entries.get("descr")).toBe("<f8");
    expect(d.entries.get("fortran_order")).toBe(false);
    expect(d.entries.get("shape")).toEqual(new PyTuple([240, 3]));
  });

  it("(n,) is a one-element tuple and (n) a parenthesised number; Python 2's 10L is 10", () => {
    expect(parsePythonLiteral("(5,)")).toEqual(new PyTuple([5]));
    expect(parsePythonLiteral("(5)")).toBe(5);
    expect(parsePythonLiteral("(10L, 2L)")).toEqual(new PyTuple([10, 2]));
    expect(parsePythonLiteral("()")).toEqual(new PyTuple([]));
  });

  it("a structured descr: a list of (name, dtype) and (name, dtype, shape) tuples", () => {
    expect(parsePythonLiteral("[('Q', '<f8'), ('v', '<f4', (3,))]")).toEqual([new PyTuple(["Q", "<f8"]), new PyTuple(["v", "<f4", new PyTuple([3])])]);
  });

  it("refuses calls and names, which would need evaluation", () => {
    expect(() => parsePythonLiteral("{'descr': dtype('<f8')}")).toThrow("expected a dict, list, tuple, string, integer, True, False or None at character 11");
    expect(() => parsePythonLiteral("{'a': 1} x")).toThrow("unexpected text after the literal at character 10");
  });
});

describe("npyDtype takes numbers as columns and names every other kind", () => {
  it("byte order and size of numeric dtypes", () => {
    expect(npyDtype(">f8")!.element).toEqual({ numeric: { kind: "float", bytes: 8, littleEndian: false }, dtype: ">f8" });
    expect(npyDtype("|u1")!.element).toEqual({ numeric: { kind: "uint", bytes: 1, littleEndian: true }, dtype: "|u1" });
    expect(npyDtype("<f2")!.element).toEqual({ numeric: { kind: "float", bytes: 2, littleEndian: true }, dtype: "<f2" });
  });

  it("non-numeric dtypes say what they hold", () => {
    expect(npyDtype("|O")!.element).toEqual({ numeric: null, dtype: "|O", holds: "Python objects" });
    expect(npyDtype("<c16")!.element).toEqual({ numeric: null, dtype: "<c16", holds: "complex numbers" });
    expect(npyDtype("<f16")!.element).toEqual({ numeric: null, dtype: "<f16", holds: "128-bit extended-precision floats (np.longdouble), which have no exact double" });
    expect(npyDtype("<M8[ns]")!.element).toEqual({ numeric: null, dtype: "<M8[ns]", holds: "dates and times (datetime64)" });
  });

  it("structured fields keep their offsets past padding, strings and sub-arrays", () => {
    // Field offsets as numpy computes them for a packed record: the sum of the sizes before.
    const d = npyDtype(parsePythonLiteral("[('a', '<U3'), ('', '|V4'), ('b', '<i2', (2,)), ('c', '>f8')]"))!;
    expect(d.itemBytes).toBe(12 + 4 + 4 + 8);
    expect(d.fields!.map((f) => [f.name, f.offset])).toEqual([
      ["a", 0],
      ["b", 16],
      ["c", 20],
    ]);
    expect(d.fields![1].element).toEqual({ numeric: null, dtype: "<i2", holds: "an array of 2 values per row" });
  });
});

describe("parseNpyHeader", () => {
  it("reads a version 1.0 header and finds the data after it (10 + 60 + padding + newline = 128, a multiple of 64)", () => {
    const header = parseNpyHeader(headerV1("{'descr': '<i8', 'fortran_order': True, 'shape': (7, 2), }"), "data/a.npy");
    expect(header).toEqual({ version: "1.0", descr: "<i8", fortranOrder: true, shape: [7, 2], dataOffset: 128 });
  });

  it("refuses a file that is not .npy and a header cut short", () => {
    expect(() => parseNpyHeader(new TextEncoder().encode("Q,n\n1,2\n"), "data/a.npy")).toThrow(
      "data/a.npy: not a NumPy .npy file (it does not start with the bytes \\x93NUMPY); expected a file written by numpy.save",
    );
    expect(() => parseNpyHeader(headerV1("{'descr': '<i8', 'fortran_order': True, 'shape': (7, 2), }").subarray(0, 40), "data/a.npy")).toThrow(
      "data/a.npy: the .npy header is cut short: it announces 128 bytes but the file holds 40; the file is truncated",
    );
  });
});

describe("halfToDouble decodes IEEE 754 binary16", () => {
  // Values of the binary16 format (IEEE 754-2019, Table 3.5 parameters: bias 15, 10
  // fraction bits), worked out from its definition; exact, so compared with toBe.
  it.each([
    [0x3c00, 1],
    [0xc000, -2],
    [0x7bff, 65504], // largest finite: (2 − 2^−10) · 2^15
    [0x0400, 2 ** -14], // smallest normal
    [0x0001, 2 ** -24], // smallest subnormal
    [0x3555, 0.333251953125], // (1024 + 0x155) · 2^−12, the binary16 nearest 1/3
    [0x7c00, Infinity],
    [0xfc00, -Infinity],
  ])("bits %s are %s", (bits, value) => {
    expect(halfToDouble(bits)).toBe(value);
  });

  it("NaN patterns are NaN and 0x8000 is −0", () => {
    expect(halfToDouble(0x7e00)).toBeNaN();
    expect(Object.is(halfToDouble(0x8000), -0)).toBe(true);
  });
});

describe("crc32", () => {
  it('gives the check value 0xCBF43926 for "123456789" (the CRC-32 of ISO 3309 / ITU-T V.42)', () => {
    // The standard check value of this CRC (Greg Cook's catalogue of parametrised CRC algorithms, CRC-32/ISO-HDLC).
    expect(crc32(new TextEncoder().encode("123456789"))).toBe(0xcbf43926);
    expect(crc32(new TextEncoder().encode("6789"), crc32(new TextEncoder().encode("12345")))).toBe(0xcbf43926);
  });
});
