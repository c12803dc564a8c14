import fs from "node:fs";
import { DataError, formatCellProblems, MAX_REPORTED_PROBLEMS, newProblemLog, recordProblem, type ProblemLog } from "../../../errors.ts";
import { SNIFF_BYTES } from "../../readCsv.ts";
import { ChunkBuilder, longLine, newScanState, scanLines, WHITESPACE_RUNS, type RowChunk } from "../../fast/scanLines.ts";
import { BLOCK_BYTES, CHUNK_ROWS } from "../../fast/scanRange.ts";
import { MAX_LINE_CHARS } from "../../readCsv.ts";
import { openDataFile } from "../openDataFile.ts";
import { compressionOf, compressionSuffix, headOf, sha256OfDescriptor, textBlocks, type Compression } from "../fileBytes.ts";
import type { ColumnBatch, OpenSource, SourceModule, SourceRequest } from "../types.ts";
import { describeTextFormat, dialectOf, TEXT_FORMATS, type TextFormat } from "./dialect.ts";
import { findGeneralTable, findTextTable, type TextTableStart } from "./textHeader.ts";
import { generalRows } from "./generalRows.ts";

/** With a delimiter other than the comma, "1,5" may be a decimal comma the dataset has not declared. */
const POINT_HINT = "(use a decimal point, not a comma)";
const DECIMAL_KEY_HINT = "(use a decimal point, or declare decimal: comma for this file)";

const NL = 10;
const CR = 13;

/** Extensions of text tables; the delimiter is read from the table's first line unless `format:` names it. */
const TEXT_EXTENSION = /\.(csv|tsv|tab|txt|dat|asc|prn)$/i;

/**
 * Delimited text (comma, tab, semicolon, runs of whitespace), plain or
 * compressed (gzip, Zstandard): the byte scanner of src/ingest/fast reads
 * lines of the plain layout; where it stops (a quote over several lines, a
 * lone CR, a blank line of spaces) the general reader takes the rest of the
 * file from that line on. Both stream, so memory is bounded for every file.
 */
export const textSource: SourceModule = {
  formats: TEXT_FORMATS,
  detect: (name) => (TEXT_EXTENSION.test(compressionSuffix(name).inner) ? "text" : null),
  open: (request, format) => openText(request, format === "text" ? null : (format as TextFormat)),
};

