import { roleSchema, type Role } from "../../shared/roles.js";
import type { SessionUser } from "./session.js";

function asStringList(v: unknown): string[] {
  if (Array.isArray(v)) return v.filter((x): x is string => typeof x === "string");
  if (typeof v === "string") return v.split(/[\s,]+/).filter(Boolean);
  return [];
}

/** Maps ID-token claims to the session user; roles and shops come from configurable claim names. */
export function userFromClaims(
  claims: Record<string, unknown>,
  rolesClaim: string,
  shopsClaim: string,
): SessionUser {
  const roles = asStringList(claims[rolesClaim]).filter((r): r is Role => roleSchema.safeParse(r).success);
  return {
    sub: String(claims.sub),
    name: typeof claims.name === "string" ? claims.name : String(claims.sub),
    email: typeof claims.email === "string" ? claims.email : null,
    roles,
    shops: asStringList(claims[shopsClaim]).map((s) => s.toUpperCase()),
  };
}
