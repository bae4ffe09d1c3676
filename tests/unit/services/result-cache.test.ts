import { describe, expect, it } from "vitest";
import { ResultCache } from "../../../server/services/result-cache.js";

describe("ResultCache", () => {
  it("computes once per key and data version, and shares a computation in flight", async () => {
    const cache = new ResultCache<number>(10);
    let calls = 0;
    const compute = async () => {
      calls++;
      await new Promise((r) => setTimeout(r, 5));
      return 42;
    };
    const [a, b] = await Promise.all([cache.get("k", "v1", compute), cache.get("k", "v1", compute)]);
    expect([a, b, calls]).toEqual([42, 42, 1]);
    await cache.get("k", "v1", compute);
    expect(calls).toBe(1);
    await cache.get("k", "v2", compute);
    expect(calls).toBe(2);
  });

  it("forgets a computation that failed, so the next call tries again", async () => {
    const cache = new ResultCache<string>(10);
    await expect(cache.get("k", "v", () => Promise.reject(new Error("database gone")))).rejects.toThrow("database gone");
    await expect(cache.get("k", "v", async () => "back")).resolves.toBe("back");
  });

  it("drops the least recently used entry beyond its size", async () => {
    const cache = new ResultCache<string>(2);
    let calls = 0;
    const compute = (v: string) => async () => {
      calls++;
      return v;
    };
    await cache.get("a", "v", compute("a"));
    await cache.get("b", "v", compute("b"));
    await cache.get("a", "v", compute("a")); // a is now the most recent
    await cache.get("c", "v", compute("c")); // evicts b
    expect(calls).toBe(3);
    await cache.get("a", "v", compute("a"));
    expect(calls).toBe(3);
    await cache.get("b", "v", compute("b"));
    expect(calls).toBe(4);
  });
});
