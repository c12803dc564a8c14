import { Dataset, Module, type File as H5File, type Metadata } from "h5wasm/node";
import { DataError } from "../../../errors.ts";
import type { ByteStream } from "../binary/byteStream.ts";
import { describeNumericType } from "../binary/numericType.ts";
import { readRecordColumns, type RecordBatch, type ColumnSource, type RecordStream } from "../binary/readRecordColumns.ts";
import { describeOpenFailure, hdf5Library, hdf5Reason } from "./hdf5Library.ts";
import { hdf5Element, type Hdf5Element } from "./hdf5Types.ts";

/** A column of an HDF5 file: a compound member or a 2-D column position (with `dataset:`), or a dataset path (without). */
export type Hdf5ColumnRef = string | number;

/** An opened HDF5 file with its requested columns checked. */
export interface OpenHdf5 {
  rows: number;
  description: string;
  /** What the columns could be: members of the table, or the file's datasets. */
  available: string[];
  /** The requested columns found (absent optional ones left out). */
  present: string[];
  /** A `units` attribute (text) found on the table or on a column's dataset, by column as requested. */
  units: Map<string, string>;
  batches(options?: { batchRows?: number }): AsyncGenerator<RecordBatch>;
  close(): void;
}

/** An HDF5 read failed between rows `first` and `first + count`. */
class Hdf5ReadError extends Error {
  constructor(
    readonly path: string,
    readonly first: number,
    readonly count: number,
    readonly reason: string,
  ) {
    super(reason);
  }
}

/**
 * Rows of one dataset read front to back through hyperslab selections (HDF5 reads, and
 * for chunked data decompresses, only the chunks a selection touches), `recordBytes`
 * bytes per row, copied out of the library's memory at once.
 */
class DatasetStream implements ByteStream {
  private row = 0;
  constructor(
    private readonly file: H5File,
    private readonly path: string,
    private readonly recordBytes: number,
    private readonly width: number | null,
    private readonly chunkRows: number | null,
  ) {}

  async read(length: number): Promise<Uint8Array> {
    const count = Math.floor(length / this.recordBytes);
    const bytes = count * this.recordBytes;
    const pointer = Module._malloc(Math.max(1, bytes));
    if (pointer === 0) throw new Hdf5ReadError(this.path, this.row, count, `no memory for ${bytes} bytes`);
    try {
      try {
        this.readRows(this.row, count, pointer);
      } catch (err) {
        throw this.firstFailingChunk(count, pointer) ?? new Hdf5ReadError(this.path, this.row, count, hdf5Reason(err));
      }
      this.row += count;
      return Module.HEAPU8.slice(pointer, pointer + bytes);
    } finally {
      Module._free(pointer);
    }
  }

  private readRows(first: number, count: number, pointer: number): void {
    const [size, offset, stride] = this.width === null ? [[BigInt(count)], [BigInt(first)], [1n]] : [[BigInt(count), BigInt(this.width)], [BigInt(first), 0n], [1n, 1n]];
    Module.get_dataset_data(this.file.file_id, this.path, size, offset, stride, BigInt(pointer));
  }

  /**
   * After a failed read of a chunked dataset, the rows of the first chunk that cannot be
   * read (each chunk read on its own), so that a message can name them; null when every
   * chunk reads alone or the dataset is not chunked.
   */
  private firstFailingChunk(count: number, pointer: number): Hdf5ReadError | null {
    if (this.chunkRows === null) return null;
    const end = this.row + count;
    for (let first = this.row - (this.row % this.chunkRows); first < end; first += this.chunkRows) {
      const from = Math.max(first, this.row);
      const rows = Math.min(first + this.chunkRows, end) - from;
      try {
        this.readRows(from, rows, pointer);
      } catch (err) {
        return new Hdf5ReadError(this.path, from, rows, hdf5Reason(err));
      }
    }
    return null;
  }
}

function datasetAt(file: H5File, path: string): Dataset | null {
  try {
    const entity = file.get(path);
    return entity instanceof Dataset ? entity : null;
  } catch {
    return null;
  }
}

function datasetsOf(file: H5File): string[] {
  try {
    return file.paths().filter((p) => datasetAt(file, p) !== null).map((p) => (p.startsWith("/") ? p : `/${p}`));
  } catch {
    return [];
  }
}

function unitsOf(dataset: Dataset): string | null {
  try {
    const value = dataset.attrs["units"]?.value;
    if (typeof value === "string") return value;
    if (value instanceof Uint8Array) return new TextDecoder().decode(value).replace(/\0+$/, "");
    return null;
  } catch {
    return null;
  }
}

