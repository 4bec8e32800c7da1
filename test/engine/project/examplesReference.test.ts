// The LQR variants of the example projects, designed through the pipeline, against the same
// designs rebuilt independently with scipy (test/fixtures/project/generate_examples.py; numpy
// and scipy versions recorded in the fixture).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { evaluateProject, loadProjectText } from "../../../shared-engine/project";
import { expectComplexSetsClose, expectMatrixClose } from "../../helpers/assertions";

interface Case { example: string; variant: string; K: number[][]; Ki?: number[][]; closedLoopPoles: { re: number; im: number }[]; source: string }
const fixture = JSON.parse(readFileSync("test/fixtures/project/examples_lqr.json", "utf8")) as { versions: Record<string, string>; cases: Case[] };

describe("example LQR designs agree with scipy", () => {
  it.each(fixture.cases.map((c) => [`${c.example} / ${c.variant}`, c] as const))("%s", (_title, c) => {
    const loaded = loadProjectText(readFileSync(`assets/examples/${c.example}`, "utf8"));
    const v = evaluateProject(loaded, { variant: c.variant }).variants[0]!;
    expect(v.error).toBeUndefined();
    // Source: c.source (scipy ${fixture.versions.scipy}).
    expectMatrixClose(v.gain!.K, c.K, 1e-8, "K");
    if (c.Ki) expectMatrixClose(v.gain!.Ki!, c.Ki, 1e-8, "Ki");
    expectComplexSetsClose(v.closedLoopPoles!, c.closedLoopPoles, 1e-8, "closed-loop poles");
  });
});
