import type { CheckDefinition } from "./types.ts";
import { secondLaw } from "./second-law/secondLaw.ts";

/** Every check the tool knows, in the order the report lists them. Adding a check: one module, one line here. */
export const CHECKS: readonly CheckDefinition[] = [
  secondLaw,
];

export * from "./types.ts";
