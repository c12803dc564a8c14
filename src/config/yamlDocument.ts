import { LineCounter, parseDocument, isNode, type Document } from "yaml";
import { ConfigError } from "../errors.ts";

/** A parsed YAML file that can say on which line a key path sits. */
export interface LocatedYaml {
  file: string;
  value: unknown;
  lineOf(path: readonly (string | number)[]): number | undefined;
}

export function parseLocatedYaml(file: string, source: string): LocatedYaml {
  const lineCounter = new LineCounter();
  const doc: Document = parseDocument(source, { lineCounter, prettyErrors: true, uniqueKeys: true });
  if (doc.errors.length > 0) {
    const lines = doc.errors.map((e) => {
      const pos = e.linePos?.[0];
      return `${file}:${pos ? pos.line : "?"}: YAML syntax: ${e.message.split("\n")[0]}`;
    });
    throw new ConfigError(lines.join("\n"));
  }
  const lineOf = (path: readonly (string | number)[]): number | undefined => {
    // Walk up the path until a node with a source range is found.
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return undefined;
  };
  return { file, value: doc.toJS(), lineOf };
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
