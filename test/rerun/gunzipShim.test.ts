/**
 * The browser bundle's gzip inflater (src/browser/engine/shims/zlib.ts, on
 * fflate) against Node's zlib, the reference: the same text from a
 * two-member file written in small pieces (so members and trailers straddle
 * the pieces), and zlib's error codes for a changed check value (RFC 1952
 * §2.3.1: CRC-32 and length of each member) and for input cut short.
 */
import zlib from "node:zlib";
import { expect, test } from "vitest";
import { createGunzip } from "../../src/browser/engine/shims/zlib.ts";

/** Inflate `bytes` written in pieces of `piece` bytes; the text, or the error's code. */
async function inflate(bytes: Uint8Array, piece: number): Promise<{ text?: Buffer; code?: string }> {
  const inflater = createGunzip();
  void (async () => {
    for (let at = 0; at < bytes.length; at += piece) {
      if (!inflater.write(bytes.subarray(at, at + piece))) await new Promise((resolve) => inflater.once("drain", resolve));
    }
    inflater.end();
  })();
  const out: Buffer[] = [];
  try {
    for await (const chunk of inflater as AsyncIterable<Buffer>) out.push(chunk);
    return { text: Buffer.concat(out) };
  } catch (err) {
    return { code: (err as { code?: string }).code };
  }
}

const text = Buffer.from(Array.from({ length: 4000 }, (_, i) => `${i},${(i * 0.37).toFixed(3)},${i % 7}\n`).join(""));
const twoMembers = Buffer.concat([zlib.gzipSync(text.subarray(0, 30_001)), zlib.gzipSync(text.subarray(30_001))]);

test("two members written 7, 1000 and all bytes at a time give zlib's text", async () => {
  expect(zlib.gunzipSync(twoMembers).equals(text)).toBe(true); // the reference reads both members
  for (const piece of [7, 1000, twoMembers.length]) expect((await inflate(twoMembers, piece)).text?.equals(text)).toBe(true);
});

test("a changed CRC-32 or length in either member's trailer: Z_DATA_ERROR, as zlib says", async () => {
  const firstEnd = zlib.gzipSync(text.subarray(0, 30_001)).length;
  for (const at of [firstEnd - 8, firstEnd - 1, twoMembers.length - 8, twoMembers.length - 1]) {
    const bad = Buffer.from(twoMembers);
    bad[at] ^= 0x01;
    expect(() => zlib.gunzipSync(bad)).toThrow(expect.objectContaining({ code: "Z_DATA_ERROR" }));
    expect(await inflate(bad, 1000)).toEqual({ code: "Z_DATA_ERROR" });
  }
});

test("input cut inside the compressed data: Z_BUF_ERROR, as zlib says", async () => {
  for (const length of [5, 30, 200, 1000, twoMembers.length - 2000]) {
    const cut = twoMembers.subarray(0, length);
    expect(() => zlib.gunzipSync(cut)).toThrow(expect.objectContaining({ code: "Z_BUF_ERROR" }));
    expect(await inflate(cut, 64)).toEqual({ code: "Z_BUF_ERROR" });
  }
});
