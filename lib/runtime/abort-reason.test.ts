import { describe, expect, it } from "vitest";
import { AsyncLocalStorage } from "node:async_hooks";
import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";
import { releaseAbortReasonStacks } from "./abort-reason";

setFlagsFromString("--expose-gc");
const gc = runInNewContext("gc") as () => void;

/**
 * The chain described in abort-reason.ts, in miniature: a request store (`payload`) reachable only
 * from an Immediate of the same batch as the one in which a controller is aborted, and the abort
 * reason kept. Answers whether the store survives a full garbage collection.
 */
async function storeSurvives(): Promise<boolean> {
  const als = new AsyncLocalStorage<{ payload: number[] }>();
  let keptReason: unknown;
  let storeRef: WeakRef<object> | undefined;
  await new Promise<void>((done) => {
    const controller = new AbortController();
    setImmediate(() => {
      controller.abort();
      keptReason = controller.signal.reason;
    });
    als.run({ payload: new Array(10_000).fill(1) }, () => {
      storeRef = new WeakRef(als.getStore()!);
      setImmediate(() => undefined);
    });
    setImmediate(done);
  });
  // Let the batch finish, then collect twice (weak references clear on the second pass at the latest).
  await new Promise((r) => setTimeout(r, 10));
  gc();
  await new Promise((r) => setTimeout(r, 10));
  gc();
  expect(keptReason).toBeInstanceOf(DOMException);
  return storeRef!.deref() !== undefined;
}

describe("releaseAbortReasonStacks", () => {
  // Runs first, before the patch: shows the retention this module exists for (Node 20). If a
  // later Node stops retaining, this test says so and the patch can go.
  it("without it, a kept abort reason keeps another request's store of the same Immediate batch alive", async () => {
    expect(await storeSurvives()).toBe(true);
  });

  it("with it, that store is collected, and abort behaves as before", async () => {
    releaseAbortReasonStacks();
    releaseAbortReasonStacks(); // idempotent
    expect(await storeSurvives()).toBe(false);
    const c = new AbortController();
    let heard = 0;
    c.signal.addEventListener("abort", () => heard++);
    c.abort();
    expect(c.signal.aborted).toBe(true);
    expect((c.signal.reason as DOMException).name).toBe("AbortError");
    const mine = new Error("mine");
    const d = new AbortController();
    d.abort(mine);
    expect(d.signal.reason).toBe(mine);
    expect(heard).toBe(1);
  });
});
