import { describe, expect, it } from "vitest";
import { isInt64 } from "../../../shared/int64.js";

// PostgreSQL documentation, "Numeric Types": bigint holds −9223372036854775808 to +9223372036854775807.
describe("isInt64", () => {
  it("accepts the bigint range to its ends and refuses one past either end", () => {
    expect(isInt64("9223372036854775807")).toBe(true);
    expect(isInt64("-9223372036854775808")).toBe(true);
    expect(isInt64("9223372036854775808")).toBe(false);
    expect(isInt64("-9223372036854775809")).toBe(false);
    expect(isInt64("0")).toBe(true);
  });

  it("refuses what is not a whole number in decimal digits", () => {
    for (const s of ["", "-", "1.5", "1e3", " 12", "12 ", "0x1f", "١٢", "99999999999999999999"]) expect(isInt64(s), s).toBe(false);
  });
});
