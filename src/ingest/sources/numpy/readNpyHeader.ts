import { DataError } from "../../../errors.ts";
import type { ByteStream } from "../binary/byteStream.ts";
import { NPY_PREAMBLE_BYTES, npyHeaderBytes, parseNpyHeader, type NpyHeader } from "./npyHeader.ts";

/** Read and parse a .npy header from the start of a stream, leaving the stream at the first data byte. */
export async function readNpyHeader(stream: ByteStream, label: string): Promise<NpyHeader> {
  const start = await stream.read(NPY_PREAMBLE_BYTES);
  if (start.length === 0) throw new DataError(`${label}: the file is empty (0 bytes); expected a NumPy .npy array`);
  const total = npyHeaderBytes(start);
  if (total === null || total <= start.length) return parseNpyHeader(start.subarray(0, total ?? start.length), label);
  const rest = await stream.read(total - start.length);
  const bytes = new Uint8Array(start.length + rest.length);
  bytes.set(start);
  bytes.set(rest, start.length);
  return parseNpyHeader(bytes, label);
}
