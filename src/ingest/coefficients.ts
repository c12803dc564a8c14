import { InputError } from "../errors.ts";
import type { CoefficientsDatasetConfig } from "../config/types.ts";
import type { CoefficientsDataset } from "./types.ts";

// Implemented with the coefficient audits; until then an audit that names a
// coefficients dataset is refused with a clear message rather than half-read.
export async function loadCoefficients(config: CoefficientsDatasetConfig, _filePath: string, keyPath: string): Promise<CoefficientsDataset> {
  throw new InputError(`audit.yaml ${keyPath}.kind: coefficients datasets (${config.file}) are not supported by this version yet`);
}
