/**
 * `build --data-size-limit`: sizes as people write them. Decimal prefixes are
 * powers of 1000 (SI Brochure, 9th ed., Table 7); binary prefixes Ki, Mi, Gi,
 * Ti are powers of 1024 (IEC 80000-13:2008, clause 4). Every expected value is
 * exact integer arithmetic.
 */
import { describe, expect, it } from "vitest";
import { byteSizeText, parseByteSize } from "../../../src/report/format/byteSize.ts";
import { parseDataSizeLimit } from "../../../src/cli/commands/build.ts";

describe("parseByteSize reads a number and a unit", () => {
  it.each([
    ["300MB", 300_000_000],
    ["50MB", 50_000_000],
    ["50 MB", 50_000_000],
    ["2GiB", 2 * 1024 ** 3],
    ["1.5GB", 1_500_000_000],
    ["512KiB", 512 * 1024],
    ["1kB", 1000],
    ["1KB", 1000],
    ["7 b", 7],
    ["0", 0],
    ["123456", 123_456],
    ["1TiB", 1024 ** 4],
    ["0.5MiB", 524_288],
  ])("%s is %d bytes", (text, bytes) => {
    expect(parseByteSize(text)).toBe(bytes);
  });

  it.each(["", "MB", "-5MB", "12XB", "1e3MB", "3 M B", "1,5GB", "Infinity", "99999999999TB"])("refuses %j", (text) => {
    expect(parseByteSize(text)).toBeNull();
  });

  it("the option's message names the option, the accepted form and what was found", () => {
    expect(() => parseDataSizeLimit("lots")).toThrow(
      '--data-size-limit must be a size such as 300MB, 50MiB, 2GiB or 0 (units B, kB, MB, GB, TB, KiB, MiB, GiB, TiB); found "lots"',
    );
    expect(parseDataSizeLimit("2GiB")).toBe(2_147_483_648);
  });
});

describe("byteSizeText writes a size for a reader (decimal units)", () => {
  it.each([
    [512, "512 bytes"],
    [1245792, "1.25 MB"],
    [300_000_000, "300 MB"],
    [2_147_483_648, "2.15 GB"],
  ])("%d bytes read %s", (bytes, text) => {
    expect(byteSizeText(bytes)).toBe(text);
  });
});
