// Re-exports only: one line per module.
export * from "./normal.ts";
export * from "./rng.ts";
export * from "./weightedMoments.ts";
export * from "./histogram.ts";
export * from "./beta.ts";
export * from "./studentT.ts";
export * from "./holm.ts";
export * from "./tost.ts";
export * from "./monteCarlo.ts";
export * from "./weightedLeastSquares.ts";
export * from "./changePoint.ts";
export * from "./logSumExp.ts";
export * from "./gamma.ts";
export * from "./chiSquare.ts";
export * from "./poissonDeviate.ts";
export * from "./bootstrap.ts";
export * from "./logisticFit.ts";
