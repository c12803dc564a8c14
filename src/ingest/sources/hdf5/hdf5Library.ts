import h5wasm, { Module } from "h5wasm/node";

let loaded: Promise<typeof h5wasm> | null = null;

/**
 * The HDF5 library (h5wasm: the HDF Group's C library compiled to WebAssembly, reading
 * the host's files in place through Emscripten's NODERAWFS, so nothing is copied into
 * memory). Loaded once, on first use, with HDF5's errors turned into thrown JavaScript
 * errors instead of diagnostic stacks printed on stderr.
 */
export function hdf5Library(): Promise<typeof h5wasm> {
  loaded ??= h5wasm.ready.then(() => {
    Module.activate_throwing_error_handler();
    return h5wasm;
  });
  return loaded;
}

/**
 * The innermost reason in an HDF5 error stack ("#006: …H5Fsuper.c line 577 in
 * H5F__super_read(): truncated file: eof = 4576, …"), without source paths and line
 * numbers, for a message a person can act on.
 */
export function hdf5Reason(err: unknown): string {
  const text = String((err as Error)?.message ?? err);
  const reasons = [...text.matchAll(/#\d+:.*? in [\w.]+\(\): (.*)/g)].map((m) => m[1].trim());
  return reasons.at(-1) ?? text.split("\n")[0];
}

/** The HDF5 library's reason for refusing to open a file, in plain words where it is a common one. */
export function describeOpenFailure(err: unknown): string {
  const reason = hdf5Reason(err);
  const truncated = /truncated file: eof = (\d+).*stored_eof = (\d+)/.exec(reason);
  if (truncated) return `the file is truncated: it holds ${truncated[1]} bytes where its superblock records ${truncated[2]} (was it copied while still being written?)`;
  if (/file signature not found/.test(reason)) return "it is not an HDF5 file (no HDF5 signature)";
  return `the HDF5 library cannot open it (${reason})`;
}
