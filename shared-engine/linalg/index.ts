/**
 * Public surface of linalg/. Other folders import only from here. Kernels on row-major
 * Float64Arrays (…InPlace functions, denseKernels, qzKernels) stay internal to this folder.
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
