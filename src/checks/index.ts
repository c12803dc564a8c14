import type { RegisteredCheck } from "./types.ts";
import { secondLaw } from "./second-law/secondLaw.ts";
import { secondLawUnits } from "./second-law/units.ts";
import { reciprocity } from "./reciprocity/reciprocity.ts";
import { reciprocityUnits } from "./reciprocity/units.ts";
import { positivity } from "./positivity/positivity.ts";
import { positivityUnits } from "./positivity/units.ts";
import { figuresOfMerit } from "./figures-of-merit/figuresOfMerit.ts";
import { figuresOfMeritUnits } from "./figures-of-merit/units.ts";
import { lorenzRatio } from "./lorenz-ratio/lorenzRatio.ts";
import { lorenzRatioUnits } from "./lorenz-ratio/units.ts";
import { exchangeFluctuation } from "./exchange-fluctuation/exchangeFluctuation.ts";
import { exchangeFluctuationUnits } from "./exchange-fluctuation/units.ts";
import { integralFluctuation } from "./integral-fluctuation/integralFluctuation.ts";
import { integralFluctuationUnits } from "./integral-fluctuation/units.ts";
import { work } from "./work/work.ts";
import { workUnits } from "./work/units.ts";
import { weightedIdentity } from "./weighted-identity/weightedIdentity.ts";
import { weightedIdentityUnits } from "./weighted-identity/units.ts";
import { uncertaintyRelation } from "./uncertainty-relation/uncertaintyRelation.ts";
import { uncertaintyRelationUnits } from "./uncertainty-relation/units.ts";
import { fluctuationDissipation } from "./fluctuation-dissipation/fluctuationDissipation.ts";
import { fluctuationDissipationUnits } from "./fluctuation-dissipation/units.ts";
import { linearGrowth } from "./linear-growth/linearGrowth.ts";
import { linearGrowthUnits } from "./linear-growth/units.ts";
import { steadyStateCounting } from "./steady-state-counting/steadyStateCounting.ts";
import { steadyStateCountingUnits } from "./steady-state-counting/units.ts";
import { tunnellingRates } from "./tunnelling-rates/tunnellingRates.ts";
import { tunnellingRatesUnits } from "./tunnelling-rates/units.ts";

/**
 * Every check the tool knows, in the order the report lists them, each with
 * the units of its values. Adding a check: one folder (its module and its
 * units.ts), one line here.
 */
export const CHECKS: readonly RegisteredCheck[] = [
  { ...reciprocity, units: reciprocityUnits },
  { ...positivity, units: positivityUnits },
  { ...figuresOfMerit, units: figuresOfMeritUnits },
  { ...lorenzRatio, units: lorenzRatioUnits },
  { ...exchangeFluctuation, units: exchangeFluctuationUnits },
  { ...integralFluctuation, units: integralFluctuationUnits },
  { ...secondLaw, units: secondLawUnits },
  { ...work, units: workUnits },
  { ...weightedIdentity, units: weightedIdentityUnits },
  { ...uncertaintyRelation, units: uncertaintyRelationUnits },
  { ...fluctuationDissipation, units: fluctuationDissipationUnits },
  { ...linearGrowth, units: linearGrowthUnits },
  { ...steadyStateCounting, units: steadyStateCountingUnits },
  { ...tunnellingRates, units: tunnellingRatesUnits },
];

export * from "./types.ts";
