/** The `Buffer` global for the browser bundle (injected by esbuild): the buffer package, Node's Buffer API on Uint8Array. */
export { Buffer } from "buffer";
