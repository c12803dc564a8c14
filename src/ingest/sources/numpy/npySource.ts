import fs from "node:fs";
import { openDataFile } from "../openDataFile.ts";
import { binarySource, optionalColumns } from "../binary/binarySource.ts";
import type { OpenSource, SourceModule, SourceRequest } from "../types.ts";

/** NumPy .npy arrays (numpy.save): a structured array, columns by field name, or a 2-D array, columns by position from 1. */
export const npySource: SourceModule = {
  formats: ["npy"],
  detect: (name) => (/\.npy$/i.test(name) ? "npy" : null),
  open: openNpySource,
};

async function openNpySource(request: SourceRequest): Promise<OpenSource> {
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    const { openNpy } = await import("./readNpy.ts"); // loaded when a .npy file is opened, like every format's reader
    const npy = await openNpy(fd, size, request.label, request.columns.map((w) => w.column), optionalColumns(request));
    const fields = npy.plan.columns.map((c) => c.column);
    return binarySource(request, fd, size, {
      format: npy.description,
      rows: npy.plan.rows,
      available: npy.available,
      present: fields,
      batches: () => npy.batches(),
    });
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}
