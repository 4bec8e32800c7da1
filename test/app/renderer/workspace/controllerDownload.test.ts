// The Design tab's "Download C source": the bridge request returns exactly the generator's text
// for the variant, and the browser download (a Blob URL behind a temporary link) carries it.
import { readFileSync } from "node:fs";
import { resolveObjectURL } from "node:buffer";
import { describe, expect, it } from "vitest";
import type { EngineBridge, PlantSpec, ProjectFile } from "../../../../shared-engine/api/contract";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import { EngineError } from "../../../../shared-engine/errors";
import { controllerExport } from "../../../../shared-engine/project/controllerExport";
import { controllerSource } from "../../../../shared-engine/project/controllerSource";
import { downloadText } from "../../../../renderer/io";
import { exportControllerSource } from "../../../../renderer/state/workspace";

const rack = JSON.parse(readFileSync("assets/examples/rack-temperature.loopwright.json", "utf8")) as ProjectFile;
const plantOf = (id: string): PlantSpec => rack.plants.find((p) => p.id === rack.variants.find((v) => v.id === id)!.plant)!;
const variantOf = (id: string) => rack.variants.find((v) => v.id === id)!;

/** The real engine in-process, as the worker runs it. */
const bridge: EngineBridge = {
  request: (method, params) => dispatch(method, params).catch((e: unknown) => { throw e instanceof EngineError ? e : new EngineError("internal", String(e)); }) as never,
};

describe("controller C download", () => {
  it("saves the generator's text for the variant under lw_<id>.c", async () => {
    const saved: { text: string; fileName: string; mimeType: string }[] = [];
    const status = await exportControllerSource(bridge, plantOf("observer-sampled"), variantOf("observer-sampled"), (text, fileName, mimeType) => saved.push({ text, fileName, mimeType }));
    expect(status).toEqual({ state: "done", fileName: "lw_observer_sampled.c", checksPassed: true });
    const expected = controllerSource(controllerExport(plantOf("observer-sampled"), variantOf("observer-sampled"))).text;
    expect(saved).toEqual([{ text: expected, fileName: "lw_observer_sampled.c", mimeType: "text/x-csrc" }]);
  });

  it("reports the engine's reason and saves nothing when the variant cannot be exported", async () => {
    const saved: string[] = [];
    const status = await exportControllerSource(bridge, plantOf("lqr-integral"), variantOf("lqr-integral"), (text) => saved.push(text));
    expect(status.state).toBe("failed");
    expect(status.state === "failed" && status.message).toMatch(/needs an observer: the plant measures 1 of 2 states/);
    expect(saved).toEqual([]);
  });

  it("offers the text through a Blob URL on a temporary link that is clicked and removed", async () => {
    const clicked: { href: string; download: string }[] = [];
    const children: unknown[] = [];
    const anchor = { href: "", download: "", rel: "", style: { display: "" }, click() { clicked.push({ href: this.href, download: this.download }); }, remove() { children.splice(children.indexOf(this), 1); } };
    const doc = { createElement: () => anchor, body: { appendChild: (a: unknown) => children.push(a) } } as unknown as Document;
    downloadText("int x;\n", "lw_a.c", "text/x-csrc", doc);
    expect(clicked.length).toBe(1);
    expect(clicked[0]!.download).toBe("lw_a.c");
    const blob = resolveObjectURL(clicked[0]!.href)!;
    expect(blob.type).toBe("text/x-csrc");
    expect(await blob.text()).toBe("int x;\n");
    expect(children).toEqual([]);
  });
});
