import { z } from "zod";
import { groupWideRoles, roleSchema, type Role } from "../roles.js";

/**
 * Which claims decide a user's access. Written on the users page and in README.md ("Who decides a user's
 * access"), and applied on every request (server/auth/effective-user.ts).
 */
export const ACCESS_RULE =
  "Once an administrator has saved a user's roles and shops here, those replace the identity provider's roles and shops for that user, from their next request on. Until then, or after “Use the provider's again”, the provider's claims at their last sign-in apply.";

const accessSchema = z.object({ roles: z.array(roleSchema), shops: z.array(z.string()) });

export const adminUserSchema = z.object({
  sub: z.string(),
  name: z.string(),
  email: z.string().nullable(),
  /** the access in force (stored in Ironledger, else the provider's claims) */
  roles: z.array(roleSchema),
  shops: z.array(z.string()),
  source: z.enum(["ironledger", "provider"]),
  /** the identity provider's claims at the last sign-in */
  provider: accessSchema,
  accessSetAt: z.string().nullable(),
  accessSetBy: z.string().nullable(),
  deactivatedAt: z.string().nullable(),
  deactivatedBy: z.string().nullable(),
  firstSeen: z.string(),
  /** the time of the last sign-in */
  lastSeen: z.string(),
});
export type AdminUser = z.infer<typeof adminUserSchema>;
export const adminUserListSchema = z.object({ users: z.array(adminUserSchema), shops: z.array(z.object({ code: z.string(), name: z.string() })) });
export type AdminUserList = z.infer<typeof adminUserListSchema>;

export const userEventSchema = z.object({ at: z.string(), kind: z.enum(["access", "provider", "deactivated", "reactivated"]), actorName: z.string(), sentence: z.string() });
export const userHistorySchema = z.object({ events: z.array(userEventSchema) });
export type UserHistory = z.infer<typeof userHistorySchema>;

const shopCode = z
  .string({ error: "each shop must be a code" })
  .trim()
  .regex(/^[A-Za-z0-9][A-Za-z0-9 _-]{0,15}$/, "a shop code is 1–16 letters, digits, spaces, - or _")
  .transform((c) => c.toUpperCase());

/** PUT /api/admin/users/:sub/access: the roles and shops an administrator stores for a user. */
export const userAccessSchema = z
  .object({
    roles: z.array(roleSchema, { error: "roles must be a list of roles" }).min(1, "choose at least one role"),
    shops: z.array(shopCode, { error: "shops must be a list of shop codes" }).max(100, "at most 100 shops"),
  })
  .superRefine((v, ctx) => {
    if (new Set(v.roles).size !== v.roles.length) ctx.addIssue({ code: "custom", path: ["roles"], message: "a role is chosen twice" });
    if (new Set(v.shops).size !== v.shops.length) ctx.addIssue({ code: "custom", path: ["shops"], message: "a shop is chosen twice" });
    if (v.roles.includes("manager") && !v.roles.some((r) => groupWideRoles.includes(r)) && v.shops.length === 0)
      ctx.addIssue({ code: "custom", path: ["shops"], message: "a shop manager needs at least one shop" });
  });
export type UserAccess = z.infer<typeof userAccessSchema>;

/** Whether a user with these roles sees only the shops they are given (a shop manager), not the whole group. */
export const shopLimited = (roles: readonly Role[]) => !roles.some((r) => groupWideRoles.includes(r));
