// Minimal types for bibtex-parse 2.x (used by tests to check that our BibTeX entries parse).
declare module "bibtex-parse" {
  /** Entries with `key`, `type` and each field under its upper-case name. */
  export function entries(bibtex: string): Array<{ key: string; type: string } & Record<string, string | number>>;
  /** One field of an entry in the syntax tree: `value` without its outer braces or quotes, `raw` as written. */
  export interface ParsedField {
    name: string;
    value: string;
    raw: string;
    datatype: "braced" | "quoted" | "number" | "identifier" | "concatinate" | "null";
  }
  /** The syntax tree: entries, strings, preambles and comments, in file order. */
  export function parse(bibtex: string): Array<{ itemtype: "entry"; type: string; key: string; fields: ParsedField[] } | { itemtype: "string" | "preamble" | "comment" }>;
  const bibtexParse: { entries: typeof entries; parse: typeof parse };
  export default bibtexParse;
}
