import fs from "node:fs/promises";
import fsCallback from "node:fs";
import type { AsyncBuffer } from "hyparquet";

/** An AsyncBuffer over an open file, plus the means to close it. */
export interface FileAsyncBuffer extends AsyncBuffer {
  close(): Promise<void>;
}

/**
 * Open a file as hyparquet's AsyncBuffer: every `slice` is one positioned read
 * (fs read at an offset) into a buffer of exactly that size, so only the byte
 * ranges hyparquet asks for (the footer, then one row group's column chunks)
 * are ever in memory, never the whole file.
 */
export async function openFileAsyncBuffer(filePath: string): Promise<FileAsyncBuffer> {
  const handle = await fs.open(filePath, "r");
  let byteLength: number;
  try {
    byteLength = (await handle.stat()).size;
  } catch (err) {
    await handle.close();
    throw err;
  }
  return handleAsyncBuffer(handle, byteLength);
}

/** The same over a descriptor opened and checked elsewhere (src/ingest/sources/openDataFile.ts); closing it is the opener's. */
export function descriptorAsyncBuffer(fd: number, byteLength: number): FileAsyncBuffer {
  const handle = {
    read: (bytes: Uint8Array, offset: number, length: number, position: number) =>
      new Promise<{ bytesRead: number }>((resolve, reject) => fsCallback.read(fd, bytes, offset, length, position, (err, bytesRead) => (err ? reject(err) : resolve({ bytesRead })))),
    close: async () => {},
  };
  return handleAsyncBuffer(handle, byteLength);
}

interface ReadHandle {
  read(bytes: Uint8Array, offset: number, length: number, position: number): Promise<{ bytesRead: number }>;
  close(): Promise<void>;
}

function handleAsyncBuffer(handle: ReadHandle, byteLength: number): FileAsyncBuffer {
  return {
    byteLength,
    async slice(start: number, end: number = byteLength): Promise<ArrayBuffer> {
      const length = Math.max(0, end - start);
      const out = new ArrayBuffer(length);
      const bytes = new Uint8Array(out);
      let filled = 0;
      // fs read may return fewer bytes than asked; loop until the range is full.
      while (filled < length) {
        const { bytesRead } = await handle.read(bytes, filled, length - filled, start + filled);
        if (bytesRead === 0) throw new Error(`the file ended at byte ${start + filled} while reading bytes ${start}–${end} (was it changed while being read?)`);
        filled += bytesRead;
      }
      return out;
    },
    close: () => handle.close(),
  };
}
