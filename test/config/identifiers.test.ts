/**
 * Issue 22 item 7: a DOI in audit.yaml must have the syntax of the DOI
 * Handbook (International DOI Foundation, DOI Handbook §2.2; ISO 26324):
 * `10.<registrant>/<suffix>`, the registrant digits and dots, the suffix
 * printable characters. Braces, backslash and double quote are refused as
 * well (see src/config/identifiers.ts for why). Web addresses in archive.yaml
 * are tested in test/archive/archiveDefinition.test.ts.
 */
import { describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { ConfigError } from "../../src/errors.ts";
import { thrownBy } from "../helpers/thrown.ts";
import { minimalAuditYaml } from "./minimalAudit.ts";

const withDoi = (doi: string) => minimalAuditYaml(`doi: ${doi}\n`);

const EXPECTED =
  "must be a DOI written 10.<registrant>/<suffix>, such as 10.5281/zenodo.1234567 (registrant: digits and dots; suffix: printable characters other than white space, braces, backslash and double quote)";

const messageOf = (doi: string) => thrownBy(ConfigError, () => parseAuditDefinition(withDoi(doi))).message;

describe("DOIs in audit.yaml", () => {
  it("refuses a DOI that closes its BibTeX field and opens a forged one", () => {
    expect(messageOf("10.1234/x},title={FORGED},note={n")).toBe(`audit.yaml:3 doi: ${EXPECTED}, found "10.1234/x},title={FORGED},note={n"`);
  });

  it.each([
    ["a registrant that is not digits and dots", "10.abc/x", '"10.abc/x"'],
    ["an empty suffix", '"10.1234/"', '"10.1234/"'],
    ["white space in the suffix", '"10.1234/a b"', '"10.1234/a b"'],
    ["a line break in the suffix", '"10.1234/a\\nb"', '"10.1234/a\\nb"'],
    ["a character that reverses the text after it (U+202E), shown escaped", '"10.1234/a\\u202Eb"', '"10.1234/a\\u202eb"'],
    ["a backslash", '"10.1234/a\\\\b"', '"10.1234/a\\\\b"'],
    ["a double quote", "'10.1234/a\"b'", '"10.1234/a\\"b"'],
    ["a prefix other than 10.", "11.1234/x", '"11.1234/x"'],
  ])("refuses %s, naming the line and the key", (_what, yaml, found) => {
    expect(messageOf(yaml)).toBe(`audit.yaml:3 doi: ${EXPECTED}, found ${found}`);
  });

  it("says how to write a DOI given as a resolver address", () => {
    expect(messageOf("https://doi.org/10.5281/zenodo.1234567")).toBe(
      'audit.yaml:3 doi: must be the DOI alone, without its resolver or "doi:" prefix: write 10.5281/zenodo.1234567, found "https://doi.org/10.5281/zenodo.1234567"',
    );
  });

  it.each([
    ["a registrant with a subdivision", "10.1000.10/123456"],
    ["a suffix with the characters of old SICI DOIs", "10.1002/(SICI)1097-4571(199806)49:8<693::AID-ASI4>3.0.CO;2-0"],
    ["a suffix with non-ASCII letters", "10.1234/ünïcode-数据"],
    ["a suffix with % and #", "10.1234/a%2Fb#c"],
  ])("accepts %s", (_what, doi) => {
    expect(parseAuditDefinition(withDoi(doi)).doi).toBe(doi);
  });
});
