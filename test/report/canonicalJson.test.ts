import { describe, expect, it } from "vitest";
import { canonicalJson, canonicalDigest } from "../../src/report/canonicalJson.ts";

describe("canonicalJson", () => {
  it("orders keys by code point at every depth and drops white space (RFC 8785 §3.2.3)", () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: "x" } })).toBe('{"a":{"c":"x","d":[3,{"y":2,"z":1}]},"b":1}');
  });

  it("writes numbers in the shortest form that round-trips (ECMA-262 Number::toString)", () => {
    // Examples from RFC 8785 Appendix B: 1e21 → 1e+21, 0.000001 → 0.000001, 1e-7 → 1e-7, 333333333.3333333 unchanged.
    expect(canonicalJson([1e21, 0.000001, 1e-7, 333333333.3333333, -0, 0.1 + 0.2])).toBe("[1e+21,0.000001,1e-7,333333333.3333333,0,0.30000000000000004]");
  });

  it("writes non-finite numbers as null and omits undefined members", () => {
    expect(canonicalJson({ a: Number.NaN, b: undefined, c: Infinity })).toBe('{"a":null,"c":null}');
  });

  it("gives the same digest for equal values built in different key orders", () => {
    expect(canonicalDigest({ x: 1, y: [1, 2] })).toBe(canonicalDigest({ y: [1, 2], x: 1 }));
    expect(canonicalDigest({ x: 1 })).not.toBe(canonicalDigest({ x: 2 }));
  });

  it("round-trips through JSON.parse to an equal value", () => {
    const value = { k: [1.5, "é\n", true, null, { n: 6.02214076e23 }] };
    expect(JSON.parse(canonicalJson(value))).toEqual(value);
  });
});
