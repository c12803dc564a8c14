import { Readable } from "node:stream";
import { CsvError, parse } from "csv-parse";
import { DataError, recordProblem, type ProblemLog } from "../../../errors.ts";
import { describeCellProblem, describeCsvError, tableParseOptions } from "../../readCsv.ts";
import { CHUNK_ROWS } from "../../fast/scanRange.ts";
import type { RowChunk, ScanLayout } from "../../fast/scanLines.ts";
import type { TextDialect } from "./dialect.ts";

/**
 * The general reader of delimited text (csv-parse): quotes over several
 * lines, doubled quotes, lone CRs, blank lines of spaces, whatever the byte
 * scanner leaves. It takes over where the scanner stopped (the text from a
 * line start on, lines counted from `lineOffset`) and streams, so memory
 * stays bounded however much of the file is left. Rows come in chunks of
 * the scanner's shape; cell problems go to `problems`; structural errors
 * are thrown as the reference reader words them.
 */
export async function* generalRows(
  text: AsyncIterable<Uint8Array>,
  dialect: TextDialect,
  layout: ScanLayout,
  lineOffset: number,
  label: string,
  problems: ProblemLog,
  /** Reading from the start of the text: the header record to pass over (0 or 1), and line ends as the file's first line has them. */
  fromStart: { skipRecords: number } | null = null,
): AsyncGenerator<RowChunk> {
  let skip = fromStart?.skipRecords ?? 0;
  const parser = parse({
    ...tableParseOptions(String.fromCharCode(dialect.delimiter)),
    ...(fromStart ? { bom: true } : { bom: false, record_delimiter: layout.crlf ? "\r\n" : "\n" }),
  });
  const input = Readable.from(text);
  input.on("error", (err) => parser.destroy(err));
  input.pipe(parser);
  const slots = layout.slotNames.length;
  const decimal = dialect.decimal;
  let values = Array.from({ length: slots }, () => new Float64Array(CHUNK_ROWS));
  let lines = new Uint32Array(CHUNK_ROWS);
  let rows = 0;
  const noun = layout.noun;
  try {
    for await (const item of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      const { record, info } = item;
      const line = info.lines + lineOffset;
      const first = record[0] ?? "";
      if (first.startsWith("%") || first.startsWith("!")) continue; // a comment line of the other kinds
      if (skip > 0) {
        skip--;
        continue; // the header, read when the file was opened
      }
      if (record.length !== layout.fieldCount) {
        throw new DataError(describeCsvError(label, { code: "CSV_RECORD_INCONSISTENT_FIELDS_LENGTH", lines: line, record }, layout.fieldCount, noun, layout.countedBy));
      }
      for (let f = 0; f < record.length; f++) {
        const slot = layout.slotOfField[f];
        if (slot < 0) continue;
        const parsed = describeCellProblem(record[f], decimal);
        if (typeof parsed === "string") {
          recordProblem(problems, line, layout.slotNames[slot], parsed);
          values[slot][rows] = Number.NaN;
        } else values[slot][rows] = parsed;
      }
      lines[rows++] = line;
      if (rows === CHUNK_ROWS) {
        yield { rows, values, lines };
        values = Array.from({ length: slots }, () => new Float64Array(CHUNK_ROWS));
        lines = new Uint32Array(CHUNK_ROWS);
        rows = 0;
      }
    }
  } catch (err) {
    if (err instanceof DataError) throw err;
    const e = err as { code?: string; lines?: number };
    if (err instanceof CsvError) {
      throw new DataError(describeCsvError(label, { ...(err as unknown as { code: string }), lines: (e.lines ?? 0) + lineOffset }, layout.fieldCount, noun, layout.countedBy));
    }
    throw err;
  } finally {
    input.destroy();
  }
  if (rows > 0) yield { rows, values: values.map((v) => v.subarray(0, rows)), lines: lines.subarray(0, rows) };
}
