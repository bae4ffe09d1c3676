import { sql } from "kysely";
import type { Db } from "../database.js";
import type { SessionUser } from "../../auth/session.js";

/** Records a signed-in user (the identity provider stays the source of truth). */
export async function upsertUser(db: Db, u: SessionUser): Promise<void> {
  await db
    .insertInto("app_user")
    .values({ sub: u.sub, name: u.name, email: u.email, roles: u.roles, shops: u.shops })
    .onConflict((oc) =>
      oc.column("sub").doUpdateSet({ name: u.name, email: u.email, roles: u.roles, shops: u.shops, last_seen: sql`now()` }),
    )
    .execute();
}

export async function listUsers(db: Db) {
  return await db
    .selectFrom("app_user")
    .select(["sub", "name", "email", "roles", "shops", "first_seen", "last_seen"])
    .orderBy("name")
    .execute();
}
