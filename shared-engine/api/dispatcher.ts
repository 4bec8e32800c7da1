/**
 * The engine dispatcher: one function from (method, params) to a result, run by the Electron
 * main process' worker thread, by the browser-mode Web Worker, and by tests. It validates the
 * method name and every parameter before computing, and throws only EngineError.
 */
import { EngineError } from "../errors";
import { eigenvalues } from "../linalg";
import { ENGINE_VERSION } from "../version";
import { controllerSource, evaluateProject, evaluateVariant, loadProjectText, loadProjectValue, previewVariant } from "../project";
import { controllerExport } from "../project/controllerExport";
import { ENGINE_METHODS, type EngineMethod, type EngineMethods, isEngineMethod } from "./contract";
import { requireMatrixParam, requireObjectParams } from "./params";
import { requireFiniteResult, withPositiveZeros, type RequestContext } from "./handlerSupport";
import { modelHandlers } from "./handlers/modelHandlers";
import { analysisHandlers } from "./handlers/analysisHandlers";
import { designHandlers } from "./handlers/designHandlers";
import { servoDesignHandlers } from "./handlers/servoDesignHandlers";
import { locusHandlers } from "./handlers/locusHandlers";
import { nonlinearHandlers } from "./handlers/nonlinearHandlers";
import { simulationHandlers } from "./handlers/simulationHandlers";

export type { RequestContext } from "./handlerSupport";

type Handler<M extends EngineMethod> = (
  params: unknown,
  context: RequestContext,
) => EngineMethods[M]["result"] | Promise<EngineMethods[M]["result"]>;

const handlers: { [M in EngineMethod]: Handler<M> } = {
  "engine.info": (params) => {
    requireObjectParams(params, "engine.info");
    return { name: "loopwright-engine", version: ENGINE_VERSION, methods: [...ENGINE_METHODS] };
  },
  "linalg.eigenvalues": (params) => {
    const p = requireObjectParams(params, "linalg.eigenvalues");
    const matrix = requireMatrixParam(p, "matrix", { square: true });
    return { eigenvalues: eigenvalues(matrix) };
  },
  "project.load": (params) => {
    const p = requireObjectParams(params, "project.load");
    if (typeof p.text !== "string") throw new EngineError("invalid-argument", "project.load: text must be the project file's text", { field: "text" });
    const loaded = loadProjectText(p.text);
    return { project: loaded.project, warnings: loaded.warnings, fromVersion: loaded.fromVersion };
  },
  "project.evaluateVariant": (params) => {
    const p = requireObjectParams(params, "project.evaluateVariant");
    // Validate plant and variant exactly as a project file would be, so errors carry JSON paths.
    const loaded = loadProjectValue({
      format: "loopwright-project",
      version: 1,
      name: "request",
      plants: [p.plant],
      variants: [p.variant],
      ...(p.requirements !== undefined ? { requirements: p.requirements } : {}),
    });
    const { project } = loaded;
    return evaluateVariant(project.plants[0]!, project.variants[0]!, { requirements: project.requirements });
  },
  "project.previewVariant": (params) => {
    const p = requireObjectParams(params, "project.previewVariant");
    // Same validation as project.evaluateVariant, so a preview never accepts what a full run refuses.
    const { project } = loadProjectValue({ format: "loopwright-project", version: 1, name: "request", plants: [p.plant], variants: [p.variant] });
    return previewVariant(project.plants[0]!, project.variants[0]!);
  },
  "project.evaluate": (params) => {
    const p = requireObjectParams(params, "project.evaluate");
    if (p.variant !== undefined && typeof p.variant !== "string") throw new EngineError("invalid-argument", "project.evaluate: variant must be a variant id", { field: "variant" });
    return evaluateProject(loadProjectValue(p.project), { variant: p.variant as string | undefined });
  },
  "project.controllerSource": (params) => {
    const p = requireObjectParams(params, "project.controllerSource");
    const T = p.sampleTime;
    if (T !== undefined && !(typeof T === "number" && Number.isFinite(T) && T > 0)) {
      throw new EngineError("invalid-argument", `project.controllerSource: sampleTime must be a positive number of seconds (it is ${String(T)})`, { field: "sampleTime" });
    }
    // Same validation as project.evaluateVariant, so errors carry JSON paths.
    const { project } = loadProjectValue({ format: "loopwright-project", version: 1, name: "request", plants: [p.plant], variants: [p.variant] });
    const exported = controllerExport(project.plants[0]!, project.variants[0]!, T === undefined ? {} : { sampleTime: T as number });
    const source = controllerSource(exported);
    return { text: source.text, fileName: `${source.prefix}.c`, checksPassed: exported.checks.every((c) => c.passed), warnings: exported.warnings };
  },
  ...modelHandlers,
  ...analysisHandlers,
  ...designHandlers,
  ...servoDesignHandlers,
  ...locusHandlers,
  ...nonlinearHandlers,
  ...simulationHandlers,
};

/** Methods whose results are checked for NaN/Infinity before they cross the bridge. */
const FINITE_CHECKED: ReadonlySet<string> = new Set([
  ...Object.keys(modelHandlers),
  ...Object.keys(analysisHandlers),
  ...Object.keys(designHandlers),
  ...Object.keys(servoDesignHandlers),
  ...Object.keys(locusHandlers),
  ...Object.keys(nonlinearHandlers),
  ...Object.keys(simulationHandlers),
]);

export const NO_CONTEXT: RequestContext = { isCancelled: () => false, reportProgress: () => undefined };

export async function dispatch(method: unknown, params: unknown, context: RequestContext = NO_CONTEXT): Promise<unknown> {
  if (!isEngineMethod(method)) {
    throw new EngineError("unknown-method", `Unknown engine request ${JSON.stringify(method)}; known: ${ENGINE_METHODS.join(", ")}`, {
      method: typeof method === "string" ? method : String(method),
    });
  }
  const handler = handlers[method] as Handler<EngineMethod>;
  const result = await handler(params, context);
  return FINITE_CHECKED.has(method) ? withPositiveZeros(requireFiniteResult(result, method)) : result;
}
