import { LineCounter, parseDocument, isNode, type Document } from "yaml";
import { ConfigError } from "../errors.ts";

/** A parsed YAML file that can say on which line a key path sits. */
export interface LocatedYaml {
  file: string;
  value: unknown;
  lineOf(path: readonly (string | number)[]): number | undefined;
}

/** The YAML parser's message without its own position suffix (we give the position in front). */
function syntaxMessage(message: string): string {
  return message
    .split("\n")[0]
    .replace(/ at line \d+, column \d+:?$/, "")
    .replace(/:$/, "");
}

/** A hint for the mistakes people make most often in hand-written YAML. */
function syntaxHint(code: string): string {
  if (code === "TAB_AS_INDENT") return "; indent with spaces, not tabs";
  if (code === "DUPLICATE_KEY") return "; give each key once";
  return "";
}

export function parseLocatedYaml(file: string, source: string): LocatedYaml {
  const lineCounter = new LineCounter();
  const doc: Document = parseDocument(source, { lineCounter, prettyErrors: true, uniqueKeys: true });
  if (doc.errors.length > 0) {
    // Later errors are mostly consequences of the first (a parser that lost its
    // place); the first, with its line and column, is what a person fixes.
    const first = doc.errors[0];
    const pos = first.linePos?.[0];
    const more = doc.errors.length - 1;
    throw new ConfigError(
      `${file}:${pos ? pos.line : "?"}: YAML syntax: ${syntaxMessage(first.message)}${pos ? ` (column ${pos.col})` : ""}${syntaxHint(first.code)}` +
        (more > 0 ? `\n… and ${more} more YAML problem(s) after it, often consequences of the first; fix it and run again` : ""),
    );
  }
  let value: unknown;
  try {
    // maxAliasCount guards against alias expansion that would exhaust memory ("billion laughs").
    value = doc.toJS({ maxAliasCount: 100 });
  } catch (err) {
    if (err instanceof ReferenceError || err instanceof TypeError) {
      throw new ConfigError(`${file}: YAML aliases (*name) ${err.message.includes("Excessive") ? "expand to too much data" : "cannot be resolved"}; write the values out instead of repeating them by alias`);
    }
    throw err;
  }
  const lineOf = (path: readonly (string | number)[]): number | undefined => {
    // Walk up the path until a node with a source range is found.
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return undefined;
  };
  return { file, value, lineOf };
}

/** `datasets[0].reservoirs.A.T` */
export function formatKeyPath(path: readonly (string | number)[]): string {
  let out = "";
  for (const part of path) {
    if (typeof part === "number") out += `[${part}]`;
    else out += out ? `.${part}` : part;
  }
  return out || "(top level)";
}
