// An HDF5 file's `units` attribute supplies energy_unit when audit.yaml leaves it out. The files are written
// by h5py (scripts/fixtures/write_formats.py): the compound table carries units = "meV" on the table, the
// per-column file on /runs/Q only. Leaving energy_unit out must give the very checks of declaring meV, with
// the report saying where the unit came from; attributes that disagree, or a unit the tool does not know,
// are refused with the paths named; a text file still needs energy_unit.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { ConfigError, DataError } from "../../src/errors.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import type { CumulantsDataset, SamplesDataset } from "../../src/ingest/types.ts";
import { FORMAT_FIXTURES, formatsAudit } from "../helpers/formatsAudit.ts";
import { rejectedWith, thrownBy } from "../helpers/thrown.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { expectClose } from "../helpers/expectClose.ts";

const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-units-"));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

/** The fixtures' audit over `file`, with energy_unit left out. */
async function withoutUnit(file: string, keys: string[], from = FORMAT_FIXTURES): Promise<string> {
  const dir = await formatsAudit(work, file, keys, (target) => fs.copyFileSync(path.join(from, file), target));
  const yaml = path.join(dir, "audit.yaml");
  fs.writeFileSync(yaml, fs.readFileSync(yaml, "utf8").replace("    energy_unit: meV\n", ""));
  return dir;
}

describe("energy_unit from HDF5 units attributes", () => {
  it("takes meV from the compound table's attribute: the checks of declaring meV, and the report says so", async () => {
    const keys = ["dataset: /runs/exchange", "columns: { Q: Q_meV, dN: n }"];
    const declared = await runAudit(await formatsAudit(work, "compound.h5", keys));
    const stated = await runAudit(await withoutUnit("compound.h5", keys));
    expect(stated.result.checks).toEqual(declared.result.checks);
    const d = stated.audit.datasets[0] as SamplesDataset;
    expect(d.energyUnit).toEqual((declared.audit.datasets[0] as SamplesDataset).energyUnit);
    expect(d.format).toBe(`${declared.audit.datasets[0].format}; energies in meV, from the units attribute of /runs/exchange`);
  });

  it("takes it from the one energy column that states it in a file of 1-D datasets", async () => {
    const d = (await ingestAudit(await withoutUnit("columns.h5", ["columns: { Q: /runs/Q, dN: /runs/n }"]))).datasets[0] as SamplesDataset;
    expect(d.energyUnit.name).toBe("meV");
    expect(d.format).toMatch(/; energies in meV, from the units attribute of \/runs\/Q$/);
  });

  it("refuses energy columns whose attributes disagree, naming each path and unit", async () => {
    const dir = await withoutUnit("units-conflict.h5", ["columns: { Q: /runs/Q, W: /runs/W, dN: /runs/n }"], path.join(FORMAT_FIXTURES, "bad"));
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe(
      'data/units-conflict.h5: the energy columns state different units (/runs/Q "meV", /runs/W "eV"); convert them to one unit, or give energy_unit in audit.yaml datasets[0] if the attributes are wrong',
    );
  });

  it("refuses a unit it does not know, taking no case for another (MeV is not meV)", async () => {
    const dir = await withoutUnit("units-unknown.h5", ["columns: { Q: /runs/Q, dN: /runs/n }"], path.join(FORMAT_FIXTURES, "bad"));
    expect((await rejectedWith(ConfigError, () => ingestAudit(dir))).message).toBe(
      'audit.yaml datasets[0].energy_unit: is missing, and /runs/Q states the unit "MeV", which is not one of J, eV, meV, ueV, µeV, kT; give energy_unit',
    );
  });

  it("still requires energy_unit for a text file, by the dataset's line and key", async () => {
    const dir = await withoutUnit("comma.csv", ["columns: { Q: Q_meV, dN: n }"]);
    expect(thrownBy(ConfigError, () => loadAuditDefinition(dir)).message).toBe("audit.yaml:8 datasets[0].energy_unit: is missing; must be one of J, eV, meV, ueV, µeV, kT");
  });

  it("reads a cumulants table's unit from its Q column (h5py), which defaulted to J before", async () => {
    const yaml = (unit: string) => `id: units
title: Units from attributes
authors: [{ name: "Test Author" }]
datasets:
  - id: curve
    kind: cumulants
    file: data/cumulants.h5
    columns: { tau: /curve/tau, Q: /curve/Q, dN: /curve/dN, u_Q: /curve/u_Q, u_dN: /curve/u_dN }
    time_unit: ns
${unit}`;
    const write = (text: string) => {
      const dir = tempAudit(text, {});
      fs.mkdirSync(path.join(dir, "data"));
      fs.copyFileSync(path.join(FORMAT_FIXTURES, "cumulants.h5"), path.join(dir, "data/cumulants.h5"));
      return dir;
    };
    const declared = (await ingestAudit(write(yaml("    energy_unit: meV\n")))).datasets[0] as CumulantsDataset;
    const stated = (await ingestAudit(write(yaml("")))).datasets[0] as CumulantsDataset;
    expect(stated.Q).toEqual(declared.Q);
    expect(stated.u_Q).toEqual(declared.u_Q);
    // savetxt's first row: Q = 0.125 meV = 0.125 × 1.602176634e-22 J (elementary charge exact, SI 2019).
    expectClose(stated.Q![0], 0.125 * 1.602176634e-22, { rtol: 1e-15, source: "1 meV = 1.602176634e-22 J exactly (SI 2019); rtol 1e-15, the unit's own rounding" });
    expect(stated.config.energy_unit).toBe("meV");
    expect(stated.format).toMatch(/; energies in meV, from the units attribute of \/curve\/Q and \/curve\/u_Q$/);
  });

  it("keeps J as a text cumulants table's default in the definition itself (so the fingerprints of earlier versions hold)", () => {
    const dir = tempAudit(
      `id: units\ntitle: Default unit\nauthors: [{ name: "Test Author" }]\ndatasets:\n  - id: curve\n    kind: cumulants\n    file: data/cumulants.csv\n`,
      { "data/cumulants.csv": fs.readFileSync(path.join(FORMAT_FIXTURES, "cumulants.csv"), "utf8") },
    );
    expect((loadAuditDefinition(dir).datasets[0] as { energy_unit?: string }).energy_unit).toBe("J");
  });
});
