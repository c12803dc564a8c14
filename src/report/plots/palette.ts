/**
 * Okabe & Ito's colour-blind-safe palette ("Color Universal Design", 2008),
 * paired with distinct marker shapes and dash patterns so that series stay
 * distinguishable in grey-scale print.
 */
export const PALETTE = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000"];
export const MARKERS = ["circle", "square", "triangle", "diamond", "cross"] as const;
export const DASHES: Record<string, string> = { solid: "", dashed: "6 4", dotted: "2 3" };
