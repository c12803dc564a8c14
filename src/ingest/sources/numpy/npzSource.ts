import fs from "node:fs";
import { openDataFile } from "../openDataFile.ts";
import { binarySource, optionalColumns } from "../binary/binarySource.ts";
import type { OpenSource, SourceModule, SourceRequest } from "../types.ts";

/** NumPy .npz files (numpy.savez, numpy.savez_compressed): one 1-D array per column, named as it was saved. */
export const npzSource: SourceModule = {
  formats: ["npz"],
  detect: (name) => (/\.npz$/i.test(name) ? "npz" : null),
  open: openNpzSource,
};

async function openNpzSource(request: SourceRequest): Promise<OpenSource> {
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    const { openNpz } = await import("./readNpz.ts"); // with fflate for the compressed members, only when a .npz file is opened
    const npz = await openNpz(fd, size, request.label, request.columns.map((w) => String(w.column)), optionalColumns(request));
    return binarySource(request, fd, size, { format: npz.description, rows: npz.rows, available: npz.available, present: npz.present, batches: () => npz.batches() });
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}
