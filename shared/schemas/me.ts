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

export const healthSchema = z.object({ status: z.enum(["ok", "unavailable"]) });

/** GET /auth/session */
export const sessionStateSchema = z.object({ user: meSchema.nullable() });
