import fs from "node:fs";
import { DataError } from "../../../errors.ts";
import { FileRangeStream } from "../binary/byteStream.ts";
import { readRecordColumns, type RecordBatch } from "../binary/readRecordColumns.ts";
import { planNpyColumns, whereDataEnd, type NpyColumnRef, type NpyPlan } from "./planNpyColumns.ts";
import { readNpyHeader } from "./readNpyHeader.ts";
import type { NpyHeader } from "./npyHeader.ts";
import { npyDtype } from "./npyDtype.ts";

/** The data section must hold exactly what the header promises: no less (truncated), no more (several arrays saved into one file). */
export function checkDataLength(header: NpyHeader, plan: NpyPlan, available: number, label: string, columnName?: string): void {
  if (available < plan.dataBytes) {
    const end = whereDataEnd(header, available);
    const row = end.row;
    const column = columnName ?? end.column;
    throw new DataError(
      `${label}, row ${row}, column "${column}": the data end inside this row: the header (shape (${header.shape.join(", ")})) promises ${plan.dataBytes} bytes of data after its ${header.dataOffset}-byte header, the file holds ${available}; the file is truncated (was it copied while still being written?)`,
    );
  }
  if (available > plan.dataBytes) {
    throw new DataError(
      `${label}: ${available - plan.dataBytes} bytes follow the array the header describes (shape (${header.shape.join(", ")}), ${plan.dataBytes} bytes of data); a file holding several arrays saved one after another is not read: save one array per file, or all of them in one .npz`,
    );
  }
}

function availableColumns(header: NpyHeader): string[] {
  const fields = npyDtype(header.descr)?.fields;
  if (fields) return fields.map((f) => f.name);
  return header.shape.length === 2 ? Array.from({ length: header.shape[1] }, (_, i) => String(i + 1)) : [];
}

/** A .npy file whose header was read and checked against the requested columns and the file's length. */
export interface OpenNpy {
  header: NpyHeader;
  plan: NpyPlan;
  /** What the file is, for the report. */
  description: string;
  /** The columns it offers: field names, or positions from 1. */
  available: string[];
  batches(options?: { batchRows?: number }): AsyncGenerator<RecordBatch>;
}

/**
 * Open the .npy file on descriptor `fd` (`size` bytes). Its batches hold the requested
 * columns as doubles, in batches of bounded size (see readRecordColumns), read with
 * positioned reads: a C-order or structured array a block of rows at a time, a
 * Fortran-order array column by column. Values are keyed by the column as requested
 * (field name, or position as a string).
 */
export async function openNpy(fd: number, size: number, label: string, columns: readonly NpyColumnRef[], optional: ReadonlySet<string> = new Set()): Promise<OpenNpy> {
  const header = await readNpyHeader(new FileRangeStream(fd, 0, size), label);
  const plan = planNpyColumns(header, label, columns, false, optional);
  checkDataLength(header, plan, size - header.dataOffset, label);
  const base = header.dataOffset;
  return {
    header,
    plan,
    description: `NumPy .npy (format ${header.version}): ${plan.description}`,
    available: availableColumns(header),
    async *batches(options = {}) {
      const streams = plan.streams.map((s) => ({ stream: new FileRangeStream(fd, base + s.start, base + plan.dataBytes), recordBytes: s.recordBytes }));
      // The length was checked at open; a short read now means the file shrank meanwhile.
      const shrank = () => `${label}: the file became shorter while it was being read; read it again once nothing writes to it`;
      yield* readRecordColumns(streams, plan.columns, plan.rows, label, shrank, options.batchRows);
    },
  };
}

/** The same from a path (tests, tools): the descriptor is closed when the batches end. */
export async function* readNpyFile(filePath: string, label: string, columns: readonly NpyColumnRef[], options: { batchRows?: number } = {}): AsyncGenerator<RecordBatch> {
  const fd = fs.openSync(filePath, "r");
  try {
    yield* (await openNpy(fd, fs.fstatSync(fd).size, label, columns)).batches(options);
  } finally {
    fs.closeSync(fd);
  }
}
