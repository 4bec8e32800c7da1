/** Public surface of the nonlinear layer. Other folders import only from here. */
export * from "./expression";
export { parseExpression } from "./parser";
export { compileExpression, type CompiledExpression } from "./evaluate";
export * from "./plant";
export * from "./operatingPoint";
export * from "./linearize";
export * from "./dormandPrince";
export * from "./simulateClosedLoop";
export * from "./robustnessSweep";
