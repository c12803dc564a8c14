import fs from "./fs.ts";

/** `node:fs/promises` for the browser bundle: the promise API of the same in-memory volume (./fs.ts). */
export default fs.promises;
