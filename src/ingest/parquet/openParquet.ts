import { parquetMetadataAsync, type FileMetaData } from "hyparquet";
import { DataError } from "../../errors.ts";
import { openFileAsyncBuffer, type FileAsyncBuffer } from "./fileAsyncBuffer.ts";

/** An open Parquet file whose footer has been read and checked. */
export interface OpenParquet {
  file: FileAsyncBuffer;
  metadata: FileMetaData;
  rows: number;
}

// Apache Parquet format specification, "File format": a file starts and ends with the
// 4-byte marker "PAR1"; before the final marker sit the Thrift-encoded FileMetaData and
// its length as a 4-byte little-endian integer. The smallest conceivable file is
// therefore 4 + 4 + 4 = 12 bytes.
const MAGIC = 0x31524150; // "PAR1" read as a little-endian uint32
const MIN_FILE_BYTES = 12;

async function uint32At(file: FileAsyncBuffer, offset: number): Promise<number> {
  return new DataView(await file.slice(offset, offset + 4)).getUint32(0, true);
}

/** Check the markers and the footer length, naming the file and what was expected. */
async function checkFraming(file: FileAsyncBuffer, label: string): Promise<void> {
  const size = file.byteLength;
  if (size === 0) throw new DataError(`${label}: the file is empty (0 bytes); expected a Parquet file`);
  if (size < 4 || (await uint32At(file, 0)) !== MAGIC) {
    throw new DataError(`${label}: not a Parquet file (it does not start with the 4-byte marker "PAR1")`);
  }
  if (size < MIN_FILE_BYTES || (await uint32At(file, size - 4)) !== MAGIC) {
    throw new DataError(
      `${label}: the Parquet file is truncated: it starts with "PAR1" but does not end with the footer marker "PAR1" (${size} bytes); expected a complete file (was it copied while still being written?)`,
    );
  }
  const footerBytes = await uint32At(file, size - 8);
  if (footerBytes > size - MIN_FILE_BYTES) {
    throw new DataError(`${label}: the Parquet file is damaged: its footer claims ${footerBytes} bytes of metadata but the file has only ${size} bytes`);
  }
}

/** The row count from the footer, cross-checked against the row groups. */
function rowCount(metadata: FileMetaData, label: string): number {
  const rows = Number(metadata.num_rows);
  const inGroups = metadata.row_groups.reduce((sum, group) => sum + Number(group.num_rows), 0);
  if (rows !== inGroups) {
    throw new DataError(`${label}: the Parquet file is damaged: its footer counts ${rows} rows but its row groups hold ${inGroups}`);
  }
  if (rows === 0) throw new DataError(`${label}: the file has no rows; expected at least one row of samples`);
  return rows;
}

/**
 * Open a Parquet file and read its footer. The caller must `file.close()` the
 * result. Refuses a missing file, a file that is not Parquet, a truncated or
 * damaged one, and one without rows.
 */
export async function openParquet(filePath: string, label: string): Promise<OpenParquet> {
  let file: FileAsyncBuffer;
  try {
    file = await openFileAsyncBuffer(filePath);
  } catch {
    throw new DataError(`${label}: cannot read the file (does it exist?)`);
  }
  return openParquetBuffer(file, label);
}

/** The same over a buffer already opened (the caller's descriptor); closes it when the file is refused. */
export async function openParquetBuffer(file: FileAsyncBuffer, label: string): Promise<OpenParquet> {
  try {
    await checkFraming(file, label);
    let metadata: FileMetaData;
    try {
      metadata = await parquetMetadataAsync(file);
    } catch (err) {
      throw new DataError(
        `${label}: the Parquet footer cannot be decoded (${(err as Error).message}); the file is damaged or was written by a program this reader does not understand`,
      );
    }
    return { file, metadata, rows: rowCount(metadata, label) };
  } catch (err) {
    await file.close();
    throw err;
  }
}
