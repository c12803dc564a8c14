import { MAX_REPORTED_PROBLEMS, type CellProblem } from "../../errors.ts";
import { describeCellProblem, MAX_LINE_CHARS } from "../readCsv.ts";

/**
 * The byte-level scanner of the fast CSV path: one pass over complete lines,
 * numbers decoded in place, cells outside the fast grammar handed
 * to the same cell rules as the reference reader (`describeCellProblem`), so a
 * value or a message never differs from `readNumericCsv`.
 *
 * The scanner only accepts the plain layout that numeric instrument and
 * simulation files use: comma-separated, no quotes, one record a line (LF or
 * CRLF), `#` comment lines, empty lines. Anything else (a quote, a record with
 * the wrong number of fields, a lone CR, an indented comment, a whitespace-only
 * line, an enormous line) stops the scan with a `structural` reason, and the
 * caller re-reads the file with the reference reader, which accepts what
 * csv-parse accepts and words every error.
 */

/** Where each field of a data line goes. */
export interface ScanLayout {
  /** Fields a data line must have (the header's). */
  fieldCount: number;
  /** Output slot of each field, −1 for fields nobody asked for. */
  slotOfField: Int32Array;
  /** Column name of each slot, for messages. */
  slotNames: string[];
  /** Lines end with CR LF (as the header's does); a line ending otherwise goes to the reference reader. */
  crlf: boolean;
  /** What set `fieldCount`, for messages: "header" or "first row" (files without a header). */
  countedBy: string;
  /** What the file is called in messages about its structure: "CSV", or "table" for the other delimiters. */
  noun: string;
  /** The byte between cells (comma, tab or semicolon), or WHITESPACE_RUNS: any run of spaces and tabs. */
  delimiter: number;
  /** The decimal separator's byte: a point, or a comma (with a non-comma delimiter). */
  decimal: number;
}

/** `ScanLayout.delimiter` for tables whose cells are separated by runs of spaces and tabs (fixed-width columns included). */
export const WHITESPACE_RUNS = 32;

/** Rows handed to a sink: one Float64Array a slot, `rows` long, and the row's line within the range. */
export interface RowChunk {
  rows: number;
  values: Float64Array[];
  /** Line of each row counted from the start of the scanned range (1 = the range's first line). */
  lines: Uint32Array;
}

export interface ScanState {
  /** Lines completed so far in this range. */
  line: number;
  /** Data rows so far. */
  rows: number;
  /** First cell problems (lines relative to the range), and how many there were in all. */
  problems: CellProblem[];
  problemCount: number;
  /** Why the fast path gave up, or null. */
  structural: string | null;
  /** A refusal worded for the user (its line counted from the range's start), or null: the file cannot be read. */
  refusal: { line: number; message: string } | null;
  /** Byte offset (in the scanned buffer) of the line where the scan stopped, when it stopped early. */
  stoppedAt: number;
}

const NL = 10;
const CR = 13;
const COMMA = 44;
const QUOTE = 34;
const HASH = 35;
const PERCENT = 37;
const BANG = 33;
const SPACE = 32;
const TAB = 9;
const ZERO = 48;
const NINE = 57;
const DOT = 46;
const PLUS = 43;
const MINUS = 45;
const LOWER_E = 101;
const UPPER_E = 69;

export function newScanState(): ScanState {
  return { line: 0, rows: 0, problems: [], problemCount: 0, structural: null, refusal: null, stoppedAt: -1 };
}

/** Buffers of one chunk of rows, filled line by line and flushed to the sink when full. */
export class ChunkBuilder {
  readonly values: Float64Array[];
  readonly lines: Uint32Array;
  rows = 0;
  constructor(
    slots: number,
    readonly capacity: number,
  ) {
    this.values = Array.from({ length: slots }, () => new Float64Array(capacity));
    this.lines = new Uint32Array(capacity);
  }
  get full(): boolean {
    return this.rows === this.capacity;
  }
  /** The filled part as a chunk (views: the sink must copy what it keeps). */
  view(): RowChunk {
    return { rows: this.rows, values: this.values.map((v) => v.subarray(0, this.rows)), lines: this.lines.subarray(0, this.rows) };
  }
}

