import fs from "node:fs";
import { HDF5_FILE_NAME } from "../../../config/dataFileSchema.ts";
import { openDataFile } from "../openDataFile.ts";
import { binarySource, optionalColumns } from "../binary/binarySource.ts";
import type { OpenSource, SourceModule, SourceRequest } from "../types.ts";

/**
 * HDF5 files: with `dataset:` a compound table (columns by member name) or a 2-D array
 * (columns by position from 1); without it, one 1-D dataset per column, named by path.
 */
export const hdf5Source: SourceModule = {
  formats: ["hdf5"],
  detect: (name) => (HDF5_FILE_NAME.test(name) ? "hdf5" : null),
  open: openHdf5Source,
};

/**
 * The path the HDF5 library opens: on Linux the descriptor already opened and checked
 * (its /proc/self/fd entry names that very file, even if the path was swapped since);
 * elsewhere the path, which openDataFile has just checked.
 */
function pathOfDescriptor(fd: number, filePath: string): string {
  const own = `/proc/self/fd/${fd}`;
  return fs.existsSync(own) ? own : filePath;
}

async function openHdf5Source(request: SourceRequest): Promise<OpenSource> {
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    const columns = request.columns.map((w) => w.column);
    // The HDF5 library (a WebAssembly build, about half a second to load) only when an HDF5 file is opened.
    const { openHdf5 } = await import("./readHdf5.ts");
    const h5 = await openHdf5(pathOfDescriptor(fd, request.filePath), request.label, request.settings.dataset, columns, optionalColumns(request));
    // The `units` attribute each requested column carries (on the table, or on the column's own dataset), and where.
    const where = (column: string) => (request.settings.dataset !== undefined ? `${request.settings.dataset}` : column);
    const units = request.columns.map((w) => {
      const unit = h5.units.get(String(w.column));
      return unit === undefined ? null : { unit, where: where(String(w.column)) };
    });
    return binarySource(request, fd, size, { format: h5.description, rows: h5.rows, available: h5.available, present: h5.present, units, batches: () => h5.batches(), close: () => h5.close() });
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}