const NUMERIC = "numbers (an integer of 1 to 8 bytes, or a float of 2, 4 or 8 bytes)";

function refusal(where: string, column: string, element: Hdf5Element): string | null {
  return element.numeric ? null : `${where}, column "${column}": expected ${NUMERIC}, found ${element.holds}`;
}

function describeElement(element: Hdf5Element): string {
  return element.numeric ? describeNumericType(element.numeric) : element.holds;
}

function shapeText(shape: number[] | null): string {
  return shape === null ? "a scalar or empty dataspace" : `shape (${shape.join(", ")}${shape.length === 1 ? "," : ""})`;
}

function list(names: string[]): string {
  const shown = names.slice(0, 20).map((n) => `"${n}"`);
  return names.length > 20 ? `${shown.join(", ")} and ${names.length - 20} more` : shown.join(", ") || "none";
}

interface Plan {
  rows: number;
  streams: { path: string; recordBytes: number; width: number | null; chunkRows: number | null }[];
  columns: ColumnSource[];
  description: string;
  available: string[];
  units: Map<string, string>;
}

/** `dataset:` names a compound table (columns by member name) or a 2-D numeric array (columns by position from 1). */
function planTable(file: H5File, label: string, path: string, refs: readonly Hdf5ColumnRef[], optional: ReadonlySet<string>): Plan {
  const dataset = datasetAt(file, path);
  if (!dataset) throw new DataError(`${label}: holds no dataset "${path}"; its datasets are ${list(datasetsOf(file))}`);
  const metadata = dataset.metadata;
  const where = `${label}, dataset ${path}`;
  const units = new Map<string, string>();
  const tableUnits = unitsOf(dataset);
  const wanted = [...new Set(refs.map(String))];
  if (metadata.type === 6 && metadata.compound_type) {
    if (metadata.shape?.length !== 1) throw new DataError(`${where}: a compound table must be 1-D (one record per row); found ${shapeText(metadata.shape)}`);
    const members = metadata.compound_type.members;
    const problems: string[] = [];
    const columns: ColumnSource[] = [];
    for (const name of wanted) {
      const member = members.find((m) => m.name === name);
      if (!member) {
        if (optional.has(name)) continue;
        problems.push(`${where}: has no member "${name}"; its members are ${list(members.map((m) => m.name))}`);
        continue;
      }
      const element = hdf5Element(member as Metadata, member.littleEndian);
      const refused = refusal(where, name, element);
      if (refused) problems.push(refused);
      else columns.push({ column: name, stream: 0, offset: member.offset, type: element.numeric! });
      if (tableUnits !== null) units.set(name, tableUnits);
    }
    if (problems.length) throw new DataError(problems.join("\n"));
    const rows = metadata.shape[0];
    const memberList = members.map((m) => `${m.name} ${describeElement(hdf5Element(m as Metadata, m.littleEndian))}`).join(", ");
    return {
      rows,
      streams: [{ path, recordBytes: metadata.size, width: null, chunkRows: metadata.chunks?.[0] ?? null }],
      columns,
      description: `compound dataset ${path} of ${rows} rows (members ${memberList}), columns by member name${tableUnits !== null ? `, units attribute "${tableUnits}"` : ""}`,
      available: members.map((m) => m.name),
      units,
    };
  }
  const element = hdf5Element(metadata, true);
  if (!element.numeric) throw new DataError(wanted.map((c) => refusal(where, c, element)).join("\n"));
  if (metadata.shape?.length !== 2) throw new DataError(`${where}: expected a compound table (columns by member name) or a 2-D array (rows × columns, columns by position from 1); found ${shapeText(metadata.shape)}`);
  const [rows, width] = metadata.shape;
  const problems: string[] = [];
  const columns: ColumnSource[] = [];
  for (const ref of wanted) {
    const p = /^\d+$/.test(ref) ? Number(ref) : Number.NaN;
    if (!(p >= 1 && p <= width)) {
      if (!optional.has(ref)) problems.push(`${where}: column ${JSON.stringify(ref)} is not a position from 1 to ${width} (a 2-D dataset's columns are numbered from 1)`);
    } else columns.push({ column: ref, stream: 0, offset: (p - 1) * metadata.size, type: element.numeric });
    if (tableUnits !== null) units.set(ref, tableUnits);
  }
  if (problems.length) throw new DataError(problems.join("\n"));
  return {
    rows,
    streams: [{ path, recordBytes: width * metadata.size, width, chunkRows: metadata.chunks?.[0] ?? null }],
    columns,
    description: `2-D dataset ${path} of ${rows} rows × ${width} columns (${describeNumericType(element.numeric)}), columns by position from 1`,
    available: Array.from({ length: width }, (_, i) => String(i + 1)),
    units,
  };
}

