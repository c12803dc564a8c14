// jstat (npm, MIT) as a general-purpose reference library for the tests. It
// ships no type declarations; the few functions used are typed here.
import { createRequire } from "node:module";

interface JStat {
  ibeta(x: number, a: number, b: number): number;
  betafn(a: number, b: number): number;
  studentt: { cdf(t: number, df: number): number; inv(p: number, df: number): number; pdf(t: number, df: number): number };
  normal: { cdf(x: number, mean: number, sd: number): number; inv(p: number, mean: number, sd: number): number };
}

export const jStat = createRequire(import.meta.url)("jstat") as JStat;
