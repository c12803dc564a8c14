import fs from "node:fs";
import { describeBinaryContent, describeHeaderProblem, SNIFF_BYTES, type ColumnRequest } from "../readCsv.ts";
import type { ScanLayout } from "./scanLines.ts";

/** The header of a plain numeric CSV file and where its data begin. */
export interface PlainHeader {
  names: string[];
  /** Byte offset of the first line after the header. */
  dataStart: number;
  /** Lines up to and including the header (comments and empty lines count). */
  headerLines: number;
  layout: ScanLayout;
}

const decoder = new TextDecoder("utf-8");

/**
 * Read the header of a file for the fast path, or return null when the file
 * needs the reference reader (not text, quoted or oddly delimited header,
 * repeated or missing columns, no header at all): the reference reader then
 * either reads it or words the problem.
 */
export function plainHeader(fd: number, fileSize: number, label: string, requests: ColumnRequest[]): PlainHeader | null {
  const head = Buffer.allocUnsafe(Math.min(SNIFF_BYTES, fileSize));
  const got = fs.readSync(fd, head, 0, head.length, 0);
  const bytes = head.subarray(0, got);
  if (describeBinaryContent(label, bytes) !== null) return null;
  let pos = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let line = 0;
  while (pos < bytes.length) {
    const nl = bytes.indexOf(10, pos);
    if (nl < 0) return null; // no complete header line in the first block
    line++;
    let end = nl;
    if (end > pos && bytes[end - 1] === 13) end--;
    if (end === pos || bytes[pos] === 35) {
      pos = nl + 1;
      continue;
    }
    const text = decoder.decode(bytes.subarray(pos, end));
    if (/["\r]/.test(text) || /^\s*#/.test(text) || text.trim() === "") return null;
    const names = text.split(",").map((h) => h.trim());
    if (describeHeaderProblem(label, line, names) !== null) return null;
    const layout = layoutFor(names, requests, end < nl);
    if (layout === null) return null;
    return { names, dataStart: nl + 1, headerLines: line, layout };
  }
  return null;
}

/** Slots in request order (each column once); null when a required column is missing or asked twice. */
function layoutFor(names: string[], requests: ColumnRequest[], crlf: boolean): ScanLayout | null {
  const slotOfField = new Int32Array(names.length).fill(-1);
  const slotNames: string[] = [];
  for (const request of requests) {
    const field = names.indexOf(request.column);
    if (field < 0) {
      if (request.optional) continue;
      return null;
    }
    if (slotOfField[field] >= 0) return null;
    slotOfField[field] = slotNames.length;
    slotNames.push(request.column);
  }
  return { fieldCount: names.length, slotOfField, slotNames, crlf, delimiter: 44, decimal: 46, countedBy: "header", noun: "CSV" };
}