/** Without `dataset:`, each column is a 1-D numeric dataset named by its path; all of one length. */
function planColumns(file: H5File, label: string, refs: readonly Hdf5ColumnRef[], optional: ReadonlySet<string>): Plan {
  const wanted = [...new Set(refs.map(String))];
  const problems: string[] = [];
  const found: { path: string; metadata: Metadata; element: Hdf5Element; units: string | null }[] = [];
  for (const path of wanted) {
    const dataset = datasetAt(file, path);
    if (!dataset) {
      if (optional.has(path)) continue;
      problems.push(`${label}: holds no dataset "${path}"; its datasets are ${list(datasetsOf(file))}`);
      continue;
    }
    const metadata = dataset.metadata;
    const element = hdf5Element(metadata, true);
    const refused = refusal(`${label}, dataset ${path}`, path, element);
    if (refused) problems.push(refused);
    else if (metadata.shape?.length !== 1) problems.push(`${label}, dataset ${path}: expected a 1-D dataset (one value per row), found ${shapeText(metadata.shape)}`);
    else found.push({ path, metadata, element, units: unitsOf(dataset) });
  }
  if (problems.length) throw new DataError(problems.join("\n"));
  const lengths = found.map((f) => f.metadata.shape![0]);
  if (lengths.some((n) => n !== lengths[0])) {
    throw new DataError(`${label}: the datasets differ in length (${found.map((f, i) => `${f.path} ${lengths[i]}`).join(", ")}); every column needs one value per row`);
  }
  const rows = lengths[0] ?? 0;
  const units = new Map<string, string>();
  for (const f of found) if (f.units !== null) units.set(f.path, f.units);
  return {
    rows,
    streams: found.map((f) => ({ path: f.path, recordBytes: f.metadata.size, width: null, chunkRows: f.metadata.chunks?.[0] ?? null })),
    columns: found.map((f, i) => ({ column: f.path, stream: i, offset: 0, type: f.element.numeric! })),
    description: `${rows} rows from the 1-D datasets ${found.map((f) => `${f.path} (${describeNumericType(f.element.numeric!)}${f.units !== null ? `, units "${f.units}"` : ""})`).join(", ")}, one per column`,
    available: datasetsOf(file),
    units,
  };
}

/**
 * Open an HDF5 file (`openPath`: the path h5wasm opens, e.g. /proc/self/fd/N for a file
 * already opened and checked) and lay out the reads of the requested columns. With
 * `dataset`, the columns are members of that compound table (or positions in that 2-D
 * array); without it, each column is a 1-D dataset path. Only numeric types are read;
 * columns in `optional` that the file lacks are left out instead of refused.
 */
export async function openHdf5(
  openPath: string,
  label: string,
  dataset: string | undefined,
  refs: readonly Hdf5ColumnRef[],
  optional: ReadonlySet<string> = new Set(),
): Promise<OpenHdf5> {
  const h5 = await hdf5Library();
  let file: H5File;
  try {
    file = new h5.File(openPath, "r");
  } catch (err) {
    throw new DataError(`${label}: not a readable HDF5 file: ${describeOpenFailure(err)}`);
  }
  try {
    const plan = dataset !== undefined ? planTable(file, label, dataset, refs, optional) : planColumns(file, label, refs, optional);
    const where = dataset !== undefined ? `${label}, dataset ${dataset}` : label;
    return {
      rows: plan.rows,
      description: `HDF5: ${plan.description}`,
      available: plan.available,
      present: plan.columns.map((c) => c.column),
      units: plan.units,
      async *batches(options = {}) {
        const streams: RecordStream[] = plan.streams.map((s) => ({ stream: new DatasetStream(file, s.path, s.recordBytes, s.width, s.chunkRows), recordBytes: s.recordBytes }));
        const short = () => `${where}: the dataset became shorter while it was being read`;
        try {
          yield* readRecordColumns(streams, plan.columns, plan.rows, where, short, options.batchRows);
        } catch (err) {
          if (!(err instanceof Hdf5ReadError)) throw err;
          const columns = plan.columns.filter((c) => plan.streams[c.stream].path === err.path).map((c) => `"${c.column}"`);
          throw new DataError(
            `${label}, dataset ${err.path}, rows ${err.first + 1}–${err.first + err.count}, ${columns.length > 1 ? "columns" : "column"} ${columns.join(", ")}: the HDF5 library cannot read these rows (${err.reason}); the file is damaged: copy it again from its source`,
          );
        }
      },
      close: () => void file.close(),
    };
  } catch (err) {
    file.close();
    throw err;
  }
}
