import { InputError } from "../errors.ts";
import type { CumulantsDatasetConfig } from "../config/types.ts";
import type { CumulantsDataset } from "./types.ts";

// Implemented with the response audits; until then refused with a clear message.
export async function loadCumulants(config: CumulantsDatasetConfig, _filePath: string, keyPath: string): Promise<CumulantsDataset> {
  throw new InputError(`audit.yaml ${keyPath}.kind: cumulants datasets (${config.file}) are not supported by this version yet`);
}
