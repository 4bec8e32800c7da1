/**
 * A small valid project document for database, import and comparison tests: an invented
 * mass-spring-damper (x = [position, velocity], m = 1, k = 2, c = 0.5) with two designs.
 */
import type { ProjectFile } from "../../../shared-engine/api/contract";

export function sampleProject(name = "Spring table"): ProjectFile {
  const times = Array.from({ length: 201 }, (_, k) => k * 0.05);
  const frequencies = Array.from({ length: 61 }, (_, k) => 10 ** (-2 + k * 0.075));
  return {
    format: "loopwright-project",
    version: 1,
    name,
    plants: [
      {
        id: "table",
        name: "Spring table",
        model: {
          type: "state-space",
          A: [[0, 1], [-2, -0.5]],
          B: [[0], [1]],
          C: [[1, 0]],
          D: [[0]],
          F: [[0], [1]],
          sampleTime: null,
          names: { states: ["position", "velocity"], inputs: ["force"], outputs: ["position"], disturbances: ["push"] },
        },
      },
    ],
    variants: [
      {
        id: "lqr-soft",
        name: "LQR soft",
        plant: "table",
        baseline: true,
        stateFeedback: { method: "lqr", Q: [[10, 0], [0, 1]], R: [[1]] },
        referenceFeedforward: true,
        bode: { frequencies },
        margins: { at: "plant-input" },
        step: { times },
      },
      {
        id: "poles-fast",
        name: "Poles fast",
        plant: "table",
        stateFeedback: { method: "poles", poles: [{ re: -2, im: 1.5 }, { re: -2, im: -1.5 }] },
        referenceFeedforward: true,
        bode: { frequencies },
        margins: { at: "plant-input" },
        step: { times },
      },
    ],
    requirements: [
      { id: "os", metric: "overshootPct", max: 5, description: "overshoot at most 5 %" },
      { id: "ts", metric: "settlingTime", max: 4 },
      { id: "pm", metric: "phaseMarginDeg", min: 45 },
    ],
  };
}
