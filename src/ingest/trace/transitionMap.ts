import type { TraceDatasetConfig } from "../../config/types.ts";

/** What one jump of the conductor moves into each lead (declared energy unit). */
export interface TraceTransition {
  dN_A: number;
  dN_B: number;
  dE_A: number;
  dE_B: number;
}

/** A jump the trace shows and audit.yaml does not map: its states, and the index of the first row that ends it. */
export interface UnmappedJump {
  from: number;
  to: number;
  first: number;
}

function transitionTable(config: TraceDatasetConfig): Map<string, TraceTransition> {
  const map = new Map<string, TraceTransition>();
  for (const t of config.transitions) map.set(`${t.from}>${t.to}`, { dN_A: t.dN_A ?? 0, dN_B: t.dN_B ?? 0, dE_A: t.dE_A ?? 0, dE_B: t.dE_B ?? 0 });
  return map;
}

/** Every jump of the trace that audit.yaml's `transitions` does not map, once each, in the order they first occur. */
export function unmappedJumps(config: TraceDatasetConfig, states: Int32Array): UnmappedJump[] {
  const map = transitionTable(config);
  const unknown = new Map<string, UnmappedJump>();
  for (let i = 1; i < states.length; i++) {
    if (states[i] === states[i - 1]) continue;
    const key = `${states[i - 1]}>${states[i]}`;
    if (!map.has(key) && !unknown.has(key)) unknown.set(key, { from: states[i - 1], to: states[i], first: i });
  }
  return [...unknown.values()];
}

/**
 * The refusal of a trace with jumps audit.yaml does not map, so that no transfer is silently
 * dropped; `named` words each jump with where it first occurs (the caller quotes cells as written).
 */
export function unmappedJumpsMessage(config: TraceDatasetConfig, named: string[], where: string): string {
  return `${config.file}: the trace jumps ${named.join(", ")}, which ${where}.transitions does not map; add what each such jump moves into lead A and lead B (dN_A, dN_B, dE_A, dE_B)`;
}

/**
 * Each jump of the trace looked up in audit.yaml's `transitions`: null for a
 * row that repeats the current state (no jump). The caller has refused every
 * unmapped jump first (unmappedJumps); meeting one here is a bug of ours.
 */
export function mapJumps(config: TraceDatasetConfig, states: Int32Array): (TraceTransition | null)[] {
  const map = transitionTable(config);
  const out: (TraceTransition | null)[] = [null];
  for (let i = 1; i < states.length; i++) {
    if (states[i] === states[i - 1]) {
      out.push(null);
      continue;
    }
    const t = map.get(`${states[i - 1]}>${states[i]}`);
    if (!t) throw new Error(`mapJumps: the jump ${states[i - 1]} → ${states[i]} is not mapped; unmappedJumps refuses such a trace first`);
    out.push(t);
  }
  return out;
}

/** The jumps audit.yaml declares with `lead: unresolved`, written `0 → 1`; empty when every jump's lead is known. */
export function unresolvedJumps(config: TraceDatasetConfig): string[] {
  return config.transitions.filter((t) => t.lead === "unresolved").map((t) => `${t.from} → ${t.to}`);
}
