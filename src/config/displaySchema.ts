import { z } from "zod";
import { nearest } from "./nearest.ts";
import { QUANTITIES, type Quantity } from "../report/format/quantities.ts";
import { displayChoices, parseDisplayChoice } from "../report/format/displayUnit.ts";

/**
 * `display:` in audit.yaml: the unit each quantity is shown in, overriding
 * the automatic choice (`temperature: mK`, `conductance: e2/h`, `energy: µeV`).
 * Presentation only: the result document stays in SI. Unknown quantities and
 * units are refused with the nearest valid spelling.
 */
export const displaySchema = z
  .record(z.string(), z.string({ invalid_type_error: "must be a unit written as text, such as mK or µeV" }))
  .superRefine((m, ctx) => {
    for (const [key, unit] of Object.entries(m)) {
      if (!(QUANTITIES as readonly string[]).includes(key)) {
        const hint = nearest(key, QUANTITIES);
        ctx.addIssue({
          code: "custom",
          path: [key],
          message: `is not a quantity${hint ? ` (did you mean ${hint}?)` : ""}: one of ${QUANTITIES.join(", ")}`,
          params: { quoteFound: false },
        });
        continue;
      }
      const q = key as Quantity;
      if (unit === "auto" || parseDisplayChoice(q, unit)) continue;
      const choices = displayChoices(q);
      const hint = choices.find((c) => c.toLowerCase() === unit.toLowerCase()) ?? nearest(unit, choices);
      ctx.addIssue({ code: "custom", path: [key], message: `cannot show ${q.replace("_", " ")} in ${unit}${hint ? ` (did you mean ${hint}?)` : ""}: one of ${choices.join(", ")}`, params: { quoteFound: false } });
    }
  });

export type DisplayChoices = Partial<Record<Quantity, string>>;
