import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import type { AddressInfo } from "node:net";

/** Content types of the files a built site holds. */
const TYPES: Record<string, string> = {
  ".html": "text/html; charset=utf-8",
  ".css": "text/css; charset=utf-8",
  ".js": "text/javascript; charset=utf-8",
  ".json": "application/json; charset=utf-8",
  ".svg": "image/svg+xml",
  ".png": "image/png",
  ".woff2": "font/woff2",
  ".woff": "font/woff",
  ".ttf": "font/ttf",
  ".pdf": "application/pdf",
  ".csv": "text/csv; charset=utf-8",
  ".bib": "application/x-bibtex; charset=utf-8",
  ".cff": "text/plain; charset=utf-8",
  ".ris": "application/x-research-info-systems; charset=utf-8",
  ".txt": "text/plain; charset=utf-8",
  ".yaml": "text/yaml; charset=utf-8",
  ".zip": "application/zip",
};

export interface StaticServer {
  origin: string; // http://127.0.0.1:<port>
  close: () => Promise<void>;
}

/** The file a URL path names inside root, or undefined if it leaves root or does not exist. */
export function resolveFile(root: string, urlPath: string): string | undefined {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath.split("?")[0].split("#")[0]);
  } catch {
    return undefined;
  }
  const file = path.resolve(root, `.${decoded}`);
  if (file !== root && !file.startsWith(root + path.sep)) return undefined;
  if (!fs.existsSync(file)) return undefined;
  if (fs.statSync(file).isDirectory()) {
    const index = path.join(file, "index.html");
    return fs.existsSync(index) ? index : undefined;
  }
  return file;
}

/**
 * Serve a folder read-only on 127.0.0.1 at an ephemeral port, as a plain
 * static host would: GET and HEAD only, 404 for anything missing, a folder
 * answered by its index.html.
 */
export async function serveStatic(rootDir: string): Promise<StaticServer> {
  const root = path.resolve(rootDir);
  const server = http.createServer((req, res) => {
    if (req.method !== "GET" && req.method !== "HEAD") {
      res.writeHead(405, { Allow: "GET, HEAD" }).end();
      return;
    }
    const file = resolveFile(root, req.url ?? "/");
    if (!file) {
      res.writeHead(404, { "Content-Type": "text/plain; charset=utf-8" }).end(`not found: ${req.url}`);
      return;
    }
    const body = fs.readFileSync(file);
    res.writeHead(200, {
      "Content-Type": TYPES[path.extname(file).toLowerCase()] ?? "application/octet-stream",
      "Content-Length": body.length,
      "Cache-Control": "no-store",
    });
    res.end(req.method === "HEAD" ? undefined : body);
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  return {
    origin: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.closeAllConnections();
        server.close((err) => (err ? reject(err) : resolve()));
      }),
  };
}
