export * from "./contract";
export { createMessageClient, type MessageClient } from "./client";
export { createEngineServer, type EngineServer } from "./server";
export { dispatch, type RequestContext } from "./dispatcher";
export { REQUEST_LIMITS } from "./params";
