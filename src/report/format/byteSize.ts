/**
 * Sizes given on the command line: a number with an optional unit, decimal
 * (kB, MB, GB, TB: powers of 1000, SI Brochure Table 7) or binary (KiB, MiB,
 * GiB, TiB: powers of 1024, IEC 80000-13). Letters are read without regard to
 * case except that a lone `b` is taken as bytes, never bits.
 */
const UNITS: Record<string, number> = {
  "": 1,
  b: 1,
  kb: 1e3,
  mb: 1e6,
  gb: 1e9,
  tb: 1e12,
  kib: 1024,
  mib: 1024 ** 2,
  gib: 1024 ** 3,
  tib: 1024 ** 4,
};

/** What a size must look like, for messages. */
export const BYTE_SIZE_FORM = "a size such as 300MB, 50MiB, 2GiB or 0 (units B, kB, MB, GB, TB, KiB, MiB, GiB, TiB)";

/** The number of bytes `text` names, or null when it is not a size (negative, not finite, unknown unit). */
export function parseByteSize(text: string): number | null {
  const m = /^\s*(\d+(?:\.\d+)?|\.\d+)\s*([a-zA-Z]*)\s*$/.exec(text);
  if (!m) return null;
  const factor = UNITS[m[2].toLowerCase()];
  if (factor === undefined) return null;
  const bytes = Math.floor(Number(m[1]) * factor);
  return Number.isSafeInteger(bytes) ? bytes : null;
}

/** A size in words for messages and the page: `300 MB`, `1.5 GB`, `512 bytes` (decimal units, as most file managers show them). */
export function byteSizeText(bytes: number): string {
  if (bytes < 1000) return `${bytes} bytes`;
  const units = ["kB", "MB", "GB", "TB"];
  let value = bytes / 1000;
  let i = 0;
  while (value >= 1000 && i < units.length - 1) {
    value /= 1000;
    i++;
  }
  return `${value >= 100 ? Math.round(value) : Number(value.toPrecision(3))} ${units[i]}`;
}