async function openText(request: SourceRequest, named: TextFormat | null): Promise<OpenSource> {
  const { label } = request;
  if (named !== null) dialectOf(named, request.settings, request.keyPath); // a refused combination is refused before any reading
  const file = openDataFile(request.filePath, label, request.auditDir);
  const { fd, size } = file;
  try {
    const compression = compressionOf(headOf(fd, 4));
    const announced = compressionSuffix(request.filePath).compression;
    if (announced !== "none" && announced !== compression) {
      throw new DataError(`${label}: the name ends in .${announced === "gzip" ? "gz" : "zst"} but the file is not ${announced === "gzip" ? "gzip" : "Zstandard"}-compressed (its first bytes say ${compression === "none" ? "uncompressed" : compression}); rename it or compress it`);
    }
    const { head, whole } = await textHead(fd, size, compression, label);
    const table =
      findTextTable(head, whole, named, request.settings, request.columns, label, request.keyPath) ??
      findGeneralTable(head, named, request.settings, request.columns, label, request.keyPath);
    return textSourceOver(request, fd, size, compression, table);
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}

/** The first SNIFF_BYTES of the text (decompressed), and whether that is all of it. */
export async function textHead(fd: number, size: number, compression: Compression, label: string): Promise<{ head: Uint8Array; whole: boolean }> {
  if (compression === "none") {
    const head = headOf(fd, Math.min(SNIFF_BYTES, size));
    return { head, whole: head.length >= size };
  }
  const pieces: Uint8Array[] = [];
  let got = 0;
  const blocks = textBlocks(fd, size, compression, label);
  let whole = true;
  for await (const block of blocks) {
    pieces.push(block);
    got += block.length;
    if (got >= SNIFF_BYTES) {
      whole = false;
      await blocks.return(undefined);
      break;
    }
  }
  const head = Buffer.concat(pieces);
  return { head: head.subarray(0, Math.min(head.length, SNIFF_BYTES)), whole: whole && head.length <= SNIFF_BYTES };
}

function textSourceOver(request: SourceRequest, fd: number, size: number, compression: Compression, table: TextTableStart): OpenSource {
  const { label } = request;
  const { layout } = table;
  const slotOfWant = request.columns.map((w) => {
    const name = typeof w.column === "number" ? (table.dialect.header ? table.available[w.column - 1] : String(w.column)) : w.column;
    return name === undefined ? -1 : layout.slotNames.indexOf(name);
  });
  const toBatch = (chunk: RowChunk): ColumnBatch => ({ rows: chunk.rows, values: slotOfWant.map((s) => (s < 0 ? null : chunk.values[s])), locations: chunk.lines });
  return {
    label,
    format: describeTextFormat(table.dialect, compression, table.detected),
    located: "line",
    names: slotOfWant.map((s) => (s < 0 ? null : layout.slotNames[s])),
    available: table.available,
    byteSize: size,
    byteRanges:
      compression === "none" && !table.general ? { fd, dataStart: table.dataStart, size, headerLines: table.headerLines, layout } : undefined,
    async *batches(onBytes) {
      let done = 0;
      const counted = (n: number) => {
        done += n;
        onBytes?.(Math.min(done, size), size);
      };
      for await (const chunk of textRows(fd, size, compression, table, label, counted)) yield toBatch(chunk);
    },
    sha256: () => sha256OfDescriptor(fd, size),
    close: async () => fs.closeSync(fd),
  };
}

/**
 * Every data row of the text after the table's start, in chunks (copies): the
 * scanner block by block, the general reader from the line where the scanner
 * stopped. Cell problems are gathered over the whole file and thrown at the
 * end, as one message in file order.
 */
async function* textRows(fd: number, size: number, compression: Compression, table: TextTableStart, label: string, onBytes: (n: number) => void): AsyncGenerator<RowChunk> {
  const { layout } = table;
  const finish = (problems: ProblemLog, rows: number) => finishRows(table, label, problems, rows);
  const runs = layout.delimiter === WHITESPACE_RUNS;
  const state = newScanState();
  const slots = layout.slotNames.length;
  const ready: RowChunk[] = [];
  const chunk = new ChunkBuilder(slots, CHUNK_ROWS);
  const flush = () => {
    if (chunk.rows > 0) {
      const lines = chunk.lines.slice(0, chunk.rows);
      for (let i = 0; i < lines.length; i++) lines[i] += table.headerLines;
      ready.push({ rows: chunk.rows, values: chunk.values.map((v) => v.slice(0, chunk.rows)), lines });
    }
    chunk.rows = 0;
  };
  let offset = table.dataStart; // text offset of the buffer's first byte
  let rows = 0;
  let general: number | null = null;
  if (table.general) {
    const problems = newProblemLog();
    for await (const rest of generalRows(textBlocks(fd, size, compression, label, table.dataStart, onBytes), table.dialect, layout, table.headerLines, label, problems, { skipRecords: table.dialect.header ? 1 : 0 })) {
      rows += rest.rows;
      if (problems.count === 0) yield rest;
    }
    return finish(problems, rows);
  }
  // One buffer, reused block after block (fresh memory costs page faults): plain text is read into it
  // straight from the descriptor, decompressed text is copied in. An incomplete last line is carried over.
  let buffer = Buffer.allocUnsafe(BLOCK_BYTES + 2);
  const room = (n: number, carry: number) => {
    if (carry + n + 2 <= buffer.length) return;
    const grown = Buffer.allocUnsafe(carry + n + 2);
    buffer.copy(grown, 0, 0, carry);
    buffer = grown;
  };
  const decompressed = compression === "none" ? null : textBlocks(fd, size, compression, label, table.dataStart, onBytes)[Symbol.asyncIterator]();
  let position = table.dataStart;
  let carry = 0;
  const stopped = () => {
    if (state.refusal) throw refusal(label, table.headerLines, state.refusal);
    if (state.structural === null) return false;
    if (runs) throw refusal(label, table.headerLines, { line: state.line + 1, message: `malformed table: ${state.structural}` });
    general = offset + state.stoppedAt;
    return true;
  };
  for (;;) {
    let got = 0;
    if (decompressed === null) {
      room(BLOCK_BYTES, carry);
      got = position < size ? fs.readSync(fd, buffer, carry, Math.min(BLOCK_BYTES, size - position), position) : 0;
      position += got;
      if (got > 0) onBytes(got);
    } else {
      const next = await decompressed.next();
      if (!next.done) {
        room(next.value.length, carry);
        buffer.set(next.value, carry);
        got = next.value.length;
      }
    }
    if (got === 0) break;
    const filled = carry + got;
    const cut = buffer.lastIndexOf(NL, filled - 1) + 1;
    if (cut > 0) scanLines(buffer, 0, cut, layout, state, chunk, flush);
    if (stopped()) break;
    carry = filled - cut;
    if (carry > MAX_LINE_CHARS) throw refusal(label, table.headerLines, { line: state.line + 1, message: longLine(layout) });
    if (carry > 0 && cut > 0) buffer.copy(buffer, 0, cut, filled);
    offset += cut;
    flush();
    // No batch with a bad cell is handed out: once a problem is found the rest is only checked.
    if (state.problemCount > 0) ready.length = 0;
    while (ready.length) yield ready.shift()!;
  }
  await decompressed?.return?.(undefined);
  if (general === null && carry > 0) {
    // The last line has no line end: close it as the others end.
    let end = carry;
    if (layout.crlf && buffer[end - 1] !== CR) buffer[end++] = CR;
    buffer[end++] = NL;
    scanLines(buffer, 0, end, layout, state, chunk, flush);
    stopped();
  }
  flush();
  if (state.problemCount > 0) ready.length = 0;
  while (ready.length) yield ready.shift()!;
  rows = state.rows;
  const problems = newProblemLog();
  for (const p of state.problems) recordProblem(problems, p.row + table.headerLines, p.column, p.message);
  problems.count = state.problemCount;
  if (general !== null) {
    // The general reader takes the rest, from the line the scanner stopped on.
    for await (const rest of generalRows(textBlocks(fd, size, compression, label, general), table.dialect, layout, table.headerLines + state.line, label, problems)) {
      rows += rest.rows;
      if (problems.count === 0) yield rest;
    }
  }
  finish(problems, rows);
}

/** Throw the gathered cell problems, or the refusal of a table without rows. */
function finishRows(table: TextTableStart, label: string, problems: ProblemLog, rows: number): void {
  if (problems.count > 0) {
    const located = table.dialect.format === "comma" ? problems.problems : problems.problems.map((p) => ({ ...p, message: p.message.replace(POINT_HINT, DECIMAL_KEY_HINT) }));
    throw new DataError(formatCellProblems(label, located, MAX_REPORTED_PROBLEMS, problems.count));
  }
  if (rows === 0) throw new DataError(table.dialect.header ? `${label}: the file has a header but no data rows` : `${label}: the file has no data rows`);
}

function refusal(label: string, headerLines: number, r: { line: number; message: string }): DataError {
  return new DataError(`${label}:${r.line + headerLines}: ${r.message}`);
}

