import { describe, expect, it } from "vitest";
import { KeySeenFilter, whKey, whKeyWithSpare } from "../../../etl/load/keys.js";

// The loader skips the exact duplicate check when this filter says no key came twice, so a "no" must
// never be wrong; a wrong "maybe" only costs time.
describe("KeySeenFilter", () => {
  it("answers maybe for every key added before, and no for a first sighting in most cases", () => {
    const f = new KeySeenFilter();
    const keys = Array.from({ length: 50_000 }, (_, i) => whKeyWithSpare(`repair_line|S1|R-${i}|1`));
    let falseMaybe = 0;
    for (const [, a, b] of keys) if (f.add(a, b)) falseMaybe++;
    for (const [, a, b] of keys) expect(f.add(a, b)).toBe(true);
    // five probes in 2^27 bits: a false maybe among 50,000 new keys is very unlikely
    expect(falseMaybe).toBeLessThanOrEqual(1);
  });

  it("takes its numbers from the same md5 as the key, so the key itself is unchanged", () => {
    const [key] = whKeyWithSpare("repair_line|S5|R-102|1");
    expect(key).toBe(whKey("repair_line|S5|R-102|1"));
  });
});
