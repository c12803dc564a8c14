/// <reference lib="dom" />
/**
 * Files fetched from the site by relative URL (any static host, or a local
 * folder served over HTTP), read as streams so that the panel can say how many
 * bytes have arrived.
 */

export class FetchError extends Error {}

/** Fetch `url` whole, calling `onBytes` with the bytes received so far. */
export async function fetchBytes(url: string, signal: AbortSignal, onBytes: (received: number) => void): Promise<Uint8Array> {
  const response = await fetch(url, { signal, cache: "no-store" });
  if (!response.ok) throw new FetchError(`${url}: the site answered ${response.status} ${response.statusText}`.trim());
  if (!response.body) {
    const whole = new Uint8Array(await response.arrayBuffer());
    onBytes(whole.length);
    return whole;
  }
  const reader = response.body.getReader();
  const chunks: Uint8Array[] = [];
  let received = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    chunks.push(value);
    received += value.length;
    onBytes(received);
  }
  const out = new Uint8Array(received);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}

/** Fetch JSON text (and the text itself, for byte-exact comparison). */
export async function fetchText(url: string, signal: AbortSignal): Promise<string> {
  return new TextDecoder().decode(await fetchBytes(url, signal, () => {}));
}

/**
 * Fetch several files one after another, reporting the total received over the
 * total expected. `paths` are relative to `base`; each is URL-encoded segment by
 * segment, so a file name with `#` or `?` still names the file.
 */
export async function fetchAll(
  base: string,
  files: readonly { path: string; bytes: number }[],
  signal: AbortSignal,
  onProgress: (received: number, total: number, file: string) => void,
): Promise<Map<string, Uint8Array>> {
  const total = files.reduce((s, f) => s + f.bytes, 0);
  const out = new Map<string, Uint8Array>();
  let before = 0;
  for (const f of files) {
    const url = base + f.path.split("/").map(encodeURIComponent).join("/");
    const bytes = await fetchBytes(url, signal, (n) => onProgress(before + n, total, f.path));
    out.set(f.path, bytes);
    before += bytes.length;
  }
  return out;
}
