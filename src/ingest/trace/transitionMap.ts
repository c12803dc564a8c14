import { DataError } from "../../errors.ts";
import type { TraceDatasetConfig } from "../../config/types.ts";

/** What one jump of the conductor moves into each lead (declared energy unit). */
export interface TraceTransition {
  dN_A: number;
  dN_B: number;
  dE_A: number;
  dE_B: number;
}

/**
 * Each jump of the trace looked up in audit.yaml's `transitions`: null for a
 * row that repeats the current state (no jump). A jump audit.yaml does not map
 * is an error naming the row, so that no transfer is silently dropped.
 */
export function mapJumps(config: TraceDatasetConfig, states: Int32Array, rowOf: (i: number) => string, where: string): (TraceTransition | null)[] {
  const map = new Map<string, TraceTransition>();
  for (const t of config.transitions) map.set(`${t.from}>${t.to}`, { dN_A: t.dN_A ?? 0, dN_B: t.dN_B ?? 0, dE_A: t.dE_A ?? 0, dE_B: t.dE_B ?? 0 });
  const out: (TraceTransition | null)[] = [null];
  const unknown = new Map<string, string>();
  for (let i = 1; i < states.length; i++) {
    if (states[i] === states[i - 1]) {
      out.push(null);
      continue;
    }
    const key = `${states[i - 1]}>${states[i]}`;
    const t = map.get(key);
    if (!t && !unknown.has(key)) unknown.set(key, rowOf(i));
    out.push(t ?? null);
  }
  if (unknown.size > 0) {
    const list = [...unknown].map(([k, row]) => `${k.replace(">", " → ")} (first at ${row})`).join(", ");
    throw new DataError(`${config.file}: the trace jumps ${list}, which ${where}.transitions does not map; add what each such jump moves into lead A and lead B (dN_A, dN_B, dE_A, dE_B)`);
  }
  return out;
}

/** The jumps audit.yaml declares with `lead: unresolved`, written `0 → 1`; empty when every jump's lead is known. */
export function unresolvedJumps(config: TraceDatasetConfig): string[] {
  return config.transitions.filter((t) => t.lead === "unresolved").map((t) => `${t.from} → ${t.to}`);
}
