import type { ResultDocument } from "../resultDocument.ts";
import type { DisplayContext } from "./displayUnit.ts";

/**
 * What a check's numbers are shown against: its dataset's energy unit (or,
 * for a group check, the one unit its audit's datasets share) and the audit's
 * `display:` choices. Older frozen results carry neither; they get the
 * defaults.
 */
export function displayContextFor(doc: Pick<ResultDocument, "datasets" | "display">, dataset?: string): DisplayContext {
  const own = doc.datasets.find((d) => d.id === dataset)?.energy_unit;
  const units = new Set(doc.datasets.map((d) => d.energy_unit).filter((u): u is string => u !== undefined));
  const energyUnit = own ?? (units.size === 1 ? [...units][0] : undefined);
  return { ...(energyUnit ? { energyUnit } : {}), ...(doc.display ? { overrides: doc.display } : {}) };
}
