import { parquetSchema, type FileMetaData, type SchemaTree } from "hyparquet";
import { DataError } from "../../errors.ts";
import { nearest } from "../../config/nearest.ts";

/** Top-level column names of a file, in schema order. */
export function topLevelColumns(metadata: FileMetaData): string[] {
  return parquetSchema(metadata).children.map((child) => child.element.name);
}

// Apache Parquet "LogicalTypes.md": INTEGER (and the older converted types INT_8 … UINT_64)
// only say how wide and signed an integer is, so the values are still plain numbers.
// DECIMAL, DATE, TIME and TIMESTAMP give the integers another meaning, which a sample of a
// physical quantity in the audit's units cannot have, so those are refused.
const PLAIN_INTEGER_CONVERTED = new Set(["INT_8", "INT_16", "INT_32", "INT_64", "UINT_8", "UINT_16", "UINT_32", "UINT_64"]);
const NUMERIC_PHYSICAL = new Set(["DOUBLE", "FLOAT", "INT32", "INT64"]);

/** How a column is stored, in the words of the Parquet specification. */
function describeColumn(node: SchemaTree): string {
  const { element } = node;
  if (node.children.length > 0) {
    const annotation = element.logical_type?.type ?? element.converted_type;
    return `a nested column (${annotation ?? `a group of ${node.children.length} field(s)`})`;
  }
  const annotation = element.logical_type?.type ?? element.converted_type;
  const stored = `${element.type ?? "no physical type"}${annotation ? ` (${annotation})` : ""}`;
  return element.repetition_type === "REPEATED" ? `a repeated ${stored} column` : stored;
}

/** Whether a column holds plain numbers that convert to doubles. */
function isPlainNumeric(node: SchemaTree): boolean {
  const { element } = node;
  if (node.children.length > 0 || element.repetition_type === "REPEATED") return false;
  if (!element.type || !NUMERIC_PHYSICAL.has(element.type)) return false;
  if (element.logical_type && element.logical_type.type !== "INTEGER") return false;
  if (element.converted_type && !PLAIN_INTEGER_CONVERTED.has(element.converted_type)) return false;
  return true;
}

/**
 * Check that every requested column exists and holds plain numbers; gather all
 * problems into one message so that a user fixes them in one go.
 */
export function requireNumericColumns(metadata: FileMetaData, label: string, columns: readonly string[]): void {
  const nodes = parquetSchema(metadata).children;
  const names = nodes.map((n) => n.element.name);
  const problems: string[] = [];
  for (const column of columns) {
    const node = nodes.find((n) => n.element.name === column);
    if (!node) {
      const hint = nearest(column, names);
      problems.push(`${label}: no column "${column}"${hint ? `; did you mean "${hint}"?` : ""}; the file has columns ${names.map((n) => `"${n}"`).join(", ")}`);
    } else if (!isPlainNumeric(node)) {
      problems.push(`${label}, column "${column}": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found ${describeColumn(node)}`);
    }
  }
  if (problems.length) throw new DataError(problems.join("\n"));
}
