import cliProgress from "cli-progress";

/**
 * A progress bar on stderr when it is a terminal; silent otherwise (CI logs, pipes).
 * A module of its own, apart from the reading progress of src/cli/progress.ts, so that
 * `run` does not load cli-progress and the packages it draws with.
 */
export function progressBar(label: string): { update(done: number, total: number, item: string): void; stop(): void } {
  if (!process.stderr.isTTY) return { update() {}, stop() {} };
  const bar = new cliProgress.SingleBar(
    { format: `${label} [{bar}] {value}/{total} {item}`, stream: process.stderr, hideCursor: true, clearOnComplete: true },
    cliProgress.Presets.shades_classic,
  );
  let started = false;
  return {
    update(done, total, item) {
      if (!started) {
        bar.start(total, done, { item });
        started = true;
      } else bar.update(done, { item });
    },
    stop() {
      if (started) bar.stop();
    },
  };
}
