/**
 * The `process` global for the browser bundle (injected by esbuild): what the
 * bundled modules read of it. The working folder is the in-memory volume's root.
 */
const started = performance.now();

export const process = {
  env: {} as Record<string, string | undefined>,
  argv: [] as string[],
  platform: "browser",
  version: "",
  versions: {} as Record<string, string>,
  pid: 1,
  exitCode: undefined as number | undefined,
  stdout: { isTTY: false, write: () => true },
  stderr: { isTTY: false, write: () => true },
  cwd: (): string => "/",
  emitWarning: (): void => {},
  nextTick: (fn: (...args: unknown[]) => void, ...args: unknown[]): void => queueMicrotask(() => fn(...args)),
  hrtime: Object.assign((): [number, number] => {
    const ms = performance.now() - started;
    return [Math.floor(ms / 1000), Math.round((ms % 1000) * 1e6)];
  }, { bigint: (): bigint => BigInt(Math.round((performance.now() - started) * 1e6)) }),
  on: (): unknown => process,
  once: (): unknown => process,
  off: (): unknown => process,
};
