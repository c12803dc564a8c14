export * from "./types.ts";
export * from "./readCsv.ts";
export * from "./samples.ts";
export * from "./loadAudit.ts";
