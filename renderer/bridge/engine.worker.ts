/**
 * Browser mode: the engine in a Web Worker. Wires the transport-agnostic engine server to the
 * worker's message port. The only renderer file allowed to import shared-engine/api/server.
 */
import { createEngineServer } from "../../shared-engine/api/server";

// The renderer compiles with DOM types, where `self` is a Window; in a dedicated worker it is
// the worker scope, which has this shape.
const scope = self as unknown as {
  postMessage(message: unknown): void;
  addEventListener(type: "message", listener: (event: MessageEvent) => void): void;
};

const server = createEngineServer((message) => scope.postMessage(message));
scope.addEventListener("message", (event) => server.receive(event.data));
