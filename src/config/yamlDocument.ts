import { LineCounter, parseDocument, isAlias, isMap, isNode, isPair, isScalar, isSeq, type Document, type Node } from "yaml";
import { ConfigError } from "../errors.ts";

/** A parsed YAML file that can say on which line a key path sits. */
export interface LocatedYaml {
  file: string;
  value: unknown;
  lineOf(path: readonly (string | number)[]): number | undefined;
  /** The source text of the scalar at a path, exactly as written (`9007199254740993`, not the nearest double). */
  textAt(path: readonly (string | number)[]): string | undefined;
}

/** A definition file larger than this is refused before it is parsed (1 MiB: a thousand datasets fit in a tenth of it). */
export const MAX_YAML_BYTES = 1024 * 1024;
/** At most this many aliases (`*name`) times the nodes each repeats (the yaml package's maxAliasCount). */
export const MAX_ALIAS_COUNT = 100;
/** The document with every alias expanded may hold at most this many characters of text (4 MiB). */
export const MAX_EXPANDED_CHARS = 4 * 1024 * 1024;

const MIB = (n: number) => `${n / (1024 * 1024)} MiB`;

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

/** Refuse a definition too large to be one, before the parser sees it. */
export function checkYamlSize(file: string, bytes: number): void {
  if (bytes > MAX_YAML_BYTES) {
    throw new ConfigError(`${file}: is ${bytes} bytes; a definition file may hold at most ${MAX_YAML_BYTES} bytes (${MIB(MAX_YAML_BYTES)}): keep data in the data files, not in the YAML`);
  }
}

/**
 * Count the characters of text the document holds with every alias expanded,
 * without expanding it: an alias weighs what its anchored node weighs
 * (computed once per node). Refuses, naming the line and key path of the
 * alias that crosses the limit, a document that `*s` repeated a few dozen
 * times would blow up to gigabytes.
 */
function checkExpandedSize(file: string, doc: Document, lineCounter: LineCounter): void {
  const weight = new Map<Node, number>();
  const inProgress = new Set<Node>();
  const fail = (node: unknown, path: (string | number)[]): never => {
    const line = isNode(node) && node.range ? lineCounter.linePos(node.range[0]).line : "?";
    throw new ConfigError(
      `${file}:${line} ${formatKeyPath(path)}: YAML aliases (*name) expand the document to more than ${MAX_EXPANDED_CHARS} characters (${MIB(MAX_EXPANDED_CHARS)}), ` +
        `the limit that keeps a definition from exhausting memory; write shorter values or fewer repeats`,
    );
  };
  const weigh = (node: unknown, path: (string | number)[]): number => {
    if (!isNode(node)) return 0;
    if (isAlias(node)) {
      const target = node.resolve(doc);
      // An alias inside its own anchor is a cycle, which the conversion reports.
      return target && !inProgress.has(target) ? weigh(target, path) : 1;
    }
    const known = weight.get(node);
    if (known !== undefined) return known;
    let w = 1;
    if (isScalar(node)) w += String(node.value ?? "").length;
    else if (isMap(node) || isSeq(node)) {
      inProgress.add(node);
      node.items.forEach((item, i) => {
        const at = isPair(item) ? [...path, isScalar(item.key) ? String(item.key.value) : i] : [...path, i];
        w += isPair(item) ? weigh(item.key, at) + weigh(item.value, at) : weigh(item, at);
        if (w > MAX_EXPANDED_CHARS) fail(isPair(item) ? item.value : item, at);
      });
      inProgress.delete(node);
    }
    weight.set(node, w);
    return w;
  };
  if (weigh(doc.contents, []) > MAX_EXPANDED_CHARS) fail(doc.contents, []);
}

export function parseLocatedYaml(file: string, source: string): LocatedYaml {
  checkYamlSize(file, Buffer.byteLength(source, "utf8"));
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
  checkExpandedSize(file, doc, lineCounter);
  let value: unknown;
  try {
    // maxAliasCount guards against alias expansion that would exhaust memory ("billion laughs").
    value = doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (err) {
    if (err instanceof ReferenceError || err instanceof TypeError) {
      throw new ConfigError(
        err.message.includes("Excessive")
          ? `${file}: YAML aliases (*name) repeat more than ${MAX_ALIAS_COUNT} nodes in all, the limit that keeps a definition from exhausting memory; write the values out instead of repeating them by alias`
          : `${file}: YAML aliases (*name) cannot be resolved; write the values out instead of repeating them by alias`,
      );
    }
    throw err;
  }
  const nodeAt = (path: readonly (string | number)[]): Node | undefined => {
    // Walk up the path until a node with a source range is found.
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return node;
    }
    return undefined;
  };
  const lineOf = (path: readonly (string | number)[]): number | undefined => {
    const node = nodeAt(path);
    return node?.range ? lineCounter.linePos(node.range[0]).line : undefined;
  };
  const textAt = (path: readonly (string | number)[]): string | undefined => {
    const node = doc.getIn(path, true);
    return isScalar(node) && node.range ? source.slice(node.range[0], node.range[1]) : undefined;
  };
  return { file, value, lineOf, textAt };
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
