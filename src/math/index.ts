// Elementary functions that give the same bits in every JavaScript engine
// (test/browser/arithmeticParity.test.ts holds Node and Chromium to it).
export { exp } from "./exp.ts";
export { log } from "./log.ts";
export { cbrt } from "./cbrt.ts";
export { sinPi } from "./sinPi.ts";
export { integerPower } from "./integerPower.ts";
