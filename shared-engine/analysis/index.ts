/** Public surface of analysis/: read-only questions about a system. Other folders import only from here. */
export { poles } from "./poles";
export { transmissionZeros } from "./zeros";
export { dcGain } from "./dcGain";
export { stability, type StabilityReport } from "./stability";
export { structure, type StructureReport } from "./structure";
export { gramians, hankelSingularValues } from "./gramians";
export { minimalRealization } from "./minimalRealization";
export { modalForm, MODAL_CONDITION_WARNING } from "./modalForm";
export { couplingReport } from "./coupling";
export { controllableCanonicalForm, observableCanonicalForm } from "./canonicalForms";
export { frequencyResponse, type FrequencyResponse, type ResponseChannel } from "./frequencyResponse";
export { frequencyGrid, type FrequencyGridOptions } from "./frequencyGrid";
export { loopMargins, type LoopMargins } from "./margins";
export { type DiskMargin } from "./diskMargin";
export { stepResponse, impulseResponse, initialResponse, simulateLinear, defaultHorizon, type TimeResponse } from "./timeResponse";
export { responseMetrics, type ResponseMetrics, type ResponseMetricsOptions } from "./responseMetrics";
export { rootLocus, gainAtPoint, type RootLocus } from "./rootLocus";
export { parameterLocus, type ParameterLocus } from "./parameterLocus";
