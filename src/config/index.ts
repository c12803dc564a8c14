export * from "./loadAudit.ts";
export * from "./confinePath.ts";
export * from "./types.ts";
