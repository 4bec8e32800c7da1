/** Fresh, isolated IndexedDB per test: a new fake-indexeddb factory, so no state leaks. */
import { IDBFactory, IDBKeyRange } from "fake-indexeddb";
import { createDatabase, type LoopwrightDatabase } from "../../../renderer/db";

export function freshFactory(): IDBFactory {
  return new IDBFactory();
}

export function openTestDatabase(factory: IDBFactory = freshFactory()): LoopwrightDatabase {
  return createDatabase({ name: "loopwright-test", indexedDB: factory, IDBKeyRange });
}

/** A clock that advances 1 s per call from a fixed start, so dates are predictable. */
export function steppingClock(start = 1_750_000_000_000): () => number {
  let t = start;
  return () => (t += 1000);
}
