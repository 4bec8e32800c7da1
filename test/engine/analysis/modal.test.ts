import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { stateSpaceFromMatrices } from "../../../shared-engine/model";
import { modalForm } from "../../../shared-engine/analysis/modalForm";
import { couplingReport } from "../../../shared-engine/analysis/coupling";
import { eigenvalues } from "../../../shared-engine/linalg";
import { expectAtMost, expectMatrixClose, expectRelativeClose, quarterIntegerMatrix } from "../../helpers/assertions";
import { expectEngineError } from "../model/modelTestUtils";

describe("modalForm", () => {
  it("turns a lightly coupled oscillator into one real 2×2 block [[σ, ω], [−ω, σ]]", () => {
    // hand-worked: s² + 2s + 5 = 0 → −1 ± 2i
    const model = stateSpaceFromMatrices({ A: [[0, 1], [-5, -2]], B: [[0], [1]], C: [[1, 0]] });
    const r = modalForm(model);
    expectMatrixClose(r.model.A, [[-1, 2], [-2, -1]], 1e-15);
    expect(r.blocks).toEqual([{ start: 0, size: 2, eigenvalue: r.blocks[0]!.eigenvalue }]);
    expectMatrixClose(model.A.mmul(r.T), r.T.mmul(r.model.A), 1e-14, "A T = T Λ");
    expect(r.model.names.states).toEqual(["mode1.re", "mode1.im"]);
    expect(r.warning).toBeNull();
    // B and C transform consistently: C T (T⁻¹ B) = C B
    expectMatrixClose(r.model.C.mmul(r.model.B), model.C.mmul(model.B), 1e-14);
  });

  it("orders modes slowest first", () => {
    const r = modalForm(stateSpaceFromMatrices({ A: [[-5, 0, 0], [0, -1, 0], [0, 0, -3]], B: [[1], [1], [1]], C: [[1, 1, 1]] }));
    expect(r.blocks.map((b) => b.eigenvalue.re)).toEqual([-1, -3, -5]);
  });

  it("refuses a defective A and warns for a nearly defective one", () => {
    expectEngineError(() => modalForm(stateSpaceFromMatrices({ A: [[1, 1], [0, 1]], B: [[0], [1]], C: [[1, 0]] })), "singular", /defective/);
    // eigenvalues 1 ± 1e−7: eigenvectors (1, ±1e−7) nearly parallel, κ(T) ≈ 1e7
    const near = modalForm(stateSpaceFromMatrices({ A: [[1, 1], [1e-14, 1]], B: [[0], [1]], C: [[1, 0]] }));
    expect(near.condition).toBeGreaterThan(1e6);
    expect(near.warning).toMatch(/ill-conditioned.*nearly defective/);
  });

  it("reproduces A: T⁻¹AT is block diagonal up to a small residual on random matrices", () => {
    const prop = fc.property(fc.integer({ min: 1, max: 6 }), fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 36, maxLength: 36 }), (n, raw) => {
      const A = new Matrix(quarterIntegerMatrix(raw.slice(0, n * n), n, n));
      const lambdas = eigenvalues(A);
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) fc.pre(Math.hypot(lambdas[i]!.re - lambdas[j]!.re, lambdas[i]!.im - lambdas[j]!.im) > 1e-3);
      const r = modalForm(stateSpaceFromMatrices({ A, B: new Matrix(Matrix.ones(n, 1)), C: new Matrix(Matrix.ones(1, n)) }));
      const L = r.model.A;
      // block structure: zero outside the blocks, pairs as [[σ, ω], [−ω, σ]] with ω > 0
      const inBlock = new Array<number>(n);
      r.blocks.forEach((b, k) => { for (let i = 0; i < b.size; i++) inBlock[b.start + i] = k; });
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (inBlock[i] !== inBlock[j]) expect(L.get(i, j)).toBe(0);
      for (const b of r.blocks) if (b.size === 2) {
        expect(L.get(b.start, b.start + 1)).toBeGreaterThan(0);
        expect(L.get(b.start + 1, b.start)).toBe(-L.get(b.start, b.start + 1));
      }
      // defining identity A·T = T·Λ, measured independently of the routine's own residual
      const err = A.mmul(r.T).sub(r.T.mmul(L)).norm("frobenius");
      expectAtMost(err, 1e-12 * Math.max(1, A.norm("frobenius")) * r.T.norm("frobenius") * n, "‖A T − T Λ‖_F");
      expectAtMost(r.residual, 1e-12 * r.condition, "reported residual");
    });
    fc.assert(prop, { seed: 5150, numRuns: 100 });
  });
});

describe("couplingReport", () => {
  it("gives equal participation of both states in each mode of a symmetric coupled pair", () => {
    // hand-worked: A = [[−2, 1], [1, −2]], eigenvectors (1, ±1)/√2: p = [1/2, 1/2] in both modes;
    // ‖A − diag A‖_F / ‖A‖_F = √2/√10.
    const r = couplingReport(stateSpaceFromMatrices({ A: [[-2, 1], [1, -2]], B: [[1], [0]], C: [[1, 0]], names: { states: ["left", "right"] } }));
    expect(r.states).toEqual(["left", "right"]);
    for (const mode of r.modes) {
      mode.participation.forEach((p) => expectRelativeClose(p, 0.5, 1e-14, "participation"));
      expect(mode.dominantStates.sort()).toEqual(["left", "right"]);
    }
    expectRelativeClose(r.offDiagonalRatio, Math.sqrt(2 / 10), 1e-15, "off-diagonal ratio");
  });

  it("gives identity participation for a triangular A and equal shares for a companion oscillator", () => {
    // hand-worked: for triangular A, v_ki·w_ik = δ_ki.
    const tri = couplingReport(stateSpaceFromMatrices({ A: [[-1, 1], [0, -2]], B: [[1], [1]], C: [[1, 1]] }));
    const byMode = new Map(tri.modes.map((m) => [m.eigenvalue.re, m.participation]));
    expectMatrixClose([byMode.get(-1)!, byMode.get(-2)!], [[1, 0], [0, 1]], 1e-14, "participation");
    expect(tri.modes.find((m) => m.eigenvalue.re === -2)!.dominantStates).toEqual(["x2"]);
    // hand-worked: A = [[0, 1], [−5, −2]], λ = −1 + 2i, v = (1, λ), w ∝ (λ + 2, 1): |λ + 2| = |λ| = √5 → [1/2, 1/2]
    const osc = couplingReport(stateSpaceFromMatrices({ A: [[0, 1], [-5, -2]], B: [[0], [1]], C: [[1, 0]] }));
    expect(osc.modes).toHaveLength(1);
    osc.modes[0]!.participation.forEach((p) => expectRelativeClose(p, 0.5, 1e-14, "oscillator participation"));
    expect(osc.warning).toBeNull();
  });

  it("reports zero off-diagonal coupling for a diagonal A", () => {
    const r = couplingReport(stateSpaceFromMatrices({ A: [[-1, 0, 0], [0, -2, 0], [0, 0, -3]], B: [[1], [1], [1]], C: [[1, 1, 1]] }));
    expect(r.offDiagonalRatio).toBe(0);
    r.modes.forEach((m) => expect(Math.max(...m.participation)).toBe(1));
  });
});
