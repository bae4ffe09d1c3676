import { describe, expect, it } from "vitest";
import { RevalidatingCache } from "../../../server/services/revalidating-cache.js";

/** A computation the test finishes by hand. */
function deferred<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => ((resolve = res), (reject = rej)));
  return { promise, resolve, reject };
}
const settle = () => new Promise((r) => setImmediate(r));

describe("RevalidatingCache", () => {
  it("waits for the first answer, then answers from it while the data version holds", async () => {
    let version = "1@a";
    let calls = 0;
    const c = new RevalidatingCache<string>(async () => version);
    const first = await c.get("k", async () => `v${++calls}`);
    expect(first).toMatchObject({ value: "v1", version: "1@a", current: true });
    expect(await c.get("k", async () => `v${++calls}`)).toMatchObject({ value: "v1", current: true });
    expect(calls).toBe(1);
  });

  it("after a change answers the previous value at once, marked not current, and computes the new one once", async () => {
    let version = "1@a";
    const c = new RevalidatingCache<string>(async () => version);
    await c.get("k", async () => "old");
    version = "2@b";
    const next = deferred<string>();
    let calls = 0;
    const compute = () => (calls++, next.promise);
    const a = await c.get("k", compute);
    const b = await c.get("k", compute);
    expect(a).toMatchObject({ value: "old", version: "1@a", current: false });
    expect(b).toMatchObject({ value: "old", current: false });
    expect(calls).toBe(1);
    next.resolve("new");
    await settle();
    expect(await c.get("k", compute)).toMatchObject({ value: "new", version: "2@b", current: true });
    expect(calls).toBe(1);
  });

  it("a caller asking for a fresh answer waits for the new computation, sharing it with the others", async () => {
    let version = "1@a";
    const c = new RevalidatingCache<string>(async () => version);
    await c.get("k", async () => "old");
    version = "2@b";
    const next = deferred<string>();
    let calls = 0;
    const compute = () => (calls++, next.promise);
    const stale = await c.get("k", compute);
    const fresh = c.get("k", compute, { fresh: true });
    expect(stale.current).toBe(false);
    next.resolve("new");
    expect(await fresh).toMatchObject({ value: "new", version: "2@b", current: true });
    expect(calls).toBe(1);
  });

  it("never labels an answer with a version newer than the one read before its computation", async () => {
    // the data changes while the computation runs: the answer keeps the version read before it started,
    // so the next caller (who reads the newer version) gets it as not current and a new computation starts
    let version = "1@a";
    const c = new RevalidatingCache<string>(async () => version);
    const run = deferred<string>();
    const p = c.get("k", () => run.promise);
    await settle();
    version = "2@b";
    run.resolve("computed during the change");
    expect(await p).toMatchObject({ version: "1@a", current: true });
    const again = deferred<string>();
    expect(await c.get("k", () => again.promise)).toMatchObject({ value: "computed during the change", version: "1@a", current: false });
  });

  it("an answer for older data never replaces one for newer data", async () => {
    let version = "1@a";
    const c = new RevalidatingCache<string>(async () => version);
    const older = deferred<string>();
    const p1 = c.get("k", () => older.promise); // reads 1@a
    await settle();
    version = "2@b";
    const p2 = c.get("k", async () => "newer"); // reads 2@b, finishes first
    expect(await p2).toMatchObject({ value: "newer", version: "2@b" });
    older.resolve("older");
    await p1;
    await settle();
    expect(c.peek("k")).toMatchObject({ value: "newer", version: "2@b" });
    expect(await c.get("k", async () => "x")).toMatchObject({ value: "newer", current: true });
  });

  it("a failed background computation keeps the previous answer and is tried again on the next call", async () => {
    let version = "1@a";
    const errors: unknown[] = [];
    const c = new RevalidatingCache<string>(async () => version, 10, (e) => errors.push(e));
    await c.get("k", async () => "old");
    version = "2@b";
    expect(await c.get("k", async () => Promise.reject(new Error("boom")))).toMatchObject({ value: "old", current: false });
    await settle();
    expect(errors).toHaveLength(1);
    expect(await c.get("k", async () => "new", { fresh: true })).toMatchObject({ value: "new", current: true });
  });

  it("a failed first computation reaches the caller and nothing is kept", async () => {
    const c = new RevalidatingCache<string>(async () => "1@a");
    await expect(c.get("k", async () => Promise.reject(new Error("boom")))).rejects.toThrow("boom");
    expect(c.peek("k")).toBeUndefined();
    expect(await c.get("k", async () => "ok")).toMatchObject({ value: "ok", current: true });
  });

  it("keeps keys apart", async () => {
    const c = new RevalidatingCache<string>(async () => "1@a");
    await c.get("a", async () => "A");
    expect(await c.get("b", async () => "B")).toMatchObject({ value: "B", current: true });
    expect((await c.get("a", async () => "X")).value).toBe("A");
  });
});
