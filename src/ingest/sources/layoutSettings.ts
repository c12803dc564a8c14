import type { FileLayoutSettings } from "./types.ts";

/** The layout keys of a dataset's configuration (every kind carries them), as a source takes them. */
export function layoutSettings(config: Partial<FileLayoutSettings>): FileLayoutSettings {
  return { format: config.format, decimal: config.decimal, header: config.header, skip_lines: config.skip_lines, dataset: config.dataset };
}
