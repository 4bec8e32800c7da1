/**
 * Entry of the engine worker thread (bundled to dist/main/engineWorker.js). Wires the engine
 * server (shared-engine/api) to the thread's parent port; the host (engineHost.ts) holds the
 * other end. Everything the engine computes runs here, off the main process' event loop.
 */
import { parentPort } from "node:worker_threads";
import { createEngineServer } from "../shared-engine/api";

const port = parentPort;
if (!port) throw new Error("main/engineWorker.ts must run as a worker thread (parentPort is null)");
const server = createEngineServer((message) => port.postMessage(message));
port.on("message", (message: unknown) => server.receive(message));
