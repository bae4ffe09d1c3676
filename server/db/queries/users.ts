import { sql } from "kysely";
import type { Db } from "../database.js";
import type { SessionUser } from "../../auth/session.js";
import type { StoredAccess } from "../../auth/effective-user.js";
import type { Role } from "../../../shared/roles.js";

/** Records a sign-in: the provider's claims as they are now, and its time (last_seen). */
export async function upsertUser(db: Db, u: SessionUser): Promise<void> {
  await db
    .insertInto("app_user")
    .values({ sub: u.sub, name: u.name, email: u.email, roles: u.roles, shops: u.shops })
    .onConflict((oc) =>
      oc.column("sub").doUpdateSet({ name: u.name, email: u.email, roles: u.roles, shops: u.shops, last_seen: sql`now()` }),
    )
    .execute();
}

const userColumns = [
  "sub", "name", "email", "roles", "shops", "first_seen", "last_seen",
  "access_roles", "access_shops", "access_set_at", "access_set_by", "deactivated_at", "deactivated_by",
] as const;

export async function listUsers(db: Db) {
  return await db.selectFrom("app_user").select(userColumns).orderBy("name").orderBy("sub").execute();
}

export async function findUser(db: Db, sub: string) {
  return await db.selectFrom("app_user").select(userColumns).where("sub", "=", sub).executeTakeFirst();
}
export type UserRow = NonNullable<Awaited<ReturnType<typeof findUser>>>;

/** The access Ironledger stores for a user, read on every request through the access cache. */
export async function storedAccess(db: Db, sub: string): Promise<StoredAccess | null> {
  const r = await db
    .selectFrom("app_user")
    .select(["access_roles", "access_shops", "deactivated_at"])
    .where("sub", "=", sub)
    .executeTakeFirst();
  if (!r) return null;
  return {
    access: r.access_roles && r.access_shops ? { roles: r.access_roles as Role[], shops: r.access_shops } : null,
    deactivated: r.deactivated_at !== null,
  };
}

/** The registered shops, for the shop choices and to check a stored shop exists. */
export async function registeredShops(db: Db) {
  return await db.selectFrom("dim_shop").select(["shop_code as code", "name"]).orderBy("shop_code").execute();
}

export interface Actor {
  sub: string;
  name: string;
}

type Change =
  | { kind: "access"; roles: Role[]; shops: string[] }
  | { kind: "provider" }
  | { kind: "deactivated" }
  | { kind: "reactivated" };

/**
 * Stores one change to a user's access and its sentence in one transaction; a deactivation also deletes the
 * user's stored sessions (returns how many).
 */
export async function changeUserAccess(db: Db, sub: string, change: Change, actor: Actor, sentence: (sessions: number) => string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    let sessions = 0;
    if (change.kind === "access") {
      await trx
        .updateTable("app_user")
        .set({ access_roles: change.roles, access_shops: change.shops, access_set_at: sql<Date>`now()`, access_set_by: actor.name })
        .where("sub", "=", sub)
        .execute();
    } else if (change.kind === "provider") {
      await trx.updateTable("app_user").set({ access_roles: null, access_shops: null, access_set_at: null, access_set_by: null }).where("sub", "=", sub).execute();
    } else if (change.kind === "deactivated") {
      await trx.updateTable("app_user").set({ deactivated_at: sql<Date>`now()`, deactivated_by: actor.name }).where("sub", "=", sub).execute();
      const gone = await sql`DELETE FROM app_session WHERE sess->'user'->>'sub' = ${sub} OR sess->'claims'->>'sub' = ${sub}`.execute(trx);
      sessions = Number(gone.numAffectedRows ?? 0);
    } else {
      await trx.updateTable("app_user").set({ deactivated_at: null, deactivated_by: null }).where("sub", "=", sub).execute();
    }
    await trx
      .insertInto("app_user_event")
      .values({ sub, kind: change.kind, actor_sub: actor.sub, actor_name: actor.name, sentence: sentence(sessions) })
      .execute();
  });
}

export async function listUserEvents(db: Db, sub: string) {
  return await db
    .selectFrom("app_user_event")
    .select(["at", "kind", "actor_name", "sentence"])
    .where("sub", "=", sub)
    .orderBy("at", "desc")
    .orderBy("event_id", "desc")
    .limit(200)
    .execute();
}
