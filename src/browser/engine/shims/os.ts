/**
 * `node:os` for the browser bundle: the few calls on the audit's code path.
 * The engine makes its working folder under tmpdir() in the in-memory volume.
 */
export const EOL = "\n";
export function tmpdir(): string {
  return "/tmp";
}
export function cpus(): { model: string }[] {
  return [{ model: "browser" }];
}
export function hostname(): string {
  return "browser";
}
export function availableParallelism(): number {
  return 1;
}

export default { EOL, tmpdir, cpus, hostname, availableParallelism };
