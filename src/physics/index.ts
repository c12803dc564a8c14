export * from "./constants.ts";
export * from "./energyUnits.ts";
export * from "./affinities.ts";
export * from "./entropyProduction.ts";
export * from "./thermoelectric.ts";
export * from "./units.ts";
