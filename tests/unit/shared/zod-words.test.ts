import { describe, expect, it } from "vitest";
import { z } from "zod";
import { installZodWords, issueInWords } from "../../../shared/zod-words.js";

installZodWords();
const first = (schema: z.ZodType, value: unknown) => {
  const r = schema.safeParse(value);
  if (r.success) throw new Error("expected a failure");
  return issueInWords(r.error.issues[0].path, r.error.issues[0].message, { q: "The search" });
};

// zod's default messages ("Too big: expected string to have <=100 characters") replaced by words; the phrasing is ours.
describe("zod messages in words", () => {
  it("says how long a text may be, and what is missing, after the field's name", () => {
    expect(first(z.object({ q: z.string().max(100) }), { q: "x".repeat(101) })).toBe("The search is at most 100 characters long");
    expect(first(z.object({ q: z.string() }), {})).toBe("The search is missing");
    expect(first(z.object({ page: z.number().int().min(1) }), { page: 0 })).toBe("page is at least 1");
    expect(first(z.object({ n: z.number() }), { n: "seven" })).toBe("n should be a number");
    expect(first(z.object({ dir: z.enum(["asc", "desc"]) }), { dir: "up" })).toBe("dir should be one of: asc, desc");
    expect(first(z.object({ day: z.iso.date() }), { day: "31/01/2025" })).toBe("day should be a date like 2025-01-31");
  });

  it("keeps a message a schema gives, after the field's name", () => {
    expect(first(z.object({ q: z.string().max(3, { error: "use three letters at most" }) }), { q: "abcd" })).toBe("The search: use three letters at most");
  });
});
