import zlib from "node:zlib";
import { readOffsetIndex, type AsyncBuffer, type FileMetaData } from "hyparquet";
// Not part of hyparquet's index, but exported by its package ("./src/*.js"); the version is pinned.
import { parquetHeader } from "hyparquet/src/column.js";
import { DataError } from "../../errors.ts";

/** A page whose bytes do not have the CRC-32 its header records. */
export class PageChecksumMismatch extends DataError {}

interface ChunkSpan {
  rowGroup: number; // 0-based
  column: string;
  start: number; // first byte of the chunk's first page header
  end: number;
  offsetIndex?: { start: number; end: number };
}

/** Where a page header starts, and the number of the data page found there (from 1). */
interface PageStart {
  at: number;
  chunk: ChunkSpan;
  dataPage: number;
}

/** The byte spans of the requested columns' chunks, from the footer. */
function chunkSpans(metadata: FileMetaData, columns: readonly string[]): ChunkSpan[] {
  const spans: ChunkSpan[] = [];
  metadata.row_groups.forEach((group, rowGroup) => {
    for (const chunk of group.columns) {
      const meta = chunk.meta_data;
      const column = meta?.path_in_schema[0];
      if (!meta || column === undefined || !columns.includes(column)) continue;
      const start = Number(meta.dictionary_page_offset || meta.data_page_offset);
      const span: ChunkSpan = { rowGroup, column, start, end: start + Number(meta.total_compressed_size) };
      if (chunk.offset_index_offset && chunk.offset_index_length) {
        const at = Number(chunk.offset_index_offset);
        span.offsetIndex = { start: at, end: at + chunk.offset_index_length };
      }
      spans.push(span);
    }
  });
  return spans;
}

/**
 * Check the CRC-32 of the page in `bytes` (file bytes from `from` to `to`) that starts at
 * `start.at`, and of the pages that follow it within the slice and its column chunk. Stops
 * silently at a header that cannot be parsed or a page that reaches past the slice: the
 * decoder then reports the damage, or a later slice holds the page.
 * Returns the file offset where it stopped.
 */
function checkPagesFrom(bytes: ArrayBuffer, from: number, to: number, start: PageStart, label: string): number {
  const { chunk } = start;
  const stop = Math.min(to, chunk.end);
  let at = start.at;
  let dataPage = start.dataPage;
  while (at < stop) {
    const reader = { view: new DataView(bytes, at - from, stop - at), offset: 0 };
    let header;
    try {
      header = parquetHeader(reader);
    } catch {
      return at;
    }
    const dataStart = at + reader.offset;
    const dataEnd = dataStart + header.compressed_page_size;
    if (!(header.compressed_page_size >= 0) || dataEnd > stop) return at;
    const isData = header.type === "DATA_PAGE" || header.type === "DATA_PAGE_V2";
    if (header.crc !== undefined) {
      // Apache Parquet format specification, PageHeader.crc: the CRC-32 of the page's
      // bytes as written to disk (after compression), excluding the header, with the
      // polynomial of gzip (CRC-32/ISO-HDLC), stored as a signed 32-bit integer.
      const actual = zlib.crc32(new Uint8Array(bytes, dataStart - from, header.compressed_page_size));
      const recorded = header.crc >>> 0;
      if (actual !== recorded) {
        const page = isData ? `data page ${dataPage}` : `the ${String(header.type).toLowerCase().replace("_page", "")} page`;
        throw new PageChecksumMismatch(
          `${label}: row group ${chunk.rowGroup + 1}, column "${chunk.column}", ${page} (file bytes ${dataStart}–${dataEnd}): the page's CRC-32 is ${hex(actual)} but its header records ${hex(recorded)}; the file is damaged (its bytes changed after it was written), so none of its values can be trusted`,
        );
      }
    }
    if (isData) dataPage++;
    at = dataEnd;
  }
  return at;
}

function hex(value: number): string {
  return `0x${value.toString(16).toUpperCase().padStart(8, "0")}`;
}

/**
 * Wrap a Parquet file's AsyncBuffer so that every page of the requested columns that the
 * reader fetches has its CRC-32 checked, when its header carries one, before any value is
 * decoded from it; a mismatch rejects the read with a PageChecksumMismatch naming file, row
 * group, column and page. hyparquet fetches whole column chunks, or (with an offset index)
 * runs of whole pages that start at a page listed in the index, which it reads through this
 * buffer first; the wrapper learns those page starts then.
 */
export function pageCheckingBuffer(file: AsyncBuffer, metadata: FileMetaData, columns: readonly string[], label: string): AsyncBuffer {
  const spans = chunkSpans(metadata, columns);
  const starts = new Map<number, PageStart>(spans.map((chunk) => [chunk.start, { at: chunk.start, chunk, dataPage: 1 }]));
  const indexes = new Map(spans.filter((s) => s.offsetIndex).map((s) => [s.offsetIndex!.start, s]));

  const learnPageStarts = (chunk: ChunkSpan, bytes: ArrayBuffer): void => {
    try {
      readOffsetIndex({ view: new DataView(bytes), offset: 0 }).page_locations.forEach((location, i) => {
        const at = Number(location.offset);
        if (at > chunk.start && at < chunk.end) starts.set(at, { at, chunk, dataPage: i + 1 });
      });
    } catch {
      // A damaged offset index: hyparquet refuses it when it reads the same bytes.
    }
  };

  return {
    byteLength: file.byteLength,
    async slice(from: number, to: number = file.byteLength): Promise<ArrayBuffer> {
      const bytes = await file.slice(from, to);
      const index = indexes.get(from);
      if (index && index.offsetIndex!.end === to) learnPageStarts(index, bytes);
      const inSlice = [...starts.keys()].filter((at) => at >= from && at < to).sort((a, b) => a - b);
      let checkedTo = from;
      for (const at of inSlice) {
        if (at < checkedTo) continue;
        checkedTo = checkPagesFrom(bytes, from, to, starts.get(at)!, label);
      }
      return bytes;
    },
  };
}
