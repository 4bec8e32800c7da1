/** The engine bridge without a worker: the dispatcher called in-process (tests only). */
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import type { EngineBridge } from "../../../../shared-engine/api/contract";

export const inProcessBridge: EngineBridge = {
  request: (method, params) => dispatch(method, structuredClone(params)) as never,
};
