// Elementary functions that give the same bits in every JavaScript engine.
export { exp } from "./exp.ts";
export { log } from "./log.ts";
