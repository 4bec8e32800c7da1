/** Public surface of design/: pole placement, Riccati/LQR, observers and Kalman filters, integral action and compensator assembly. */
export { placePoles, type PlacementResult, type PlacementOptions } from "./placePoles";
export { placeObserverPoles, type ObserverPlacementResult } from "./observerByPoles";
export { reducedOrderObserver, type ReducedObserverResult } from "./reducedObserver";
export { parsePoleSpec, normalizePoleSet, formatPole, maxRelativePoleError } from "./poleSpec";
export { solveContinuousRiccati } from "./riccatiContinuous";
export { solveDiscreteRiccati } from "./riccatiDiscrete";
export type { RiccatiSolution, RiccatiOptions } from "./riccati";
export { lqr, lqrWeightSweep, type LqrResult, type LoopMarginReport } from "./lqr";
export { brysonWeights } from "./bryson";
export { kalmanContinuous, kalmanDiscrete, type KalmanFilter, type DiscreteKalmanFilter } from "./kalman";
export { augmentWithIntegrators, designIntegralLqr, designIntegralPoles, checkServoDcGain, type IntegralDesign } from "./integralAction";
export { referenceFeedforward, FEEDFORWARD_WARNING } from "./feedforward";
export { assembleCompensator, type CompensatorSpec, type AssembledCompensator } from "./compensator";
export { integratorUpdate, saturate, type AntiWindupController, type AntiWindupMethod } from "./antiWindup";
export { controllerImplementation, type ControllerImplementation, type ControllerDesign, type ImplementationOptions } from "./implementation";
