import type { CheckDefinition } from "./types.ts";
import { secondLaw } from "./second-law/secondLaw.ts";
import { reciprocity } from "./reciprocity/reciprocity.ts";
import { positivity } from "./positivity/positivity.ts";
import { figuresOfMerit } from "./figures-of-merit/figuresOfMerit.ts";
import { lorenzRatio } from "./lorenz-ratio/lorenzRatio.ts";
import { exchangeFluctuation } from "./exchange-fluctuation/exchangeFluctuation.ts";
import { integralFluctuation } from "./integral-fluctuation/integralFluctuation.ts";
import { work } from "./work/work.ts";
import { weightedIdentity } from "./weighted-identity/weightedIdentity.ts";
import { uncertaintyRelation } from "./uncertainty-relation/uncertaintyRelation.ts";
import { fluctuationDissipation } from "./fluctuation-dissipation/fluctuationDissipation.ts";
import { linearGrowth } from "./linear-growth/linearGrowth.ts";
import { steadyStateCounting } from "./steady-state-counting/steadyStateCounting.ts";
import { tunnellingRates } from "./tunnelling-rates/tunnellingRates.ts";

/** Every check the tool knows, in the order the report lists them. Adding a check: one module, one line here. */
export const CHECKS: readonly CheckDefinition[] = [
  reciprocity,
  positivity,
  figuresOfMerit,
  lorenzRatio,
  exchangeFluctuation,
  integralFluctuation,
  secondLaw,
  work,
  weightedIdentity,
  uncertaintyRelation,
  fluctuationDissipation,
  linearGrowth,
  steadyStateCounting,
  tunnellingRates,
];

export * from "./types.ts";
