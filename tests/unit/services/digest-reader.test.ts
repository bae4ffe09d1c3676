import { describe, expect, it } from "vitest";
import { readerOf, sinceFor } from "../../../server/services/digest/digest.js";

// The digest reads as the pages do: roles and shops an administrator stored replace the identity provider's
// claims (the rule of server/auth/effective-user.ts), and a manager's scope is their shops. Common practice
// (OWASP Authorization Cheat Sheet: enforce the same checks on every path to the data), no further source.
describe("readerOf(user, stored)", () => {
  it("takes the provider's roles and shops while no access is stored", () => {
    expect(readerOf({ sub: "a", name: "A", roles: ["manager"], shops: ["S3"] })).toEqual({ sub: "a", name: "A", roles: ["manager"], scope: { kind: "shops", shops: ["S3"] } });
    expect(readerOf({ sub: "b", name: "B", roles: ["analyst"], shops: [] }).scope).toEqual({ kind: "all" });
  });

  it("replaces them with the access an administrator stored, both together", () => {
    const r = readerOf({ sub: "a", name: "A", roles: ["analyst"], shops: [] }, { roles: ["manager"], shops: ["S2"] });
    expect(r).toMatchObject({ roles: ["manager"], scope: { kind: "shops", shops: ["S2"] } });
  });

  it("drops a role name the product does not know", () => {
    expect(readerOf({ sub: "a", name: "A", roles: ["manager", "superuser"], shops: ["S1"] }).roles).toEqual(["manager"]);
  });
});

describe("sinceFor(date, lastSentAt)", () => {
  it("counts from the last digest sent, else from midnight UTC a week before the day", () => {
    expect(sinceFor("2025-07-07", "2025-06-30T06:00:05.000Z").toISOString()).toBe("2025-06-30T06:00:05.000Z");
    expect(sinceFor("2025-07-07", null).toISOString()).toBe("2025-06-30T00:00:00.000Z");
  });
});
