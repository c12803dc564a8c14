import type { ResultDocument } from "../resultDocument.ts";
import type { DisplayContext } from "./displayUnit.ts";

/**
 * The one temperature of a coefficient dataset's operating points, from the
 * per-point values its checks report (`per_point[].T`), when every point
 * shares it; undefined when they differ or none is reported. Thermal
 * conductances in units of g₀ = π² k_B² T/(3h) need it.
 */
function sharedTemperature(checks: ResultDocument["checks"], dataset: string | undefined): number | undefined {
  const temperatures = new Set<number>();
  for (const c of checks) {
    if (c.dataset !== dataset || !Array.isArray(c.values?.per_point)) continue;
    for (const p of c.values.per_point as { T?: unknown }[]) if (typeof p?.T === "number" && p.T > 0 && Number.isFinite(p.T)) temperatures.add(p.T);
  }
  return temperatures.size === 1 ? [...temperatures][0] : undefined;
}

/**
 * What a check's numbers are shown against: its dataset's energy unit (or,
 * for a group check, the one unit its audit's datasets share), the audit's
 * `display:` choices, and the dataset's one temperature where it has one.
 * Older frozen results carry none of the first two; they get the defaults.
 */
export function displayContextFor(doc: Pick<ResultDocument, "datasets" | "display"> & { checks?: ResultDocument["checks"] }, dataset?: string): DisplayContext {
  const own = doc.datasets.find((d) => d.id === dataset)?.energy_unit;
  const units = new Set(doc.datasets.map((d) => d.energy_unit).filter((u): u is string => u !== undefined));
  const energyUnit = own ?? (units.size === 1 ? [...units][0] : undefined);
  const temperature = doc.checks ? sharedTemperature(doc.checks, dataset) : undefined;
  return { ...(energyUnit ? { energyUnit } : {}), ...(doc.display ? { overrides: doc.display } : {}), ...(temperature !== undefined ? { temperature } : {}) };
}
