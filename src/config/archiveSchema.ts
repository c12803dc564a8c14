import fs from "node:fs";
import path from "node:path";
import { z } from "zod";
import { text } from "./common.ts";
import { webAddress } from "./identifiers.ts";
import { checkYamlSize, parseLocatedYaml } from "./yamlDocument.ts";
import { validateLocated } from "./validate.ts";

/** archive.yaml at the archive root: who publishes the audits and where. */
export const archiveSchema = z
  .object({
    name: text(),
    publisher: text("the name of a group or institution"),
    /** Where the rendered site is served; citations give `<base_url><audit-id>/v<N>/`. */
    base_url: webAddress("https://example.org/audits/")
      .transform((u) => (u.endsWith("/") ? u : `${u}/`))
      .optional(),
    /** Where the archive's files (audits, data, versions) can be cloned, so that anyone can verify. */
    repository: webAddress("https://example.org/lab/audits.git").optional(),
    license: text("an SPDX licence identifier such as CC-BY-4.0").default("CC-BY-4.0"),
    contact: z.string().optional(),
  })
  .strict();

export type ArchiveDefinition = z.output<typeof archiveSchema>;

export const ARCHIVE_FILE = "archive.yaml";

/** Read `<root>/archive.yaml`; an archive without one gets a plain default. */
export function loadArchiveDefinition(root: string): ArchiveDefinition {
  const file = path.join(root, ARCHIVE_FILE);
  if (!fs.existsSync(file)) return { name: "Transport audits", publisher: "unpublished", license: "CC-BY-4.0" };
  checkYamlSize(ARCHIVE_FILE, fs.statSync(file).size);
  return validateLocated(archiveSchema, parseLocatedYaml(ARCHIVE_FILE, fs.readFileSync(file, "utf8")));
}
