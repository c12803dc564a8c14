/** `node:url` for the browser bundle: file URLs as Node forms them, for the paths module code computes from import.meta.url. */
export function fileURLToPath(url: string | URL): string {
  const u = typeof url === "string" ? new URL(url) : url;
  return decodeURIComponent(u.pathname);
}

export function pathToFileURL(path: string): URL {
  return new URL(`file://${encodeURI(path)}`);
}

const URLClass = globalThis.URL;
export { URLClass as URL };

export default { fileURLToPath, pathToFileURL, URL: URLClass };
