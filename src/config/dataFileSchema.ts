import { z } from "zod";
import { text } from "./common.ts";

/**
 * The keys that say how a dataset's file is laid out, shared by every dataset
 * kind. `format` is any name the source registry knows (src/ingest/sources/index.ts
 * checks it and lists the valid ones), so that adding a format touches no schema.
 */
export const dataFileKeys = {
  format: text("a format name, e.g. comma, tab, semicolon, whitespace, parquet").optional(),
  decimal: z.enum(["point", "comma"], { errorMap: () => ({ message: "must be point or comma" }) }).optional(),
  header: z.boolean({ invalid_type_error: "must be true or false" }).optional(),
  skip_lines: z
    .number({ invalid_type_error: "must be a whole number of lines" })
    .int("must be a whole number of lines")
    .min(0, "must be 0 or more lines")
    .max(1_000_000, "must be at most 1000000 lines")
    .optional(),
  dataset: text("the path of a table inside the file").optional(),
};

/** A column given by its name in the file, or by its 1-based position (files without a header). */
export const columnRef = z.union([
  text("a column name or a 1-based column position"),
  z.number({ invalid_type_error: "must be a column name or a 1-based column position" }).int("must be a whole 1-based column position").min(1, "must be a 1-based column position (1 is the first column)"),
]);

/**
 * Whether a dataset's file may state its energy unit itself (HDF5 `units`
 * attributes), so that `energy_unit` can be left out: by `format: hdf5` or
 * the file's extension, as the source registry detects HDF5.
 */
export function mayStateUnits(d: { file: string; format?: string }): boolean {
  return d.format === "hdf5" || (d.format === undefined && HDF5_FILE_NAME.test(d.file));
}

/** The file names taken for HDF5 without `format:` (src/ingest/sources/hdf5/hdf5Source.ts detects by it too). */
export const HDF5_FILE_NAME = /\.(h5|hdf5|hdf|he5)$/i;
