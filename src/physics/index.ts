export * from "./constants.ts";
export * from "./energyUnits.ts";
export * from "./affinities.ts";
export * from "./entropyProduction.ts";
