// Writes DOUBLE columns as a Parquet file whose every page header carries a CRC-32, for the
// page-checksum tests. hyparquet-writer (our only Parquet writer here) never fills in
// PageHeader.crc, so this helper lays the pages out itself and uses hyparquet-writer only for
// the Thrift serialisation of the page headers, the offset indexes and the footer.
// The CRCs come from the table-driven CRC-32 of src/ingest/sources/crc32.ts, a separate
// implementation from the one the reader checks them with (node:zlib's crc32).
import fs from "node:fs";
import { ByteWriter } from "hyparquet-writer";
import { writePageHeader } from "hyparquet-writer/src/datapage.js";
import { writeMetadata } from "hyparquet-writer/src/metadata.js";
import { serializeTCompactProtocol } from "hyparquet-writer/src/thrift.js";
import type { ColumnChunk, FileMetaData, RowGroup } from "hyparquet";
import { crc32 } from "../../src/ingest/sources/crc32.ts";

export interface ChecksummedLayout {
  rowGroupRows: number;
  pageRows: number;
  /** Write an offset index (page locations) per column chunk, as Arrow and hyparquet-writer do. */
  offsetIndex: boolean;
}

/** Where each data page of the written file lies: row group, column and page counted from 0. */
export interface WrittenPage {
  rowGroup: number;
  column: string;
  page: number;
  /** File offset of the first byte after the page header (the page's own bytes). */
  dataStart: number;
  dataEnd: number;
}

/**
 * Write REQUIRED DOUBLE columns, PLAIN-encoded and uncompressed, in DATA_PAGE (v1) pages of
 * `pageRows` rows (Apache Parquet format specification: for a REQUIRED, non-nested column a v1
 * page holds no repetition or definition levels, so its bytes are the values themselves).
 * Returns where every page's bytes lie, so that a test can damage one.
 */
export function writeChecksummedParquet(filePath: string, columns: Record<string, Float64Array>, layout: ChecksummedLayout): WrittenPage[] {
  const names = Object.keys(columns);
  const rows = columns[names[0]].length;
  const writer = new ByteWriter();
  writer.appendUint32(0x31524150); // "PAR1"
  const pages: WrittenPage[] = [];
  const rowGroups: RowGroup[] = [];
  const locations = new Map<ColumnChunk, { offset: bigint; compressed_page_size: number; first_row_index: bigint }[]>();
  for (let first = 0, group = 0; first < rows; first += layout.rowGroupRows, group++) {
    const last = Math.min(rows, first + layout.rowGroupRows);
    const groupStart = writer.offset;
    const chunks: ColumnChunk[] = [];
    for (const name of names) {
      const chunkStart = writer.offset;
      const pageLocations = [];
      for (let p = first, page = 0; p < last; p += layout.pageRows, page++) {
        const values = columns[name].slice(p, Math.min(last, p + layout.pageRows));
        const bytes = new Uint8Array(values.buffer);
        const pageStart = writer.offset;
        writePageHeader(writer, {
          type: "DATA_PAGE",
          uncompressed_page_size: bytes.length,
          compressed_page_size: bytes.length,
          crc: crc32(bytes) | 0, // PageHeader.crc is a Thrift i32
          data_page_header: { num_values: values.length, encoding: "PLAIN", definition_level_encoding: "RLE", repetition_level_encoding: "RLE" },
        });
        const dataStart = writer.offset;
        writer.appendBytes(bytes);
        pages.push({ rowGroup: group, column: name, page, dataStart, dataEnd: writer.offset });
        pageLocations.push({ offset: BigInt(pageStart), compressed_page_size: writer.offset - pageStart, first_row_index: BigInt(p - first) });
      }
      const size = BigInt(writer.offset - chunkStart);
      const chunk: ColumnChunk = {
        file_offset: BigInt(chunkStart),
        meta_data: {
          type: "DOUBLE",
          encodings: ["PLAIN"],
          path_in_schema: [name],
          codec: "UNCOMPRESSED",
          num_values: BigInt(last - first),
          total_uncompressed_size: size,
          total_compressed_size: size,
          data_page_offset: BigInt(chunkStart),
        },
      };
      chunks.push(chunk);
      locations.set(chunk, pageLocations);
    }
    rowGroups.push({
      columns: chunks,
      total_byte_size: BigInt(writer.offset - groupStart),
      num_rows: BigInt(last - first),
      total_compressed_size: BigInt(writer.offset - groupStart),
    });
  }
  if (layout.offsetIndex) {
    for (const [chunk, pageLocations] of locations) {
      const start = writer.offset;
      serializeTCompactProtocol(writer, {
        field_1: pageLocations.map((l) => ({ field_1: l.offset, field_2: l.compressed_page_size, field_3: l.first_row_index })),
      });
      chunk.offset_index_offset = BigInt(start);
      chunk.offset_index_length = writer.offset - start;
    }
  }
  const metadata = {
    version: 2,
    schema: [{ name: "root", num_children: names.length }, ...names.map((name) => ({ name, type: "DOUBLE" as const, repetition_type: "REQUIRED" as const }))],
    num_rows: BigInt(rows),
    row_groups: rowGroups,
  };
  writeMetadata(writer, metadata as FileMetaData);
  writer.appendUint32(0x31524150);
  fs.writeFileSync(filePath, new Uint8Array(writer.getBuffer()));
  return pages;
}
