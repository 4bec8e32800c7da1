/**
 * The Design tab's controller export: asks the engine for one variant's controller as C99
 * source (`project.controllerSource`, the text `loopwright controller --format c` writes) and
 * offers it as a download: a Blob URL behind a temporary link, which works in browser mode and in
 * the Electron renderer alike (Electron's session asks where to save).
 */
import type { EngineBridge, PlantSpec, VariantSpec } from "../../../shared-engine/api/contract";
import { EngineError } from "../../../shared-engine/errors";

export type ControllerDownloadStatus =
  | { state: "idle" }
  | { state: "working" }
  | { state: "done"; fileName: string; checksPassed: boolean }
  | { state: "failed"; message: string };

/** Saves `text` under `fileName` (renderer/io's downloadText, or a fake in tests). */
export type SaveText = (text: string, fileName: string, mimeType: string) => void;

/** Requests the C source of `variant` on `plant` and saves it; never throws (failures become a status with the engine's message). */
export async function exportControllerSource(bridge: EngineBridge, plant: PlantSpec, variant: VariantSpec, save: SaveText): Promise<ControllerDownloadStatus> {
  try {
    const result = await bridge.request("project.controllerSource", { plant, variant });
    save(result.text, result.fileName, "text/x-csrc");
    return { state: "done", fileName: result.fileName, checksPassed: result.checksPassed };
  } catch (error) {
    return { state: "failed", message: error instanceof EngineError ? error.message : String(error) };
  }
}
