import type { CheckResult } from "../../checks/types.ts";
import { displayContextFor } from "../format/displayContext.ts";
import type { DisplayContext } from "../format/displayUnit.ts";
import type { ResultDocument } from "../resultDocument.ts";
import type { CitationSubject } from "./citationSubject.ts";
import { breakableDigest } from "./latexTable.ts";
import { latexName, quantityTex, siunitxNumber } from "./latexText.ts";
import { roundToUncertainty } from "../format/roundToUncertainty.ts";

/*
 * A file of macros for a manuscript: one `\newcommand` per headline figure of
 * an audit version, so that a paper quotes the audit's numbers by name and
 * they cannot drift from it. The user-facing command is one per audit,
 * `\ta<AuditId>{<check>/<dataset>/<figure>}`; an unknown name stops the
 * LaTeX run with a message instead of printing nothing.
 */

const DIGIT_WORDS = ["Zero", "One", "Two", "Three", "Four", "Five", "Six", "Seven", "Eight", "Nine"];

/** The user command for an audit: `vq3-heat-exchange` → `taVqThreeHeatExchange` (letters only, as TeX control words must be). */
export function macroNameOf(auditId: string): string {
  const words = auditId.split(/[^A-Za-z0-9]+/).filter(Boolean);
  const spelled = words.map((w) => w.replace(/\d/g, (d) => DIGIT_WORDS[Number(d)]).replace(/^./, (c) => c.toUpperCase()));
  return `ta${spelled.join("").replace(/[^A-Za-z]/g, "")}`;
}

/** One figure: its name (after the command) and its LaTeX. */
export interface Figure {
  name: string;
  tex: string;
  /** What it is, for the file's comment (plain text). */
  about: string;
}

const num = (v: number, digits = 4) => `\\num{${siunitxNumber(v, digits)}}`;
const interval = (ci: unknown) => (Array.isArray(ci) && ci.length === 2 && ci.every((x) => typeof x === "number") ? `[${num(ci[0])}, ${num(ci[1])}]` : undefined);
const finite = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);

/** `(a ± u)` rounded as the GUM recommends, with a trailing unit TeX. */
function pairTex(v: number, u: number, unit: string): string {
  const r = roundToUncertainty(v, u);
  const e = r.exponent !== 0 ? `e${r.exponent}` : "";
  return `(\\num{${r.negative ? "-" : ""}${r.value}${e}}~$\\pm$~\\num{${r.uncertainty}${e}})${unit}`;
}

/** The headline figures of one check result: its verdict always, and the numbers its law is judged by. */
export function figuresOf(c: CheckResult, ctx: DisplayContext, confidence: number): Figure[] {
  const v = c.values as Record<string, unknown>;
  const key = (f: string) => `${c.check}/${c.dataset}/${f}`;
  const out: Figure[] = [{ name: key("verdict"), tex: latexName(c.status), about: `verdict of ${c.check} on ${c.dataset}` }];
  const level = `${Math.round(confidence * 100)}\\,\\%`;
  const withInterval = (name: string, value: unknown, ci: unknown, about: string) => {
    if (!finite(value)) return;
    out.push({ name: key(name), tex: num(value), about });
    const iv = interval(ci);
    if (iv) {
      out.push({ name: key(`${name}-interval`), tex: iv, about: `${about}, ${Math.round(confidence * 100)} % interval` });
      out.push({ name: key(`${name}-with-interval`), tex: `${num(value)}, ${level} interval ${iv}`, about: `${about} with its interval` });
    }
  };
  if (c.check === "exchange-fluctuation") {
    withInterval("slope", v.slope, v.slope_ci, "slope of ln P(Σ)/P(−Σ) against Σ");
    const eff = v.effective_reservoirs as Record<string, unknown> | undefined;
    const dec = v.declared_reservoirs as Record<string, unknown> | undefined;
    for (const [src, label] of [[eff, "effective"], [dec, "declared"]] as const) {
      if (!src) continue;
      // Names without underscores, so that a user can also print them as text.
      for (const T of ["T_A", "T_B", "T_particles"]) if (finite(src[T])) out.push({ name: key(`${label}-${T.replace("_", "")}`), tex: quantityTex(src[T], "temperature", ctx), about: `${label} ${T}` });
      if (finite(src.delta_mu)) out.push({ name: key(`${label}-delta-mu`), tex: quantityTex(src.delta_mu, "chemical_potential", ctx), about: `${label} μ_A − μ_B` });
    }
  }
  if (c.check === "integral-fluctuation") withInterval("mean", v.mean, v.ci, "⟨e^−Σ⟩");
  if (c.check === "second-law" && finite(v.mean_sigma)) {
    const se = v.standard_error;
    out.push({ name: key("mean-sigma"), tex: finite(se) && se > 0 ? pairTex(v.mean_sigma, se, "\\,$k_\\mathrm{B}$") : `${num(v.mean_sigma)}\\,$k_\\mathrm{B}$`, about: "⟨Σ⟩ ± standard error" });
  }
  return out;
}

/** Every figure of a result: the overall verdict, version facts, then each check's. */
export function figuresOfResult(result: ResultDocument, s: CitationSubject): Figure[] {
  const confidence = result.settings.confidence ?? 0.95;
  return [
    { name: "stamp", tex: latexName(result.stamp), about: "overall verdict" },
    { name: "version", tex: String(s.version), about: "version number" },
    { name: "fingerprint", tex: breakableDigest(result.fingerprint), about: "fingerprint" },
    ...result.checks.flatMap((c) => figuresOf(c, displayContextFor(result, c.dataset), confidence)),
  ];
}

/** The macros file (`checks-macros.tex`) of a version. */
export function checksMacrosTex(result: ResultDocument, s: CitationSubject): string {
  const cmd = macroNameOf(s.auditId);
  const figures = figuresOfResult(result, s);
  // Names go through \csname, so any characters but braces, backslashes and % are fine in them.
  const safeName = (n: string) => n.replace(/[\\{}%#~^$&]/g, "-");
  const internal = (n: string) => `transportaudit@${s.auditId}@${safeName(n)}`;
  return [
    `% Figures of transport audit ${s.auditId}, version ${s.version} (${s.date}), written by ${s.tool.name} ${s.tool.version}.`,
    `% Fingerprint ${s.fingerprint}.`,
    `% In a manuscript: \\usepackage{siunitx}, \\input{checks-macros.tex}, then \\${cmd}{<name>}, for example`,
    `% \\${cmd}{stamp}. The names this file defines:`,
    ...figures.map((f) => `%   ${safeName(f.name)}  (${f.about.replace(/[^\x20-\x7e]/g, (c) => ({ "Σ": "Sigma", "⟨": "<", "⟩": ">", "−": "-", "μ": "mu" })[c] ?? "?")})`),
    "\\makeatletter",
    `\\newcommand{\\${cmd}}[1]{\\@ifundefined{transportaudit@${s.auditId}@#1}{\\PackageError{transport-audit}{No figure '#1' in audit ${s.auditId}}{The names this file defines are listed in its comments.}}{\\@nameuse{transportaudit@${s.auditId}@#1}}}`,
    ...figures.map((f) => `\\expandafter\\newcommand\\csname ${internal(f.name)}\\endcsname{${f.tex}}`),
    "\\makeatother",
    "",
  ].join("\n");
}
