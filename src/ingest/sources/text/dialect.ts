import { ConfigError } from "../../../errors.ts";
import { WHITESPACE_RUNS } from "../../fast/scanLines.ts";
import type { Compression } from "../fileBytes.ts";
import type { FileLayoutSettings } from "../types.ts";

/** The delimited-text formats, as `format:` names them. */
export const TEXT_FORMATS = ["comma", "tab", "semicolon", "whitespace"] as const;
export type TextFormat = (typeof TEXT_FORMATS)[number];

/** How a delimited text file is laid out. */
export interface TextDialect {
  format: TextFormat;
  /** The byte between cells, or WHITESPACE_RUNS. */
  delimiter: number;
  decimal: "point" | "comma";
  header: boolean;
  skipLines: number;
}

const DELIMITER: Record<TextFormat, number> = { comma: 44, tab: 9, semicolon: 59, whitespace: WHITESPACE_RUNS };
const NAME: Record<TextFormat, string> = { comma: "comma-separated", tab: "tab-separated", semicolon: "semicolon-separated", whitespace: "whitespace-separated" };

/**
 * The delimiter of a text file whose format is not named, from its first
 * table line (the header, or the first row): commas first (the common CSV),
 * then semicolons (spreadsheets with decimal commas), then tabs, else runs of
 * blanks (what Fortran and C codes print).
 */
export function detectTextFormat(firstLine: string): TextFormat {
  if (firstLine.includes(",")) return "comma";
  if (firstLine.includes(";")) return "semicolon";
  if (firstLine.trim().includes("\t") && !/ {2}/.test(firstLine)) return "tab";
  return "whitespace";
}

/** The dialect from the dataset's layout keys; refuses a decimal comma with the comma delimiter, naming the key. */
export function dialectOf(format: TextFormat, settings: FileLayoutSettings, keyPath: string): TextDialect {
  const decimal = settings.decimal ?? "point";
  if (decimal === "comma" && format === "comma") {
    throw new ConfigError(
      `audit.yaml ${keyPath}.decimal: a decimal comma needs a delimiter other than the comma (format: semicolon, tab or whitespace); with comma-separated cells "1,5" would be two cells`,
    );
  }
  return { format, delimiter: DELIMITER[format], decimal, header: settings.header ?? true, skipLines: settings.skip_lines ?? 0 };
}

/** The phrase the report states for a text file, e.g. "semicolon-separated text, decimal comma, no header, gzip-compressed". */
export function describeTextFormat(d: TextDialect, compression: Compression, detected: boolean): string {
  const parts = [`${NAME[d.format]} text${detected ? " (detected)" : ""}`];
  if (d.decimal === "comma") parts.push("decimal comma");
  if (!d.header) parts.push("no header row");
  if (d.skipLines > 0) parts.push(`${d.skipLines} preamble line(s) skipped`);
  if (compression !== "none") parts.push(`${compression === "gzip" ? "gzip" : "Zstandard"}-compressed`);
  return parts.join(", ");
}
