// Regenerates the demo archive in audits/ (invented lab, invented devices).
// Deterministic: every sampler is seeded from a fixed text, so rerunning the
// script reproduces the committed files byte for byte.
//   npm run demo:generate
import path from "node:path";
import { qdHeatExchange, nwSwitchingWork, ddCountingBackaction } from "./demo/exchange.ts";
import { abInterferometerSweep } from "./demo/coefficients.ts";
import { vq5BiasSweep, lc60Series } from "./demo/sweep.ts";
import { lr40SimulatedExchange, qd9SimulatedCounting } from "./demo/simulated.ts";
import { dd3CountingTrace, dd8DetectorBackaction, sd4UnresolvedDot } from "./demo/counting.ts";
import type { DemoAudit } from "./demo/types.ts";
import { writeAuditFolder } from "../src/synth/auditFolder.ts";

const GENERATORS: (() => DemoAudit)[] = [qdHeatExchange, nwSwitchingWork, ddCountingBackaction, abInterferometerSweep, vq5BiasSweep, lc60Series, lr40SimulatedExchange, qd9SimulatedCounting, dd3CountingTrace, dd8DetectorBackaction, sd4UnresolvedDot];

const root = path.resolve(process.argv[2] ?? "audits");
for (const generate of GENERATORS) {
  const audit = generate();
  const dir = path.join(root, audit.id);
  writeAuditFolder(dir, audit, true);
  process.stderr.write(`wrote ${path.relative(process.cwd(), dir)}\n`);
}
