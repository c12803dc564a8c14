/**
 * How messages quote what a user wrote. A message must show the value as it
 * was written, be one line on a terminal, and stay short: a 2 MB cell is not
 * echoed whole.
 */

/** Quoted text longer than this many characters is shortened, with its length stated. */
export const MAX_QUOTED_CHARS = 80;
const HEAD = 60;
const TAIL = 12;

/** Characters a terminal would not show or would act on (controls, bidirectional overrides, unassigned): escaped. */
const INVISIBLE = /[\p{C}\u2028\u2029]/gu;

function codePoints(text: string): number {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0xdc00 || c > 0xdfff || i === 0 || text.charCodeAt(i - 1) < 0xd800 || text.charCodeAt(i - 1) > 0xdbff) n++;
  }
  return n;
}

/** The first or last `n` UTF-16 units, moved off a surrogate pair's middle. */
function cut(text: string, n: number, from: "start" | "end"): string {
  if (from === "start") {
    const c = text.charCodeAt(n - 1);
    return text.slice(0, c >= 0xd800 && c <= 0xdbff ? n - 1 : n);
  }
  const c = text.charCodeAt(text.length - n);
  return text.slice(c >= 0xdc00 && c <= 0xdfff ? text.length - n + 1 : text.length - n);
}

const escapeInvisible = (quoted: string) => quoted.replace(INVISIBLE, (c) => `\\u${c.codePointAt(0)!.toString(16).padStart(4, "0")}`);

/**
 * `"seven"`; a text longer than MAX_QUOTED_CHARS as `"abc…xyz" (2097152 characters)`.
 * JSON string escapes, and invisible characters as \uXXXX.
 */
export function quoteForMessage(text: string): string {
  if (text.length <= MAX_QUOTED_CHARS || codePoints(text) <= MAX_QUOTED_CHARS) return escapeInvisible(JSON.stringify(text));
  const shortened = `${cut(text, HEAD, "start")}…${cut(text, TAIL, "end")}`;
  return `${escapeInvisible(JSON.stringify(shortened))} (${codePoints(text)} characters, shortened)`;
}

/** Every double-quoted JSON string in a message requoted by quoteForMessage (shortened when long). */
export function shortenQuotes(message: string): string {
  if (message.length <= MAX_QUOTED_CHARS) return message;
  return message.replace(/"(?:[^"\\]|\\.)*"/g, (quoted) => {
    if (quoted.length <= MAX_QUOTED_CHARS + 2) return quoted;
    try {
      return quoteForMessage(JSON.parse(quoted) as string);
    } catch {
      return quoted;
    }
  });
}

/**
 * A number that came from a file, for a message, when only its double is at
 * hand: beyond 2^53 − 1 the double is not what was written
 * (`9007199254740993` is stored as …992), so the message says so instead of
 * quoting a number the file does not hold.
 */
export function describeStoredNumber(value: number): string {
  if (Number.isFinite(value) && Math.abs(value) > Number.MAX_SAFE_INTEGER && Number.isInteger(value)) {
    return `a number beyond ±${Number.MAX_SAFE_INTEGER} (2^53 − 1), where a double cannot hold every whole number`;
  }
  return String(value);
}
