export * from "./citationSubject.ts";
export * from "./personName.ts";
export * from "./citationCff.ts";
export * from "./bibtex.ts";
export * from "./plainCitation.ts";
export * from "./latexTable.ts";
export * from "./pointsCsv.ts";
export * from "./badge.ts";
