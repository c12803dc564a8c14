import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { buildSite, type BuildOutcome } from "../../src/report/buildSite.ts";
import { serveStatic, type StaticServer } from "./staticServer.ts";

export const PROJECT_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
/** Screenshots and rendered pages kept for a person to look at (git-ignored). */
export const ARTIFACTS = path.join(PROJECT_ROOT, "test-artifacts", "browser");

export interface DemoSite {
  outcome: BuildOutcome;
  server: StaticServer;
  close: () => Promise<void>;
}

/** Build the committed demo archive into a fresh temporary folder and serve it on 127.0.0.1. */
export async function startDemoSite(): Promise<DemoSite> {
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-site-"));
  const outcome = await buildSite({ root: PROJECT_ROOT, out: path.join(tmp, "site") });
  const server = await serveStatic(outcome.out);
  return {
    outcome,
    server,
    close: async () => {
      await server.close();
      fs.rmSync(tmp, { recursive: true, force: true });
    },
  };
}
