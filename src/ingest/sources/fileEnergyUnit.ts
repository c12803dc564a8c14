import { ConfigError, DataError } from "../../errors.ts";
import { ENERGY_UNITS } from "../../config/samplesSchema.ts";
import { openSource } from "./index.ts";
import type { OpenSource, SourceRequest } from "./types.ts";

/** The energy unit a dataset's files state, and the sentence the report gives about it. */
export interface StatedEnergyUnit {
  unit: (typeof ENERGY_UNITS)[number];
  /** "energies in meV, from the units attribute of /runs/Q and /runs/W" */
  statement: string;
}

/**
 * When `energy_unit` is absent, the unit the files state for the dataset's
 * energy columns (`energyRoles`): every stated unit must be one of ours and
 * all must agree, across columns and parts; columns stating none take the
 * others' unit. Null when no file states one. `requests` are the raw parts
 * (or the one file); the files are opened for their metadata only.
 */
export async function statedEnergyUnit(requests: SourceRequest[], energyRoles: readonly string[], where: string): Promise<StatedEnergyUnit | null> {
  const stated: UnitStatement[] = [];
  for (const request of requests) {
    const source = await openSource(request);
    try {
      stated.push(...unitStatements(request, source.units, energyRoles));
    } finally {
      await source.close();
    }
  }
  return agreedUnit(stated, requests.length > 1, where);
}

/** One energy column's stated unit: the unit, the path stating it, and the file. */
interface UnitStatement {
  unit: string;
  where: string;
  label: string;
}

/** The units a file states for the requested energy columns. */
export function unitStatements(request: Pick<SourceRequest, "columns" | "label">, units: OpenSource["units"], energyRoles: readonly string[]): UnitStatement[] {
  const out: UnitStatement[] = [];
  request.columns.forEach((want, i) => {
    const u = units?.[i];
    if (u && energyRoles.includes(want.role)) out.push({ ...u, label: request.label });
  });
  return out;
}

/** The one unit the statements agree on (null when there are none); refuses disagreeing or unknown units. */
export function agreedUnit(stated: UnitStatement[], manyFiles: boolean, where: string): StatedEnergyUnit | null {
  if (stated.length === 0) return null;
  const name = (s: UnitStatement) => `${manyFiles ? `${s.label} ` : ""}${s.where}`;
  const distinct = [...new Set(stated.map((s) => s.unit))];
  if (distinct.length > 1) {
    throw new DataError(
      `${stated[0].label}: the energy columns state different units (${stated.map((s) => `${name(s)} "${s.unit}"`).join(", ")}); convert them to one unit, or give energy_unit in audit.yaml ${where} if the attributes are wrong`,
    );
  }
  const unit = distinct[0];
  // The attribute is taken as written: "meV" and "MeV" differ by 10⁹, so no case is corrected.
  const known = (ENERGY_UNITS as readonly string[]).includes(unit) ? (unit as StatedEnergyUnit["unit"]) : null;
  if (known === null) {
    throw new ConfigError(
      `audit.yaml ${where}.energy_unit: is missing, and ${stated.map(name).join(", ")} states the unit "${unit}", which is not one of ${ENERGY_UNITS.join(", ")}; give energy_unit`,
    );
  }
  const places = [...new Set(stated.map((s) => s.where))];
  return { unit: known, statement: `energies in ${known}, from the units attribute of ${places.join(" and ")}` };
}

/** Roles of a samples dataset that hold energies. */
const SAMPLE_ENERGY_ROLES = ["Q", "W", "dE_A", "dE_B"] as const;

/**
 * A samples dataset's configuration with `energy_unit` taken from its files
 * when audit.yaml leaves it out (HDF5 only, see mayStateUnits), and the
 * report's statement of where it came from; unchanged when it is given.
 * `requests` are the dataset's files (summaries left out: their grid
 * records the unit they were written with).
 */
export async function withStatedEnergyUnit<C extends { energy_unit?: string; file: string }>(
  config: C,
  requests: SourceRequest[],
  keyPath: string,
): Promise<{ config: C; statement: string | null }> {
  if (config.energy_unit !== undefined) return { config, statement: null };
  const stated = await statedEnergyUnit(requests, SAMPLE_ENERGY_ROLES, keyPath);
  if (stated === null) {
    throw new ConfigError(
      `audit.yaml ${keyPath}.energy_unit: is missing, and ${config.file} states no units attribute on its energy columns (${SAMPLE_ENERGY_ROLES.join(", ")}); give energy_unit, one of ${ENERGY_UNITS.join(", ")}`,
    );
  }
  return { config: { ...config, energy_unit: stated.unit }, statement: stated.statement };
}
