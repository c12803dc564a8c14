export { synthFermions, synthFermionsInThread, FERMION_PARAMETERS, FERMION_REFERENCES } from "./fermionsAudit.ts";
export { synthDot, DOT_PARAMETERS, DOT_REFERENCES } from "./dotAudit.ts";
export { synthDoubleDot, DOUBLE_DOT_PARAMETERS, DOUBLE_DOT_REFERENCES } from "./doubleDotAudit.ts";
export { synthTilted, TILTED_PARAMETERS, TILTED_REFERENCES } from "./tiltedAudit.ts";
export { writeAuditFolder, type SynthAudit } from "./auditFolder.ts";
export type { SynthParameter } from "./parameters.ts";
