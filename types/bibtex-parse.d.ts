// Minimal types for bibtex-parse 2.x (used by tests to check that our BibTeX entries parse).
declare module "bibtex-parse" {
  /** Entries with `key`, `type` and each field under its upper-case name. */
  export function entries(bibtex: string): Array<{ key: string; type: string } & Record<string, string | number>>;
  const bibtexParse: { entries: typeof entries };
  export default bibtexParse;
}
