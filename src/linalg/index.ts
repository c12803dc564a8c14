// Re-exports only.
export * from "./matrix.ts";
export * from "./symmetricPart.ts";
export * from "./antisymmetricPart.ts";
export * from "./diagonallyNormalised.ts";
export * from "./symmetricEigenvalues.ts";
export * from "./lu.ts";
export * from "./determinant.ts";
export * from "./solve.ts";
