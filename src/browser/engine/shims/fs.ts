import { createFsFromVolume, Volume } from "memfs";

/**
 * `node:fs` (and `node:fs/promises`) for the browser bundle: one in-memory
 * volume (memfs, which implements Node's fs calls: descriptors, fstat,
 * positioned reads, realpath, promises). The engine writes the audit's files
 * into it and the ingest reads them back through the very calls it makes on
 * disk, so no reader has a second implementation.
 */
const fs = createFsFromVolume(new Volume());
// The temporary folder (shims/os.ts) the engine makes its working folder in.
fs.mkdirSync("/tmp", { recursive: true });

export default fs;
