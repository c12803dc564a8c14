import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { runAudit } from "../../src/report/runAudit.ts";
import { synthDot, synthDoubleDot, synthFermions, synthTilted, writeAuditFolder, type SynthAudit } from "../../src/synth/index.ts";

async function audited(audit: SynthAudit) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-synth-"));
  writeAuditFolder(dir, audit);
  const { result } = await runAudit(dir);
  const status = (check: string) => result.checks.find((c) => c.check === check)?.status;
  return { result, status };
}

// Each simulator's output, audited exactly as written. Which relations must hold follows from the model
// (Andrieux, Gaspard, Monnai & Tasaki, NJP 11, 043014 (2009) for the exchange relation; Jarzynski & Wójcik,
// PRL 92, 230602 (2004)); the sizes are chosen so the data resolve the checks' 5 % margins (fixed seeds).
describe("synth outputs audited as written", () => {
  it("fermions without a field pass the exchange, integral and weighted relations and the second law", async () => {
    const audit = await synthFermions({ "size-a": "16", "size-b": "12", tau: "5", "mu-a": "0.6", "temperature-b": "6" }, { workers: 0 });
    const { status } = await audited(audit);
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity", "second-law"]) expect([check, status(check)]).toEqual([check, "pass"]);
  });

  it("fermions with a Peierls phase state the field: the detailed relation is not applicable, the integral relation passes", async () => {
    const audit = await synthFermions(
      { "lattice-a": "grid", "size-a": "5x3", "lattice-b": "grid", "size-b": "4x3", bonds: "3", flux: "0.8", tau: "4", "mu-a": "0.3", samples: "30000" },
      { workers: 0 },
    );
    expect(audit.yaml).toMatch(/\n {4}field: [0-9.e+-]+\n/);
    const { status } = await audited(audit);
    expect(status("exchange-fluctuation")).toBe("not-applicable");
    expect(status("weighted-identity")).toBe("not-applicable");
    expect(status("integral-fluctuation")).toBe("pass");
    expect(status("second-law")).toBe("pass");
  });

  it("dot started in equilibrium with lead A passes the integral and weighted relations and the second law", async () => {
    const { status } = await audited(synthDot({ start: "equilibrium-a", samples: "60000" }));
    for (const check of ["integral-fluctuation", "weighted-identity", "second-law"]) expect([check, status(check)]).toEqual([check, "pass"]);
    // Q and dN are proportional here (Q = ε dN, W = 0), so the relation is tested along Σ alone: it must not fail.
    expect(status("exchange-fluctuation")).not.toBe("fail");
  });

  it("dot from the stationary state, written with its occupation at both ends, passes the exact relations for Σ_tot", async () => {
    // Seifert, PRL 95, 040602 (2005): Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) obeys the detailed and integral relations at every τ.
    const { status } = await audited(synthDot({}));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity", "second-law"]) expect([check, status(check)]).toEqual([check, "pass"]);
  });

  it("dot with a heating detector on lead A's transitions fails the exchange, integral and weighted relations", async () => {
    const { status } = await audited(synthDot({ "detector-heating": "2.5" }));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity"]) expect([check, status(check)]).toEqual([check, "fail"]);
  });

  it("serial double dot with its charge states passes the exact relations; with a heating detector on the inter-dot jumps it fails them", async () => {
    const { status } = await audited(synthDoubleDot({}));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity", "second-law"]) expect([check, status(check)]).toEqual([check, "pass"]);
    const heated = await audited(synthDoubleDot({ "detector-heating": "3" }));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity"]) expect([check, heated.status(check)]).toEqual([check, "fail"]);
  });

  it("tilted at the declared temperatures passes the fluctuation checks", async () => {
    const { status } = await audited(synthTilted({}));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity", "second-law"]) expect([check, status(check)]).toEqual([check, "pass"]);
  });

  it("tilted drawn at a wrong temperature of A fails the exchange, integral and weighted relations", async () => {
    const { result, status } = await audited(synthTilted({ "draw-temperature-a": "1.6" }));
    for (const check of ["exchange-fluctuation", "integral-fluctuation", "weighted-identity"]) expect([check, status(check)]).toEqual([check, "fail"]);
    expect(result.stamp).toBe("fail");
  });
});
