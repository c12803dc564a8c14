/**
 * The Python literals a .npy header is written in (NumPy's format specification,
 * numpy.lib.format: the header is the repr of a dict): dicts, lists, tuples, strings,
 * integers (with the `L` suffix Python 2 wrote), True, False and None. Nothing is
 * evaluated; anything else is refused with its position.
 */
export type PyValue = string | number | boolean | null | PyValue[] | PyTuple | PyDict;
export class PyTuple {
  constructor(readonly items: PyValue[]) {}
}
export class PyDict {
  constructor(readonly entries: Map<string, PyValue>) {}
}

/** Parse one literal that fills the whole text (surrounding spaces allowed); throws with the offset on anything else. */
export function parsePythonLiteral(text: string): PyValue {
  let at = 0;
  const fail = (what: string): never => {
    throw new SyntaxError(`${what} at character ${at + 1}`);
  };
  const skipSpace = () => {
    while (at < text.length && /\s/.test(text[at])) at++;
  };
  const expect = (ch: string) => {
    skipSpace();
    if (text[at] !== ch) fail(`expected "${ch}"`);
    at++;
  };
  const sequence = (close: string): { items: PyValue[]; trailingComma: boolean } => {
    const items: PyValue[] = [];
    let trailingComma = false;
    for (;;) {
      skipSpace();
      if (text[at] === close) break;
      items.push(value());
      skipSpace();
      trailingComma = text[at] === ",";
      if (!trailingComma) break;
      at++;
    }
    expect(close);
    return { items, trailingComma };
  };
  const string = (): string => {
    const quote = text[at++];
    let out = "";
    while (at < text.length && text[at] !== quote) {
      if (text[at] === "\\") {
        const next = text[at + 1];
        const simple: Record<string, string> = { "\\": "\\", "'": "'", '"': '"', n: "\n", t: "\t", r: "\r", "0": "\0" };
        if (next in simple) out += simple[next];
        else fail(`unsupported escape "\\${next}"`);
        at += 2;
      } else out += text[at++];
    }
    if (text[at] !== quote) fail("unterminated string");
    at++;
    return out;
  };
  const value = (): PyValue => {
    skipSpace();
    const ch = text[at];
    if (ch === "{") {
      at++;
      const entries = new Map<string, PyValue>();
      for (;;) {
        skipSpace();
        if (text[at] === "}") break;
        const key = value();
        if (typeof key !== "string") fail("expected a string key");
        expect(":");
        entries.set(key as string, value());
        skipSpace();
        if (text[at] !== ",") break;
        at++;
      }
      expect("}");
      return new PyDict(entries);
    }
    if (ch === "[") {
      at++;
      return sequence("]").items;
    }
    if (ch === "(") {
      at++;
      const { items, trailingComma } = sequence(")");
      // (x) is x in parentheses, (x,) a one-element tuple.
      return items.length === 1 && !trailingComma ? items[0] : new PyTuple(items);
    }
    if (ch === "'" || ch === '"') return string();
    const word = /^(?:True|False|None|-?\d+L?)/.exec(text.slice(at))?.[0];
    if (word === undefined) return fail("expected a dict, list, tuple, string, integer, True, False or None");
    at += word.length;
    if (word === "True") return true;
    if (word === "False") return false;
    if (word === "None") return null;
    return Number.parseInt(word, 10);
  };
  const result = value();
  skipSpace();
  if (at !== text.length) fail("unexpected text after the literal");
  return result;
}
