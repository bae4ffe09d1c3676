import { describe, expect, it } from "vitest";
import { Rng, stream } from "../../../etl/demo/prng.js";

const draws = (rng: Rng, n: number): number[] => Array.from({ length: n }, () => rng.nextUint32());

describe("Rng(seed)", () => {
  it("gives the same sequence for the same seed", () => {
    expect(draws(new Rng(42), 1000)).toEqual(draws(new Rng(42), 1000));
  });

  it("gives different sequences for different seeds", () => {
    const a = draws(new Rng(1), 100);
    const b = draws(new Rng(2), 100);
    expect(a.filter((x, i) => x === b[i]).length).toBeLessThan(2);
  });

  it("float() stays in [0, 1) with mean near 1/2", () => {
    const rng = new Rng(7);
    const xs = Array.from({ length: 100_000 }, () => rng.float());
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
    expect(xs.reduce((a, b) => a + b, 0) / xs.length).toBeCloseTo(0.5, 2);
  });

  it("normal() has mean 0 and SD 1", () => {
    const rng = new Rng(11);
    const xs = Array.from({ length: 100_000 }, () => rng.normal());
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (xs.length - 1));
    expect(Math.abs(mean)).toBeLessThan(0.01);
    expect(sd).toBeCloseTo(1, 2);
  });
});

describe("stream(seed, label, index)", () => {
  it("is reproducible and independent across labels and indexes", () => {
    expect(draws(stream(5, "machine", 3), 50)).toEqual(draws(stream(5, "machine", 3), 50));
    expect(draws(stream(5, "machine", 3), 50)).not.toEqual(draws(stream(5, "machine", 4), 50));
    expect(draws(stream(5, "machine", 3), 50)).not.toEqual(draws(stream(5, "weather", 3), 50));
    expect(draws(stream(5, "machine", 3), 50)).not.toEqual(draws(stream(6, "machine", 3), 50));
  });
});
