/**
 * Public surface of linalg/. Other folders import from here, or — for the row-major
 * Float64Array kernels that solvers in other layers build on — from kernels.ts. Everything
 * else (qzKernels, the remaining …InPlace helpers) stays internal to this folder.
 */
export * from "./complex";
export * from "./validate";
export { balance, type Balanced } from "./balance";
export { hessenberg } from "./hessenberg";
export { realSchur, type RealSchurForm } from "./schur";
export { reorderSchur, selectLeftHalfPlane, selectInsideUnitCircle } from "./reorderSchur";
export { eigenvalues, eigenvectors } from "./eigen";
export * from "./qz";
export * from "./expm";
export * from "./sylvester";
export * from "./lyapunov";
export * from "./rank";
