import { Command, Option } from "commander";
import { DOT_PARAMETERS, DOUBLE_DOT_PARAMETERS, FERMION_PARAMETERS, TILTED_PARAMETERS, synthDot, synthDoubleDot, synthFermions, synthTilted, writeAuditFolder } from "../../synth/index.ts";
import type { SynthAudit, SynthParameter } from "../../synth/index.ts";
import { progressBar } from "../progressBar.ts";
import { EXIT } from "../exit.ts";
import { InputError } from "../../errors.ts";

interface ModelEntry {
  description: string;
  parameters: SynthParameter[];
  run(values: Record<string, string | undefined>, workers: number | undefined): Promise<SynthAudit>;
}

const MODELS: Record<string, ModelEntry> = {
  fermions: {
    description: "two finite tight-binding reservoirs of free fermions joined by a contact for a time; exact two-point measurement samples",
    parameters: FERMION_PARAMETERS,
    async run(values, workers) {
      const bar = progressBar("sampling");
      try {
        return await synthFermions(values, { workers, onProgress: (done, total) => bar.update(done, total, "realisations") });
      } finally {
        bar.stop();
      }
    },
  },
  dot: {
    description: "a single-level quantum dot between two leads (sequential tunnelling); Gillespie trajectories and the exact counting distribution",
    parameters: DOT_PARAMETERS,
    run: async (values) => synthDot(values),
  },
  "double-dot": {
    description: "a serial double dot between two leads, counted in both directions by a charge detector; windows of one stationary trajectory with the charge states and the exact counting law",
    parameters: DOUBLE_DOT_PARAMETERS,
    run: async (values) => synthDoubleDot(values),
  },
  tilted: {
    description: "the exactly tilted family of exchange statistics, optionally drawn at other temperatures than declared",
    parameters: TILTED_PARAMETERS,
    run: async (values) => synthTilted(values),
  },
};

/** `--name <unit>` help text with the unit and the default. */
function optionFor(p: SynthParameter): Option {
  const placeholder = p.type === "choice" ? p.choices!.join("|") : p.unit || (p.type === "text" ? "text" : "number");
  const unit = p.unit ? ` [${p.unit}]` : "";
  const def = p.default === "" ? "" : ` (default: ${p.default})`;
  return new Option(`--${p.name} <${placeholder}>`, `${p.description}${unit}${def}`);
}

export function registerSynth(program: Command, setExit: (code: number) => void): void {
  const synth = program
    .command("synth")
    .description("write a simulated dataset with known exact properties as a ready audit folder")
    .exitOverride();
  for (const [name, model] of Object.entries(MODELS)) {
    const cmd = synth
      .command(name)
      .description(model.description)
      .requiredOption("--out <dir>", "folder to write audit.yaml, data/ and data/expected.json into")
      .option("--force", "replace an audit.yaml already in --out")
      .option("--workers <n>", "worker threads for sampling (default: the available cores)")
      .exitOverride();
    for (const p of model.parameters) cmd.addOption(optionFor(p));
    cmd.action(async (opts: Record<string, string | boolean | undefined>) => {
      const values: Record<string, string | undefined> = {};
      for (const p of model.parameters) {
        const key = p.name.replace(/-([a-z])/g, (_, c: string) => c.toUpperCase());
        const v = opts[key];
        if (typeof v === "string") values[p.name] = v;
      }
      const workers = typeof opts.workers === "string" ? Number(opts.workers) : undefined;
      if (workers !== undefined && !(Number.isInteger(workers) && workers >= 0)) {
        throw new InputError(`--workers: expected a whole number ≥ 0, found "${String(opts.workers)}"`);
      }
      const audit = await model.run(values, workers);
      const written = writeAuditFolder(String(opts.out), audit, opts.force === true);
      process.stderr.write(`wrote ${written.length} files to ${String(opts.out)}: ${audit.summary}\n`);
      setExit(EXIT.ok);
    });
  }
}
