/**
 * Progress of reading large files on stderr when it is a terminal: bytes read,
 * rate and time left, one line per file, redrawn at most ten times a second.
 */
export function readingProgress(): { update(file: string, done: number, total: number): void; stop(): void } {
  if (!process.stderr.isTTY) return { update() {}, stop() {} };
  const MB = 1024 * 1024;
  let current = "";
  let started = 0;
  let last = 0;
  let drawn = false;
  const clear = () => {
    if (drawn) process.stderr.write("\r\x1b[2K");
    drawn = false;
  };
  return {
    update(file, done, total) {
      const now = performance.now();
      if (file !== current) {
        clear();
        current = file;
        started = now;
      }
      if (now - last < 100 && done < total) return;
      last = now;
      const seconds = (now - started) / 1000;
      const rate = seconds > 0 ? done / seconds : 0;
      const left = rate > 0 ? (total - done) / rate : Number.NaN;
      const line = `reading ${file}: ${(done / MB).toFixed(0)}/${(total / MB).toFixed(0)} MB, ${(rate / MB).toFixed(0)} MB/s, ${Number.isFinite(left) ? `${left.toFixed(0)} s left` : "…"}`;
      process.stderr.write(`\r\x1b[2K${line.slice(0, (process.stderr.columns ?? 100) - 1)}`);
      drawn = true;
    },
    stop: clear,
  };
}
