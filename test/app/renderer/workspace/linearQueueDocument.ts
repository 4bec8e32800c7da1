/**
 * A linear project document for the workspace tests: the earlier, all-linear form of the shipped
 * demo (assets/examples/queue-backlog.loopwright.json, invented scenario), kept here so the
 * tests do not change when the shipped example does. Values are invented example data.
 */
import type { ProjectFile } from "../../../../shared-engine/api/contract";

export const LINEAR_QUEUE_DOCUMENT: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Queue backlog regulator (invented example, linear)",
  plants: [
    {
      id: "queue",
      name: "Backlog and consumer pool (linearised)",
      model: {
        type: "state-space",
        A: [[0, -50], [0, -0.05]],
        B: [[0], [0.05]],
        C: [[1, 0]],
        D: [[0]],
        F: [[1], [0]],
        E: [[0]],
        sampleTime: null,
        names: { states: ["backlog", "consumers"], inputs: ["requested_consumers"], outputs: ["backlog"], disturbances: ["arrival_rate"] },
        units: { states: ["msg", "consumers"], inputs: ["consumers"], outputs: ["msg"], disturbances: ["msg/s"] },
      },
    },
  ],
  variants: [
    {
      id: "lqr-integral-1s",
      name: "LQR with integral action, sampled at 1 s",
      plant: "queue",
      baseline: true,
      discretize: { sampleTime: 1, method: "zoh" },
      stateFeedback: { method: "lqr", Q: [[1e-6, 0], [0, 0.01]], R: [[1]] },
      integralAction: { outputs: ["backlog"], weights: [1e-8], antiWindup: "back-calculation" },
      margins: { at: "plant-input" },
    },
    {
      id: "poles-continuous",
      name: "Pole placement, continuous, reference feedforward",
      plant: "queue",
      stateFeedback: { method: "poles", poles: [{ re: -0.08, im: 0.06 }, { re: -0.08, im: -0.06 }] },
      referenceFeedforward: true,
      bode: { frequencies: [0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2] },
      margins: { at: "plant-input" },
      step: { times: [0, 5, 10, 15, 20, 25, 30, 40, 50, 60, 80, 100, 120, 150] },
    },
    {
      id: "lqr-kalman",
      name: "LQR with a Kalman filter (only the backlog is measured)",
      plant: "queue",
      stateFeedback: { method: "lqr", Q: [[1e-6, 0], [0, 0.01]], R: [[1]] },
      observer: { method: "kalman", processNoise: [[40000]], measurementNoise: [[2500]] },
      margins: { at: "plant-input" },
    },
  ],
  requirements: [{ id: "settle", metric: "settlingTime", max: 200, description: "the backlog settles within 200 s of a set-point change" }],
};
