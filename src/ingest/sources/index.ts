import { ConfigError } from "../../errors.ts";
import { compressionSuffix } from "./fileBytes.ts";
import { parquetSource } from "./parquetSource.ts";
import { hdf5Source } from "./hdf5/hdf5Source.ts";
import { npySource } from "./numpy/npySource.ts";
import { npzSource } from "./numpy/npzSource.ts";
import { textSource } from "./text/textSource.ts";
import type { OpenSource, SourceModule, SourceRequest } from "./types.ts";

export type * from "./types.ts";

/**
 * Every format the tool reads: one line per format module. A module answers
 * to its `format:` names and detects its files by name; the first that
 * claims a file takes it. Names and detection are all the registry loads: a
 * module's reader, with the packages behind it (hyparquet and its
 * decompressors, h5wasm, fflate, fzstd), is imported by `import()` inside its
 * `open`, when a file of that format is opened. An audit of text files thus
 * never loads them (half a second of start-up for h5wasm alone);
 * test/cli/lazyImports.test.ts holds every format to this.
 */
export const SOURCES: readonly SourceModule[] = [
  textSource, // comma, tab, semicolon, whitespace; plain, .gz, .zst
  parquetSource, // parquet
  hdf5Source, // hdf5: a compound table or 2-D array (dataset:), or one 1-D dataset per column
  npySource, // npy: a structured or 2-D array
  npzSource, // npz: one 1-D array per column
];

/** Every `format:` value, for the configuration's message. */
export const FORMAT_NAMES: readonly string[] = SOURCES.flatMap((s) => s.formats);

/** The module and format for a file: `format:` when given, else by the file's name (compression suffix removed). */
export function chooseSource(fileName: string, format: string | undefined, keyPath: string): { module: SourceModule; format: string } {
  if (format !== undefined) {
    const module = SOURCES.find((s) => s.formats.includes(format));
    if (!module) throw new ConfigError(`audit.yaml ${keyPath}.format: must be one of ${FORMAT_NAMES.join(", ")}; found ${JSON.stringify(format)}`);
    return { module, format };
  }
  const inner = compressionSuffix(fileName).inner;
  for (const module of SOURCES) {
    const detected = module.detect(fileName) ?? module.detect(inner);
    if (detected !== null) return { module, format: detected };
  }
  throw new ConfigError(
    `audit.yaml ${keyPath}.file: ${JSON.stringify(fileName)} has no extension this tool knows (.csv, .tsv, .txt, .dat, .parquet, optionally .gz or .zst; .h5, .hdf5, .npy, .npz); name the layout with format: (${FORMAT_NAMES.join(", ")})`,
  );
}

/** Open a data file through the source of its format. */
export function openSource(request: SourceRequest): Promise<OpenSource> {
  const { module, format } = chooseSource(request.filePath, request.settings.format, request.keyPath);
  return module.open(request, format);
}
