import { z } from "zod";
import { roleSchema } from "../roles.js";

export const adminUserSchema = z.object({
  sub: z.string(),
  name: z.string(),
  email: z.string().nullable(),
  roles: z.array(roleSchema),
  shops: z.array(z.string()),
  firstSeen: z.string(),
  lastSeen: z.string(),
});
export const adminUserListSchema = z.object({ users: z.array(adminUserSchema) });
export type AdminUserList = z.infer<typeof adminUserListSchema>;
