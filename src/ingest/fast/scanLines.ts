import { MAX_REPORTED_PROBLEMS, type CellProblem } from "../../errors.ts";
import { describeCellProblem } from "../readCsv.ts";

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
}

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
}

const NL = 10;
const CR = 13;
const COMMA = 44;
const QUOTE = 34;
const HASH = 35;
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
  return { line: 0, rows: 0, problems: [], problemCount: 0, structural: null };
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
  const lineProblems: (string | null)[] = new Array(slots).fill(null);
  // Counters live in locals while the lines are scanned, and go back to state and chunk on the way out.
  const { values, lines, capacity } = chunk;
  let line = state.line;
  let rows = state.rows;
  let row = chunk.rows;
  let pos = from;
  try {
    while (pos < to) {
      let c = bytes[pos];
      // Mixed line ends are counted differently by csv-parse; the reference reader takes such files.
      if (c === NL) {
        if (layout.crlf) return structural(state, "mixed line ends");
        line++;
        pos++;
        continue; // empty line
      }
      if (c === CR && bytes[pos + 1] === NL) {
        if (!layout.crlf) return structural(state, "mixed line ends");
        line++;
        pos += 2;
        continue;
      }
      if (c === HASH) {
        line++;
        const nl = bytes.indexOf(NL, pos);
        if ((bytes[nl - 1] === CR) !== layout.crlf) return structural(state, "mixed line ends");
        pos = nl + 1;
        continue; // comment line
      }
      line++;
      const lineStart = pos;
      let field = 0;
      let hasProblem = false;
      let p = pos;
      // One field per turn; p ends on the comma, CR or NL that closes it.
      while (true) {
        const fieldStart = p;
        const slot = field < fieldCount ? slotOfField[field] : -1;
        c = bytes[p];
        while (c === SPACE || c === TAB) c = bytes[++p];
        if (slot >= 0) {
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
          if (c === DOT) {
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
          while (c === SPACE || c === TAB) c = bytes[++p];
          if (c !== COMMA && c !== NL && c !== CR) exact = false;
          if (m >= TWO_53 || scale > 22 || scale < -22) exact = false;
          let value: number;
          if (exact) {
            value = m === 0 ? 0 : scale === 0 ? m : scale > 0 ? m * POW10[scale] : m / POW10[-scale];
            if (negative) value = -value;
          } else {
            // Outside the fast path: the cell's text goes through the reference cell rules.
            p = fieldStart;
            c = bytes[p];
            while (c !== COMMA && c !== NL && c !== QUOTE && c !== CR) c = bytes[++p];
            if (c === QUOTE) return structural(state, "a quoted field");
            if (c === CR && bytes[p + 1] !== NL) return structural(state, "a carriage return inside a line");
            const parsed = describeCellProblem(decoder.decode(bytes.subarray(fieldStart, p)));
            if (typeof parsed === "string") {
              lineProblems[slot] = parsed;
              hasProblem = true;
              value = Number.NaN;
            } else value = parsed;
          }
          values[slot][row] = value;
        } else {
          while (c !== COMMA && c !== NL && c !== QUOTE && c !== CR) c = bytes[++p];
          if (c === QUOTE) return structural(state, "a quoted field");
        }
        field++;
        if (c === COMMA) {
          p++;
          continue;
        }
        if (c === CR && bytes[p + 1] !== NL) return structural(state, "a carriage return inside a line");
        break;
      }
      const crlf = bytes[p] === CR;
      if (crlf !== layout.crlf) return structural(state, "mixed line ends");
      const lineEnd = crlf ? p + 2 : p + 1;
      if (field !== fieldCount) return structural(state, `a record with ${field} field(s) where the header has ${fieldCount}`);
      if (bytes[lineStart] === SPACE || bytes[lineStart] === TAB) {
        // A blank-only line, or an indented "#": csv-parse's reading of those is its own; let it decide.
        let q = lineStart;
        while (bytes[q] === SPACE || bytes[q] === TAB) q++;
        if (bytes[q] === HASH || bytes[q] === NL || bytes[q] === CR) return structural(state, "an indented comment or a blank line");
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
    }
  } finally {
    state.line = line;
    state.rows = rows;
    chunk.rows = row;
  }
}

function structural(state: ScanState, reason: string): void {
  state.structural = reason;
}
