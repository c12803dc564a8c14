import { compareResultTexts, type ResultProblem } from "../../archive/resultDifferences.ts";

/*
 * The comparison of the browser's re-run with a frozen result document, apart
 * from the engine: it imports no Node module, so the page can bundle it
 * without the worker's stand-ins (engine.ts re-exports it for the contract).
 */

export interface ResultJsonComparison {
  reproduced: boolean;
  differences: ResultProblem[];
  more: number;
}

/**
 * A frozen result document's text against a re-run's (runAuditFromFiles' `json`): the
 * comparison `verify` makes (src/archive/resultDifferences.ts), every
 * difference named by check and value, at most `maxDifferences` (default 40) listed.
 */
export function compareResultJson(frozenJson: string, freshJson: string, maxDifferences?: number): ResultJsonComparison {
  return compareResultTexts(frozenJson, freshJson, { maxDifferences });
}
