import { z } from "zod";
import { roleSchema } from "../roles.js";

export const shopScopeSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("all") }),
  z.object({ kind: z.literal("shops"), shops: z.array(z.string()) }),
]);
export type ShopScope = z.infer<typeof shopScopeSchema>;

export const meSchema = z.object({
  sub: z.string(),
  name: z.string(),
  email: z.string().nullable(),
  roles: z.array(roleSchema),
  scope: shopScopeSchema,
});
export type Me = z.infer<typeof meSchema>;

const dependencyState = z.enum(["ok", "unavailable", "not_configured"]);
/** GET /api/health: the server and each dependency it uses */
export const healthSchema = z.object({ status: z.enum(["ok", "unavailable"]), database: dependencyState, storage: dependencyState, mail: dependencyState });

/** GET /auth/session */
export const sessionStateSchema = z.object({ user: meSchema.nullable() });
