/** One place where two JSON values differ. */
export interface ValueDifference {
  path: (string | number)[];
  frozen: unknown;
  now: unknown;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === "object" && !Array.isArray(v);
}

/**
 * Every leaf at which two JSON values differ, in document order. Numbers are
 * compared exactly (the result document promises reproduction to the last
 * digit on the same tool version); a member present on one side only is a
 * difference with `undefined` on the other.
 */
export function diffValues(frozen: unknown, now: unknown, path: (string | number)[] = []): ValueDifference[] {
  if (Array.isArray(frozen) && Array.isArray(now)) {
    const out: ValueDifference[] = [];
    const n = Math.max(frozen.length, now.length);
    for (let i = 0; i < n; i++) out.push(...diffValues(frozen[i], now[i], [...path, i]));
    return out;
  }
  if (isObject(frozen) && isObject(now)) {
    const keys = [...new Set([...Object.keys(frozen), ...Object.keys(now)])].sort();
    return keys.flatMap((k) => diffValues(frozen[k], now[k], [...path, k]));
  }
  if (Object.is(frozen, now)) return [];
  if (typeof frozen === "number" && typeof now === "number" && frozen === now) return []; // 0 and −0
  return [{ path, frozen, now }];
}

/** `values.slope_ci[1]` */
export function formatPath(path: readonly (string | number)[]): string {
  let out = "";
  for (const p of path) out += typeof p === "number" ? `[${p}]` : out ? `.${p}` : p;
  return out || "(whole document)";
}

/** A value as a short, exact text: numbers in shortest round-trip form, long values cut. */
export function formatValue(v: unknown): string {
  if (v === undefined) return "(absent)";
  const text = typeof v === "string" ? JSON.stringify(v) : JSON.stringify(v) ?? String(v);
  return text.length > 80 ? `${text.slice(0, 77)}…` : text;
}
