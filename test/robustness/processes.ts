/**
 * The command line as a real process that a test can signal: started on the
 * TypeScript entry point in one Node process (no launcher in between, so the
 * signal reaches the process that does the work), with its output collected
 * and a way to wait for a line on stderr.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import path from "node:path";
import { REPO } from "./harness.ts";

export interface RunningCli {
  child: ChildProcess;
  /** Resolves once stderr contains `text`; rejects when the process ends first. */
  waitForStderr(text: string): Promise<void>;
  /** Exit status and output once the process has ended. */
  done: Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>;
}

export function startCli(args: string[], env: Record<string, string> = {}): RunningCli {
  const child = spawn(process.execPath, ["--import", "tsx", path.join(REPO, "src", "cli", "main.ts"), ...args], {
    cwd: REPO,
    env: { ...process.env, NO_COLOR: "1", ...env },
  });
  let stdout = "";
  let stderr = "";
  const waiters: { text: string; resolve: () => void; reject: (e: Error) => void }[] = [];
  child.stdout!.on("data", (d) => (stdout += d));
  child.stderr!.on("data", (d) => {
    stderr += d;
    for (const w of waiters.splice(0)) (stderr.includes(w.text) ? w.resolve : () => waiters.push(w))();
  });
  const done = new Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>((resolve) => {
    child.on("close", (code, signal) => {
      for (const w of waiters.splice(0)) w.reject(new Error(`the process ended before printing ${JSON.stringify(w.text)}; stderr:\n${stderr}`));
      resolve({ code, signal, stdout, stderr });
    });
  });
  const waitForStderr = (text: string) =>
    stderr.includes(text) ? Promise.resolve() : new Promise<void>((resolve, reject) => waiters.push({ text, resolve, reject }));
  return { child, waitForStderr, done };
}

/** The id of a process that has ended (a staging folder it owned is stale). */
export function endedProcessId(): number {
  return spawnSync(process.execPath, ["-e", "0"]).pid;
}