const decoder = new TextDecoder("utf-8");
const TWO_53 = 9007199254740992;
/*
 * Exactness of the inlined number path. A literal m × 10^e with an integer
 * significand m < 2^53 and |e| ≤ 22 converts with a single IEEE operation on two
 * exact doubles (m, and 10^|e| which is representable), so the product or
 * quotient is the correctly rounded value: the double `Number()` returns
 * (Clinger, "How to read floating point numbers accurately", PLDI 1990, the
 * "fast path"). Up to 15 significant digits m is exact (10^15 < 2^53); a 16th
 * keeps it exact only while the true value stays below 2^53. Everything else
 * (17+ digits, large exponents, `Infinity`, stray characters) goes to the
 * reference cell rules, so a value never differs from the reference reader.
 */
// 10^0 … 10^22, each exactly representable as a double.
const POW10 = Float64Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * Scan the lines of bytes[from, to), which must all end with a newline (the
 * range reader cuts blocks after a newline and closes a last line that lacks
 * one). Rows go into `chunk`; `flush` is called whenever it is full. Numbers
 * are decoded while the line is scanned (each byte is touched once); a cell
 * outside the exact fast path is
 * cut out and read by `describeCellProblem`.
 */
export function scanLines(
  bytes: Uint8Array,
  from: number,
  to: number,
  layout: ScanLayout,
  state: ScanState,
  chunk: ChunkBuilder,
  flush: () => void,
): void {
  const slots = layout.slotNames.length;
  const fieldCount = layout.fieldCount;
  const slotOfField = layout.slotOfField;
  const runs = layout.delimiter === WHITESPACE_RUNS;
  // −1 never equals a byte: with whitespace runs no single byte separates cells, and a tab pads a cell only where it does not separate cells.
  const delim = runs ? -1 : layout.delimiter;
  const pad = layout.delimiter === TAB ? -1 : TAB;
  const dec = layout.decimal;
  const decimal = dec === COMMA ? "comma" : "point";
  const lineProblems: (string | null)[] = new Array(slots).fill(null);
  // Counters live in locals while the lines are scanned, and go back to state and chunk on the way out.
  const { values, lines, capacity } = chunk;
  let line = state.line;
  let rows = state.rows;
  let row = chunk.rows;
  let pos = from;
  // Whether `line` already counts the line at `pos` (its fields are being read).
  let counted = false;
  // The line at `pos` is left uncounted for the reader that takes over (or for the refusal's line number).
  const stop = (reason: string) => {
    if (counted) line--;
    state.stoppedAt = pos;
    state.structural = reason;
  };
  const refuse = (message: string) => {
    if (counted) line--;
    state.stoppedAt = pos;
    state.refusal = { line: line + 1, message };
  };
  try {
    while (pos < to) {
      let c = bytes[pos];
      if (c === NL) {
        if (layout.crlf) return refuse(LF_IN_CRLF);
        line++;
        pos++;
        continue; // empty line
      }
      if (c === CR && bytes[pos + 1] === NL) {
        // Mixed line ends are counted differently by csv-parse; the general reader takes the rest of such files.
        if (!layout.crlf) return stop("mixed line ends");
        line++;
        pos += 2;
        continue;
      }
      let p = pos;
      if (runs) {
        // Fixed-width columns: leading blanks are padding, a line of blanks is empty.
        while (c === SPACE || c === TAB) c = bytes[++p];
        if (c === NL || c === CR) {
          if ((c === CR) !== layout.crlf) return c === CR ? stop("mixed line ends") : refuse(LF_IN_CRLF);
          line++;
          pos = c === CR ? p + 2 : p + 1;
          continue;
        }
      }
      if (c === HASH || c === PERCENT || c === BANG) {
        const nl = bytes.indexOf(NL, p);
        if (nl - pos > MAX_LINE_CHARS) return refuse(longLine(layout));
        if ((bytes[nl - 1] === CR) !== layout.crlf) return layout.crlf ? refuse(LF_IN_CRLF) : stop("mixed line ends");
        line++;
        pos = nl + 1;
        continue; // comment line
      }
      line++;
      counted = true;
      const lineStart = pos;
      let field = 0;
      let hasProblem = false;
      // One field per turn; p ends on the delimiter, CR or NL that closes it (with runs: on the next field or the line end).
      while (true) {
        let fieldStart = p;
        const slot = field < fieldCount ? slotOfField[field] : -1;
        c = bytes[p];
        while (c === SPACE || c === pad) c = bytes[++p];
        if (c === QUOTE && !runs) {
          // A whole quoted cell on one line ("1.5"): its text goes through the cell rules, as csv-parse gives it.
          const open = p;
          let q = p + 1;
          while (q < to && bytes[q] !== QUOTE && bytes[q] !== NL) q++;
          if (bytes[q] !== QUOTE || bytes[q + 1] === QUOTE) return stop("a quoted field over several lines or with a doubled quote");
          p = q + 1;
          c = bytes[p];
          while (c === SPACE || c === pad) c = bytes[++p];
          if (c !== delim && c !== NL && c !== CR) return stop("a quoted field followed by other text");
          if (slot >= 0) {
            const parsed = describeCellProblem(decoder.decode(bytes.subarray(open + 1, q)), decimal);
            if (typeof parsed === "string") {
              lineProblems[slot] = parsed;
              hasProblem = true;
              values[slot][row] = Number.NaN;
            } else values[slot][row] = parsed;
          }
        } else if (slot >= 0) {
          if (runs) fieldStart = p;
          let negative = false;
          if (c === MINUS || c === PLUS) {
            negative = c === MINUS;
            c = bytes[++p];
          }
          // Significand digits accumulate into m; it stays exact while below 2^53, which
          // also rules out 17 or more significant digits (then m ≥ 10^16 > 2^53).
          let m = 0;
          const intStart = p;
          while (c >= ZERO && c <= NINE) {
            m = m * 10 + (c - ZERO);
            c = bytes[++p];
          }
          let any = p > intStart;
          let scale = 0;
          if (c === dec) {
            const fracStart = ++p;
            c = bytes[p];
            while (c >= ZERO && c <= NINE) {
              m = m * 10 + (c - ZERO);
              c = bytes[++p];
            }
            scale = fracStart - p;
            any = any || scale < 0;
          }
          let exact = any;
          if (exact && (c === LOWER_E || c === UPPER_E)) {
            c = bytes[++p];
            let expNegative = false;
            if (c === MINUS || c === PLUS) {
              expNegative = c === MINUS;
              c = bytes[++p];
            }
            let exponent = 0;
            const expStart = p;
            while (c >= ZERO && c <= NINE) {
              if (exponent < 10000) exponent = exponent * 10 + (c - ZERO);
              c = bytes[++p];
            }
            if (p === expStart) exact = false;
            scale += expNegative ? -exponent : exponent;
          }
          const end = p;
          if (runs) {
            while (c === SPACE || c === TAB) c = bytes[++p];
            if (p === end && c !== NL && c !== CR) exact = false;
          } else {
            while (c === SPACE || c === pad) c = bytes[++p];
            if (c !== delim && c !== NL && c !== CR) exact = false;
          }
          if (m >= TWO_53 || scale > 22 || scale < -22) exact = false;
          let value: number;
          if (exact) {
            value = m === 0 ? 0 : scale === 0 ? m : scale > 0 ? m * POW10[scale] : m / POW10[-scale];
            if (negative) value = -value;
          } else {
            // Outside the fast path: the cell's text goes through the reference cell rules.
            p = fieldStart;
            c = bytes[p];
            if (runs) while (c !== SPACE && c !== TAB && c !== NL && c !== CR) c = bytes[++p];
            else while (c !== delim && c !== NL && c !== QUOTE && c !== CR) c = bytes[++p];
            if (c === QUOTE) return stop("a quote inside a cell");
            if (c === CR && bytes[p + 1] !== NL) return stop("a carriage return inside a line");
            const parsed = describeCellProblem(decoder.decode(bytes.subarray(fieldStart, p)), decimal);
            if (typeof parsed === "string") {
              lineProblems[slot] = parsed;
              hasProblem = true;
              value = Number.NaN;
            } else value = parsed;
            if (runs) while (c === SPACE || c === TAB) c = bytes[++p];
          }
          values[slot][row] = value;
        } else if (runs) {
          while (c !== SPACE && c !== TAB && c !== NL && c !== CR) c = bytes[++p];
          while (c === SPACE || c === TAB) c = bytes[++p];
        } else {
          while (c !== delim && c !== NL && c !== QUOTE && c !== CR) c = bytes[++p];
          if (c === QUOTE) return stop("a quote inside a cell");
        }
        field++;
        if (c === delim) {
          p++;
          continue;
        }
        if (c === CR && bytes[p + 1] !== NL) return stop("a carriage return inside a line");
        if (runs && c !== NL && c !== CR) continue;
        break;
      }
      if (p - lineStart > MAX_LINE_CHARS) return refuse(longLine(layout));
      const crlf = bytes[p] === CR;
      if (crlf !== layout.crlf) return crlf ? stop("mixed line ends") : refuse(LF_IN_CRLF);
      const lineEnd = crlf ? p + 2 : p + 1;
      if (field !== fieldCount) {
        if (runs) return refuse(`malformed ${layout.noun}: this row has ${field} cell(s) but the ${layout.countedBy} has ${fieldCount}; every row needs one cell per column (is a cell empty, or do two columns touch?)`);
        return stop(`a record with ${field} field(s) where the header has ${fieldCount}`);
      }
      if (!runs && (bytes[lineStart] === SPACE || bytes[lineStart] === TAB)) {
        // A blank-only line, or an indented comment: csv-parse's reading of those is its own; let it decide.
        let q = lineStart;
        while (bytes[q] === SPACE || bytes[q] === TAB) q++;
        const first = bytes[q];
        if (first === HASH || first === PERCENT || first === BANG || first === NL || first === CR) return stop("an indented comment or a blank line");
      }
      if (hasProblem) {
        for (let slot = 0; slot < slots; slot++) {
          const message = lineProblems[slot];
          if (message === null) continue;
          state.problemCount++;
          if (state.problems.length < MAX_REPORTED_PROBLEMS) state.problems.push({ row: line, column: layout.slotNames[slot], message });
          lineProblems[slot] = null;
        }
      }
      lines[row] = line;
      row++;
      rows++;
      if (row === capacity) {
        chunk.rows = row;
        flush();
        row = chunk.rows;
      }
      pos = lineEnd;
      counted = false;
    }
  } finally {
    state.line = line;
    state.rows = rows;
    chunk.rows = row;
  }
}

/** The refusal for a line that ends with LF alone in a file whose header line ends with CR LF. */
export const LF_IN_CRLF =
  "this line ends with a line feed alone (LF) while the lines before it end with CR LF; a file with mixed line ends was pieced together by different programs and its lines cannot be counted reliably: save it with one kind of line end";

/** The refusal of a line beyond MAX_LINE_CHARS (numeric lines are ASCII, so characters are bytes). */
export function longLine(layout: Pick<ScanLayout, "noun">): string {
  return `malformed ${layout.noun}: a line is longer than ${MAX_LINE_CHARS.toLocaleString("en-US")} characters; a row of a numeric table is far shorter, so this is not a table transport-audit can read (are the line ends missing?)`;
}
