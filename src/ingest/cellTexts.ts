import fs from "node:fs";
import { Readable } from "node:stream";
import { parse } from "csv-parse";
import type { CellProblem } from "../errors.ts";
import { describeStoredNumber, quoteForMessage } from "../messageText.ts";
import { tableParseOptions } from "./readCsv.ts";
import { WHITESPACE_RUNS } from "./fast/scanLines.ts";
import { openDataFile } from "./sources/openDataFile.ts";
import { compressionOf, headOf, textBlocks } from "./sources/fileBytes.ts";
import { findGeneralTable, findTextTable, splitCells, type TextTableStart } from "./sources/text/textHeader.ts";
import { textHead } from "./sources/text/textSource.ts";
import { TEXT_FORMATS, type TextFormat } from "./sources/text/dialect.ts";
import type { SourceRequest } from "./sources/types.ts";

/**
 * The cells of a text file's problems as the file writes them. A reader turns each cell into a
 * double, which is not always what was written: `9007199254740993` becomes …992 (IEEE 754 binary64
 * has 53 significant bits), `1.50` becomes 1.5. A message about such a number quotes the text, so
 * the file is read again, on this error path only, from its table's start to the last line named,
 * with the same table start and delimiter as the first reading; every problem that carries a
 * number (CellProblem.found) gets its cell's text.
 */
export async function writtenCellTexts(request: SourceRequest, problems: CellProblem[]): Promise<void> {
  const wanted = problems.filter((p) => p.found !== undefined);
  if (wanted.length === 0) return;
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    const compression = compressionOf(headOf(fd, 4));
    const { head, whole } = await textHead(fd, size, compression, request.label);
    const named = (TEXT_FORMATS as readonly string[]).includes(request.settings.format ?? "") ? (request.settings.format as TextFormat) : null;
    const table =
      findTextTable(head, whole, named, request.settings, request.columns, request.label, request.keyPath) ??
      findGeneralTable(head, named, request.settings, request.columns, request.label, request.keyPath);
    const byLine = new Map<number, CellProblem[]>();
    for (const p of wanted) byLine.set(p.row, [...(byLine.get(p.row) ?? []), p]);
    const last = Math.max(...byLine.keys());
    const text = textBlocks(fd, size, compression, request.label, table.dataStart);
    for await (const { line, cells } of tableRecords(text, table)) {
      for (const p of byLine.get(line) ?? []) {
        const field = fieldOf(table, p.column);
        if (field >= 0 && cells[field] !== undefined) p.text = cells[field];
      }
      if (line >= last) break;
    }
  } finally {
    fs.closeSync(fd);
  }
}

/** A reader's look-up of problems' cells as written (text files; `writtenCellTexts` bound to its request). */
export type CellTextLookup = (problems: CellProblem[]) => Promise<void>;

/** One cell a message names inside its words: its line (or row), column, and the number it was read as. */
export interface NamedCell {
  row: number;
  column: string;
  found: number;
}

/**
 * Cells as a message quotes them where the value stands inside the words (`mean transfer "1e160" is
 * …`) rather than after them (CellProblem.found does that). A text file's cell is quoted as written,
 * looked up on this error path only; a binary file's cell (Parquet, HDF5, NumPy: no `lookup`) has no
 * text, and its stored double prints exactly (ECMA-262 Number::toString, the shortest decimal that
 * reads back as it). A text file that cannot be read again gives the number, worded as
 * describeStoredNumber words it, rather than no message.
 */
export async function quotedCells(lookup: CellTextLookup | undefined, cells: NamedCell[]): Promise<string[]> {
  const problems: CellProblem[] = cells.map((c) => ({ row: c.row, column: c.column, message: "", found: c.found }));
  if (lookup) await lookup(problems).catch(() => undefined);
  return problems.map((p) => (p.text !== undefined ? quoteForMessage(p.text) : lookup ? describeStoredNumber(p.found!) : String(p.found)));
}

/** The field (0-based) that holds a column, by the name messages give it. */
function fieldOf(table: TextTableStart, column: string): number {
  const { slotOfField, slotNames } = table.layout;
  for (let f = 0; f < slotOfField.length; f++) if (slotOfField[f] >= 0 && slotNames[slotOfField[f]] === column) return f;
  return -1;
}

/** The data records after the table's start, each with its line as an editor counts (as the readers count them). */
async function* tableRecords(text: AsyncIterable<Uint8Array>, table: TextTableStart): AsyncGenerator<{ line: number; cells: string[] }> {
  const comment = (first: string) => first === "" || first.startsWith("#") || first.startsWith("%") || first.startsWith("!");
  if (table.dialect.delimiter === WHITESPACE_RUNS) {
    // Runs of blanks: one record a line (the readers refuse quotes over several lines here).
    let line = table.headerLines;
    let carry = "";
    const decoder = new TextDecoder("utf-8");
    for await (const block of text) {
      const pieces = (carry + decoder.decode(block, { stream: true })).split("\n");
      carry = pieces.pop()!;
      for (const piece of pieces) {
        line++;
        const cells = splitCells(piece.replace(/\r$/, ""), table.dialect);
        if (!comment(cells[0] ?? "")) yield { line, cells };
      }
    }
    if (carry !== "") yield { line: line + 1, cells: splitCells(carry.replace(/\r$/, ""), table.dialect) };
    return;
  }
  // As the general reader (sources/text/generalRows.ts) parses: csv-parse, trimmed cells, # comments.
  const parser = parse(tableParseOptions(String.fromCharCode(table.dialect.delimiter)));
  const input = Readable.from(text);
  input.on("error", (err) => parser.destroy(err));
  input.pipe(parser);
  let skip = table.general && table.dialect.header ? 1 : 0; // the general reader starts at the header
  try {
    for await (const { record, info } of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      if (comment(record[0] ?? "") && (record[0] ?? "") !== "") continue;
      if (skip > 0) {
        skip--;
        continue;
      }
      yield { line: info.lines + table.headerLines, cells: record };
    }
  } finally {
    input.destroy();
    parser.destroy();
  }
}
