import { describeStoredNumber, quoteForMessage, shortenQuotes } from "./messageText.ts";

/**
 * Error hierarchy. An `InputError` means the user's input cannot be audited
 * (exit status 2, printed without a stack); anything else is our own bug.
 * Every message names where the problem is: file, row as a person counts it,
 * column, or the key path in audit.yaml, and says what was expected.
 */
export class InputError extends Error {
  override name = "InputError";
}

/** audit.yaml or archive.yaml does not satisfy the schema. */
export class ConfigError extends InputError {
  override name = "ConfigError";
}

/** A data file cannot be read or one of its cells is not what the role needs. */
export class DataError extends InputError {
  override name = "DataError";
}

/** A unit string is not one the tool knows. */
export class UnitError extends InputError {
  override name = "UnitError";
}

/** A path in audit.yaml leaves the audit folder. */
export class PathError extends InputError {
  override name = "PathError";
}

/** Publishing or verifying an archive version was refused. */
export class ArchiveError extends InputError {
  override name = "ArchiveError";
}

/** At most this many problems are listed in one message; the others are counted. */
export const MAX_REPORTED_PROBLEMS = 20;

/** One located problem in a file; several are gathered before failing. */
export interface CellProblem {
  row: number; // 1-based as a person counts lines, header included
  column: string;
  message: string;
  /**
   * The number the cell was read as, when the message is about it: shown after the message as
   * `, found …`, quoting `text` (the cell as the file writes it) once a reader has supplied it.
   */
  found?: number;
  text?: string;
}

/**
 * What a problem's cell holds, for `, found …`: the text as written in a text file, quoted; the
 * stored number in a binary file (a double prints exactly: the shortest decimal that reads back as
 * it, ECMA-262 Number::toString); a text cell not yet looked up, without a number the file does not hold.
 */
function foundPart(p: CellProblem, stored: boolean): string {
  if (p.found === undefined) return "";
  if (p.text !== undefined) return `, found ${quoteForMessage(p.text)}`;
  return `, found ${stored ? String(p.found) : describeStoredNumber(p.found)}`;
}

/**
 * Format gathered cell problems into one message so that a user can fix them in
 * one go: `data/run3.csv:14, column "n": expected a number, found "seven"`.
 */
export function formatCellProblems(file: string, problems: CellProblem[], cap: number, total = problems.length): string {
  return formatProblems(file, problems, cap, total, (p) => `${file}:${p.row}, column "${p.column}"`, false);
}

/** The same for files without lines (Parquet): `data/run3.parquet, row 14, column "n": …`, rows counted from 1. */
export function formatRowNumberedProblems(file: string, problems: CellProblem[], total = problems.length): string {
  return formatProblems(file, problems, MAX_REPORTED_PROBLEMS, total, (p) => `${file}, row ${p.row}, column "${p.column}"`, true);
}

function formatProblems(file: string, problems: CellProblem[], cap: number, total: number, where: (p: CellProblem) => string, stored: boolean): string {
  // A quoted cell longer than 80 characters is shown shortened, with its length (messageText.ts).
  const lines = problems.slice(0, cap).map((p) => `${where(p)}: ${shortenQuotes(p.message)}${foundPart(p, stored)}`);
  if (total > cap) lines.push(`… and ${total - cap} more problem(s) in ${file}`);
  return lines.join("\n");
}

/** Problems gathered over a file before failing: the first MAX_REPORTED_PROBLEMS, and how many in all. */
export interface ProblemLog {
  problems: CellProblem[];
  count: number;
}

export function newProblemLog(): ProblemLog {
  return { problems: [], count: 0 };
}

/** Log a problem; `found`, the number the cell was read as, is shown after the message (see CellProblem). */
export function recordProblem(log: ProblemLog, row: number, column: string, message: string, found?: number): void {
  log.count++;
  if (log.problems.length < MAX_REPORTED_PROBLEMS) log.problems.push({ row, column, message: shortenQuotes(message), ...(found === undefined ? {} : { found }) });
}
