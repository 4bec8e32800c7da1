/**
 * The plant entry of a VariantResult: dimensions, names, poles, stability, structure
 * (controllability, observability and the modes that fail them) and transmission zeros.
 */
import { EngineError } from "../errors";
import type { StateSpace } from "../model";
import { poles as plantPoles } from "../analysis/poles";
import { transmissionZeros } from "../analysis/zeros";
import { structure } from "../analysis/structure";
import type { VariantResult } from "./result";
import { complexList, isStable } from "./resultJson";

/**
 * The report of the (possibly sampled) plant `model`. Zeros are left undefined when their
 * computation fails with an EngineError: they inform, the design does not need them.
 */
export function plantReport(model: StateSpace): NonNullable<VariantResult["plant"]> {
  const p = plantPoles(model);
  const s = structure(model);
  const report: NonNullable<VariantResult["plant"]> = {
    dimensions: { states: model.A.rows, inputs: model.B.columns, outputs: model.C.rows, disturbances: model.F.columns },
    names: {
      states: [...model.names.states],
      inputs: [...model.names.inputs],
      outputs: [...model.names.outputs],
      disturbances: [...model.names.disturbances],
    },
    sampleTime: model.sampleTime,
    poles: complexList(p),
    stable: isStable(p, model.sampleTime),
    controllable: s.controllable,
    observable: s.observable,
    stabilizable: s.stabilizable,
    detectable: s.detectable,
    uncontrollableModes: complexList(s.uncontrollableModes),
    unobservableModes: complexList(s.unobservableModes),
  };
  try {
    report.zeros = complexList(transmissionZeros(model).finite);
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
    // Zeros are informative here, not required for the design: say why they are missing.
    report.zeros = undefined;
  }
  return report;
}
