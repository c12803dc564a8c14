import fs from "node:fs";
import { ConfigError } from "../../errors.ts";
import { descriptorAsyncBuffer } from "../parquet/fileAsyncBuffer.ts";
import { openDataFile } from "./openDataFile.ts";
import { sha256OfDescriptor } from "./fileBytes.ts";
import type { OpenSource, SourceModule, SourceRequest } from "./types.ts";

/**
 * Parquet files (hyparquet, src/ingest/parquet): columns by name or by
 * 1-based position in the schema, batches of row groups in file order, rows
 * numbered from 1 in messages.
 */
export const parquetSource: SourceModule = {
  formats: ["parquet"],
  detect: (name) => (/\.parquet$/i.test(name) ? "parquet" : null),
  open: openParquetSource,
};

async function openParquetSource(request: SourceRequest): Promise<OpenSource> {
  const { label } = request;
  const { fd, size } = openDataFile(request.filePath, label, request.auditDir);
  try {
    // hyparquet and its decompressors (WebAssembly among them) load only when a Parquet file is opened.
    const [{ openParquetBuffer }, { topLevelColumns }, { readOpenParquetColumns }] = await Promise.all([
      import("../parquet/openParquet.ts"),
      import("../parquet/numericColumns.ts"),
      import("../parquet/readParquetColumns.ts"),
    ]);
    const open = await openParquetBuffer(descriptorAsyncBuffer(fd, size), label);
    const available = topLevelColumns(open.metadata);
    // An optional column the file lacks (an uncertainty column, a channel not recorded) is reported as null, as
    // every other source reports it, never refused: only the columns a dataset needs must exist.
    const names = request.columns.map((w): string | null => {
      if (typeof w.column === "string") return w.optional && !available.includes(w.column) ? null : w.column;
      const name = available[w.column - 1];
      if (name === undefined) {
        if (w.optional) return null;
        throw new ConfigError(`audit.yaml ${request.keyPath}.columns.${w.role}: ${label} has ${available.length} column(s); there is no column ${w.column}`);
      }
      return name;
    });
    const wanted = [...new Set(names.filter((n): n is string => n !== null))];
    return {
      label,
      format: "Parquet",
      located: "row",
      names,
      available,
      byteSize: size,
      async *batches(onBytes) {
        for await (const batch of readOpenParquetColumns(open, label, wanted)) {
          const locations = new Float64Array(batch.rows);
          for (let i = 0; i < batch.rows; i++) locations[i] = batch.firstRow + i + 1;
          // Progress in bytes, estimated from the rows decoded (row groups are of similar size).
          onBytes?.(Math.round(((batch.firstRow + batch.rows) / open.rows) * size), size);
          yield { rows: batch.rows, values: names.map((n) => (n === null ? null : batch.values.get(n)!)), locations };
        }
      },
      sha256: () => sha256OfDescriptor(fd, size),
      close: async () => fs.closeSync(fd),
    };
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}
