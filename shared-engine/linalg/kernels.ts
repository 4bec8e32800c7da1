/**
 * The row-major kernels other engine layers may use (design/ builds Riccati and placement
 * solvers on them): Float64Array in and out, no Matrix objects, no copies beyond what each
 * documents. Callers must honour each routine's preconditions; the Matrix-level API in
 * index.ts validates its inputs, these do not (except where stated).
 */
export { balanceInPlace } from "./balance";
export { rowMajorOf, matrixOfRowMajor, multiply, transpose, oneNormRowMajor, solveInPlace } from "./denseKernels";
export { realSchurRowMajor, defaultSchurIterationLimit, eigenvaluesOfQuasiTriangular, francisQRInPlace } from "./schur";
export { reorderSchurInPlace } from "./reorderSchur";
export { reflectColumns, reflectRows } from "./reflectors";
