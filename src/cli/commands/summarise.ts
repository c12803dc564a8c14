import type { Command } from "commander";
import { EXIT } from "../exit.ts";
import { readingProgress } from "../progress.ts";

export function registerSummarise(program: Command, setExit: (code: number) => void): void {
  program
    .command("summarise")
    .description("summarise one part of a large samples dataset into its cells (<part>.summary), on the grid its audit.yaml gives, so that an audit can name the summary instead of the part")
    .argument("<part>", "the part: a data file of a samples dataset, in any format the tool reads")
    .option("--out <file>", "where to write the summary (must end in .summary; default: <part>.summary)")
    .option("--audit <dir>", "the audit folder whose audit.yaml gives the grid (default: the nearest folder above the part that holds one)")
    .option("--dataset <id>", "the samples dataset the part belongs to (default: the one whose file: lists it, or the only samples dataset)")
    .action(async (part: string, opts: { out?: string; audit?: string; dataset?: string }) => {
      const { summarisePart } = await import("../../ingest/sources/summary/summarisePart.ts");
      const progress = readingProgress();
      let written;
      try {
        written = await summarisePart({ part, ...opts }, { onBytes: (done, total) => progress.update(part, done, total) });
      } finally {
        progress.stop();
      }
      const { summary, out } = written;
      const cells = summary.tables.reduce((a, t) => a + t.cells, 0);
      process.stdout.write(
        `${out}: ${summary.rows} rows of ${part} (SHA-256 ${summary.source.sha256}) in ${cells} cells over ${summary.tables.length} table(s), for dataset ${summary.dataset}\n`,
      );
      setExit(EXIT.ok);
    });
}
