import { ConfigError } from "../../errors.ts";

/** A column a dataset names, with the audit.yaml key that names it (`columns.G`, `temperature.column`, `point[0]`). */
export interface NamedColumn {
  key: string;
  column: string | number;
  /** The key written with a position, as the message suggests it: `columns: { G: 2 }`. */
  example: string;
}

/**
 * A file without a header row (`header: false`) has no names to look
 * columns up by: each column the dataset needs must then be given by its
 * 1-based position. Refuses, by key path, every column still given by name
 * (a role left to its default name counts as given by name), before the file
 * is opened; columns a dataset only reads when present are simply absent.
 */
export function requirePositions(header: boolean | undefined, columns: NamedColumn[], where: string): void {
  if (header !== false) return;
  const named = columns.filter((c) => typeof c.column === "string");
  if (named.length === 0) return;
  throw new ConfigError(
    named
      .map((c) => `${where}.${c.key}: the file has no header row (header: false), so columns are given by 1-based position, e.g. ${c.example}; found ${JSON.stringify(c.column)}`)
      .join("\n"),
  );
}
