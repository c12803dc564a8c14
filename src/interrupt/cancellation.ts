/**
 * What a command leaves unfinished when it is stopped by Ctrl-C (SIGINT) or
 * SIGTERM. A command registers the clean-up of everything it writes aside
 * (staging folders, a held lock) while it writes it; on a signal the handler
 * runs those clean-ups, newest first, and ends the process with the shell's
 * status for the signal (128 + its number). Worker threads end with the
 * process, so a build or a large reduction stops as soon as the main thread
 * gets the signal: at once while it waits for workers or for the disk, after
 * the current synchronous step (one audit's checks) otherwise.
 */

/** 128 + the signal number, as a shell reports a process stopped by it. */
export const SIGNAL_EXIT_STATUS = { SIGINT: 130, SIGTERM: 143 } as const;
export type StopSignal = keyof typeof SIGNAL_EXIT_STATUS;

const cleanups: (() => void)[] = [];

/** Run `cleanup` if the process is stopped by a signal before the returned function is called. */
export function onInterrupt(cleanup: () => void): () => void {
  cleanups.push(cleanup);
  return () => {
    const i = cleanups.lastIndexOf(cleanup);
    if (i >= 0) cleanups.splice(i, 1);
  };
}

/** Run every registered clean-up, newest first; one that fails does not keep the others from running. */
export function runInterruptCleanups(): void {
  while (cleanups.length > 0) {
    const cleanup = cleanups.pop()!;
    try {
      cleanup();
    } catch {
      // Best effort: the next run removes what is left (stale staging folders, stale locks).
    }
  }
}

/**
 * Install the handlers for a process that runs one command. A second signal
 * while the clean-up runs ends the process at once.
 */
export function installInterruptHandlers(): void {
  let stopping = false;
  const stop = (signal: StopSignal) => {
    if (stopping) process.exit(SIGNAL_EXIT_STATUS[signal]);
    stopping = true;
    runInterruptCleanups();
    // A progress bar hides the terminal's cursor while it draws (ANSI DECTCEM); give it back.
    if (process.stderr.isTTY) process.stderr.write("\x1b[?25h");
    process.stderr.write(`\nstopped by ${signal}; unfinished output removed\n`);
    process.exit(SIGNAL_EXIT_STATUS[signal]);
  };
  process.on("SIGINT", () => stop("SIGINT"));
  process.on("SIGTERM", () => stop("SIGTERM"));
}
