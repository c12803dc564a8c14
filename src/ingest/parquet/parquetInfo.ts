import { openParquet } from "./openParquet.ts";
import { topLevelColumns } from "./numericColumns.ts";
import { sha256HexOfFileAsync } from "../fileDigest.ts";
import type { ParquetInfo } from "./types.ts";

/**
 * Row count and top-level column names from the footer (no data pages are read), and
 * the SHA-256 of the file's bytes (streamed). Refuses what openParquet refuses.
 */
export async function parquetInfo(filePath: string, label: string): Promise<ParquetInfo> {
  const open = await openParquet(filePath, label);
  let rows: number;
  let columns: string[];
  try {
    rows = open.rows;
    columns = topLevelColumns(open.metadata);
  } finally {
    await open.file.close();
  }
  return { rows, columns, sha256: await sha256HexOfFileAsync(filePath) };
}
