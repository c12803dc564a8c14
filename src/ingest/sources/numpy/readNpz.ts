import { DataError } from "../../../errors.ts";
import { readRecordColumns, type RecordBatch, type ColumnSource, type RecordStream } from "../binary/readRecordColumns.ts";
import { planNpyColumns } from "./planNpyColumns.ts";
import { checkDataLength } from "./readNpy.ts";
import { readNpyHeader } from "./readNpyHeader.ts";
import { zipDirectory, type ZipMember } from "./zipDirectory.ts";
import { DamagedMember, ZipMemberStream } from "./zipMemberStream.ts";
import type { NpyHeader } from "./npyHeader.ts";

/** An opened .npz file: one 1-D array per requested column, all of one length. */
export interface OpenNpz {
  rows: number;
  /** Every array the file holds (member names without ".npy"). */
  available: string[];
  /** The requested arrays found (absent optional ones left out). */
  present: string[];
  description: string;
  batches(options?: { batchRows?: number }): AsyncGenerator<RecordBatch>;
}

/** The member holding array `key`: numpy.savez names it `<key>.npy`. */
function memberFor(members: ZipMember[], key: string): ZipMember | undefined {
  return members.find((m) => m.name === `${key}.npy`) ?? members.find((m) => m.name === key);
}

interface Column {
  key: string;
  member: ZipMember;
  stream: ZipMemberStream;
  header: NpyHeader;
  itemBytes: number;
  source: ColumnSource;
}

/** The damage a member stream met, as the row and column where the values stop being trustworthy. */
function describeDamage(label: string, column: Column, err: DamagedMember, rows: number): DataError {
  const where = `in member "${column.member.name}"`;
  if (err.produced >= column.member.uncompressedSize) {
    return new DataError(`${label}, rows 1–${rows}, column "${column.key}": ${err.detail} ${where}, so some of these values are damaged; copy the file again from its source`);
  }
  const row = Math.min(rows, Math.max(1, Math.floor((err.produced - column.header.dataOffset) / column.itemBytes) + 1));
  return new DataError(`${label}, row ${row}, column "${column.key}": ${err.detail} ${where}: decompression fails at this row; copy the file again from its source`);
}

/**
 * Open the .npz file on `fd`: numpy.savez (members stored) or numpy.savez_compressed
 * (members deflated) with one 1-D numeric array per requested column, named as the
 * keyword it was saved under. Each member is read front to back as its own stream
 * (inflated as it goes), so memory stays bounded however long the arrays are.
 */
export async function openNpz(fd: number, size: number, label: string, keys: readonly string[], optional: ReadonlySet<string> = new Set()): Promise<OpenNpz> {
  if (size === 0) throw new DataError(`${label}: the file is empty (0 bytes); expected a NumPy .npz file`);
  const members = zipDirectory(fd, size, label);
  const available = members.map((m) => m.name.replace(/\.npy$/, ""));
  const wanted = [...new Set(keys)].filter((k) => memberFor(members, k) || !optional.has(k));
  const missing = wanted.filter((k) => !memberFor(members, k));
  if (missing.length) {
    throw new DataError(missing.map((k) => `${label}: holds no array "${k}"; its arrays are ${available.map((a) => `"${a}"`).join(", ")}`).join("\n"));
  }
  const columns: Column[] = [];
  for (const key of wanted) {
    const member = memberFor(members, key)!;
    if (member.method !== 0 && member.method !== 8) {
      throw new DataError(`${label}, column "${key}": member "${member.name}" is compressed with zip method ${member.method}; expected stored (0) or deflated (8), as numpy.savez and numpy.savez_compressed write`);
    }
    const stream = new ZipMemberStream(fd, member);
    let header: NpyHeader;
    try {
      header = await readNpyHeader(stream, `${label}, array "${key}"`);
    } catch (err) {
      if (err instanceof DamagedMember) throw new DataError(`${label}, column "${key}": the header of member "${member.name}" cannot be read: ${err.detail}; copy the file again from its source`);
      throw err;
    }
    const plan = planNpyColumns(header, label, [key], true);
    checkDataLength(header, plan, member.uncompressedSize - header.dataOffset, label, key);
    columns.push({ key, member, stream, header, itemBytes: plan.streams[0].recordBytes, source: { ...plan.columns[0], stream: columns.length } });
  }
  const lengths = columns.map((c) => c.header.shape[0]);
  if (lengths.some((n) => n !== lengths[0])) {
    throw new DataError(`${label}: the arrays differ in length (${columns.map((c, i) => `"${c.key}" ${lengths[i]}`).join(", ")}); every column needs one value per row`);
  }
  const rows = lengths[0] ?? 0;
  const compressed = columns.some((c) => c.member.method === 8);
  const arrays = columns.map((c) => `${c.key} ${String(c.header.descr)}`).join(", ");
  return {
    rows,
    available,
    present: columns.map((c) => c.key),
    description: `NumPy .npz (${compressed ? "deflated" : "stored"} members): ${rows} rows of arrays ${arrays}, one array per column`,
    async *batches(options = {}) {
      const streams: RecordStream[] = columns.map((c) => ({ stream: c.stream, recordBytes: c.itemBytes }));
      const ended = (i: number, whole: number) => `${label}, row ${whole + 1}, column "${columns[i].key}": the data of member "${columns[i].member.name}" end early`;
      try {
        yield* readRecordColumns(streams, columns.map((c) => c.source), rows, label, ended, options.batchRows);
      } catch (err) {
        if (!(err instanceof DamagedMember)) throw err;
        throw describeDamage(label, columns.find((c) => c.member.name === err.member)!, err, rows);
      }
    },
  };
}
