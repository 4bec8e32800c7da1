import { describe, expect, it } from "vitest";
import { evaluatePolynomial, multiplyPolynomials, polynomialFromRoots, trimLeadingZeros } from "../../../shared-engine/model";
import { expectEngineError } from "./modelTestUtils";

describe("polynomial helpers", () => {
  it("expands roots into real coefficients: (s+1)(s²+2s+5) = s³+3s²+7s+5 (hand expansion)", () => {
    expect(polynomialFromRoots([{ re: -1, im: 2 }, { re: -1, im: 0 }, { re: -1, im: -2 }])).toEqual([1, 3, 7, 5]);
    expect(polynomialFromRoots([])).toEqual([1]);
  });
  it("rejects roots without conjugate partners", () => {
    expectEngineError(() => polynomialFromRoots([{ re: 0, im: 1 }]), "invalid-argument", /conjugate pairs \(1 with positive and 0 with negative/);
  });
  it("multiplies, trims and evaluates: (s−1)(s+1) at s = j is −2 (hand computation)", () => {
    const p = multiplyPolynomials([1, -1], [1, 1]);
    expect(p).toEqual([1, 0, -1]);
    expect(evaluatePolynomial(p, { re: 0, im: 1 })).toEqual({ re: -2, im: 0 });
    expect(trimLeadingZeros([0, 0, 3, 0])).toEqual([3, 0]);
    expect(trimLeadingZeros([0, 0])).toEqual([0]);
  });
});
