import type { FileMetaData, RowGroup } from "hyparquet";
import type { RowRange } from "./readRowRange.ts";

/** Whether every requested column chunk of a row group has an offset index (page locations). */
function hasOffsetIndex(group: RowGroup, columns: readonly string[]): boolean {
  return group.columns
    .filter((chunk) => columns.includes(chunk.meta_data?.path_in_schema[0] ?? ""))
    .every((chunk) => Boolean(chunk.offset_index_offset && chunk.offset_index_length));
}

/**
 * Split a file into the row ranges to decode one at a time, so that memory stays
 * bounded by about `batchRows` rows of the requested columns:
 * - consecutive small row groups are read together up to `batchRows` rows;
 * - a row group larger than `batchRows` is read in slices of `batchRows` rows when its
 *   chunks have an offset index (only the overlapping pages are fetched), and whole
 *   otherwise (without page locations every slice would re-read the whole chunk), so
 *   then memory is bounded by that row group instead.
 */
export function planReads(metadata: FileMetaData, columns: readonly string[], batchRows: number): RowRange[] {
  const reads: RowRange[] = [];
  let pending: RowRange | undefined;
  let groupStart = 0;
  for (const group of metadata.row_groups) {
    const rows = Number(group.num_rows);
    const groupEnd = groupStart + rows;
    if (rows > batchRows) {
      if (pending) reads.push(pending);
      pending = undefined;
      if (hasOffsetIndex(group, columns)) {
        for (let s = groupStart; s < groupEnd; s += batchRows) reads.push({ start: s, end: Math.min(groupEnd, s + batchRows) });
      } else reads.push({ start: groupStart, end: groupEnd });
    } else if (rows > 0) {
      if (pending && groupEnd - pending.start <= batchRows) pending.end = groupEnd;
      else {
        if (pending) reads.push(pending);
        pending = { start: groupStart, end: groupEnd };
      }
    }
    groupStart = groupEnd;
  }
  if (pending) reads.push(pending);
  return reads;
}
