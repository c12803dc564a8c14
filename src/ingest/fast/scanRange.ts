import fs from "node:fs";
import type { Hash } from "node:crypto";
import { MAX_LINE_CHARS } from "../readCsv.ts";
import { ChunkBuilder, longLine, newScanState, scanLines, type RowChunk, type ScanLayout, type ScanState } from "./scanLines.ts";

/** Bytes read at a time: large enough for system calls not to matter, small enough for the cache. */
export const BLOCK_BYTES = 4 << 20;
/** Rows a sink receives at a time. */
export const CHUNK_ROWS = 1 << 16;

const NL = 10;

/**
 * Scan bytes [start, end) of a file, a range that begins at a line start, block
 * by block, handing full chunks of rows to `sink`. Each block is cut after its
 * last newline (the rest is carried into the next block) so the scanner only
 * ever sees whole lines; a last line without a newline is closed with one.
 * Optionally feeds every byte read into `hash` and reports bytes read.
 */
export function scanFileRange(
  fd: number,
  start: number,
  end: number,
  layout: ScanLayout,
  sink: (chunk: RowChunk) => void,
  options: { hash?: Hash; onBytes?: (bytes: number) => void } = {},
): ScanState {
  const state = newScanState();
  const chunk = new ChunkBuilder(layout.slotNames.length, CHUNK_ROWS);
  const flush = () => {
    if (chunk.rows > 0) sink(chunk.view());
    chunk.rows = 0;
  };
  let buffer = Buffer.allocUnsafe(BLOCK_BYTES + 2);
  let carry = 0; // bytes of an incomplete line kept at the buffer's start
  let offset = start;
  while (offset < end && state.structural === null && state.refusal === null) {
    if (carry + BLOCK_BYTES + 2 > buffer.length) {
      const grown = Buffer.allocUnsafe(carry + BLOCK_BYTES + 2);
      buffer.copy(grown, 0, 0, carry);
      buffer = grown;
    }
    const got = fs.readSync(fd, buffer, carry, Math.min(BLOCK_BYTES, end - offset), offset);
    if (got === 0) break;
    options.hash?.update(buffer.subarray(carry, carry + got));
    offset += got;
    const base = offset - got - carry; // file offset of the buffer's first byte
    let filled = carry + got;
    const final = offset >= end;
    let cut: number;
    if (final) {
      if (buffer[filled - 1] !== NL) {
        // Close the last line the way the others end (the spare bytes allocated above).
        if (layout.crlf && buffer[filled - 1] !== 13) buffer[filled++] = 13;
        buffer[filled++] = NL;
      }
      cut = filled;
    } else cut = buffer.lastIndexOf(NL, filled - 1) + 1;
    if (cut > 0) scanLines(buffer, 0, cut, layout, state, chunk, flush);
    options.onBytes?.(got);
    carry = filled - cut;
    // The reference reader's limit (numeric lines are ASCII, so characters are bytes); it words the refusal.
    if (state.structural !== null || state.refusal !== null) state.stoppedAt += base; // as a file offset
    else if (carry > MAX_LINE_CHARS) state.refusal = { line: state.line + 1, message: longLine(layout) };
    else if (carry > 0) buffer.copy(buffer, 0, cut, filled);
  }
  flush();
  return state;
}
