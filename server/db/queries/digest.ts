import { sql } from "kysely";
import type { Db } from "../database.js";
import type { DigestPreference } from "../../../shared/schemas/digest.js";

/** A user without a stored choice gets the digest on Mondays. */
export const DEFAULT_DIGEST_PREFERENCE: DigestPreference = { enabled: true, weekday: 1 };

export async function digestPreference(db: Db, sub: string): Promise<DigestPreference> {
  const r = await db.selectFrom("digest_preference").select(["enabled", "weekday"]).where("sub", "=", sub).executeTakeFirst();
  return r ? { enabled: r.enabled, weekday: r.weekday } : { ...DEFAULT_DIGEST_PREFERENCE };
}

/** Stores the user's choice; false when the user has no app_user row (never signed in). */
export async function saveDigestPreference(db: Db, sub: string, p: DigestPreference): Promise<boolean> {
  const known = await db.selectFrom("app_user").select("sub").where("sub", "=", sub).executeTakeFirst();
  if (!known) return false;
  await db
    .insertInto("digest_preference")
    .values({ sub, enabled: p.enabled, weekday: p.weekday })
    .onConflict((oc) => oc.column("sub").doUpdateSet({ enabled: p.enabled, weekday: p.weekday, updated_at: sql<Date>`now()` }))
    .execute();
  return true;
}

/** The last digest that went to the user, if any. */
export async function lastDigestSent(db: Db, sub: string) {
  return await db.selectFrom("digest_sent").select(["week", "sent_at"]).where("sub", "=", sub).orderBy("sent_at", "desc").limit(1).executeTakeFirst();
}

/**
 * Users whose digest is due by ISO weekday `isoDay` of ISO week `week`: active, with an e-mail address, the
 * digest on (the default), their chosen weekday this day or earlier in the week (a day the job did not run is
 * caught up by the next run), and none sent yet that week. Their stored access (roles and shops)
 * replaces the identity provider's claims where an administrator set it, as on every request.
 */
export async function digestRecipients(db: Db, isoDay: number, week: string) {
  return await db
    .selectFrom("app_user as u")
    .leftJoin("digest_preference as p", "p.sub", "u.sub")
    .select(["u.sub", "u.name", "u.email", "u.roles", "u.shops", "u.access_roles", "u.access_shops"])
    .select((eb) =>
      eb.selectFrom("digest_sent as l").select(sql<Date>`max(l.sent_at)`.as("at")).whereRef("l.sub", "=", "u.sub").as("last_sent_at"),
    )
    .where("u.deactivated_at", "is", null)
    .where("u.email", "is not", null)
    .where(sql<boolean>`u.email <> ''`)
    .where(sql<boolean>`coalesce(p.enabled, true)`)
    .where(sql<boolean>`coalesce(p.weekday, 1) <= ${isoDay}`)
    .where(({ not, exists, selectFrom }) =>
      not(exists(selectFrom("digest_sent as s").select("s.sub").whereRef("s.sub", "=", "u.sub").where("s.week", "=", week))),
    )
    .orderBy("u.sub")
    .execute();
}
export type DigestRecipient = Awaited<ReturnType<typeof digestRecipients>>[number];

/**
 * Claims the week's digest for the user before it is sent: true when this call took it, false when a run
 * before (or one running beside it) already has. A send that fails gives it back with releaseDigestWeek.
 */
export async function claimDigestWeek(db: Db, sub: string, week: string): Promise<boolean> {
  const r = await db.insertInto("digest_sent").values({ sub, week }).onConflict((oc) => oc.columns(["sub", "week"]).doNothing()).returning("sub").executeTakeFirst();
  return r !== undefined;
}

export async function markDigestSent(db: Db, sub: string, week: string, messageId: string): Promise<void> {
  await db.updateTable("digest_sent").set({ message_id: messageId, sent_at: sql<Date>`now()` }).where("sub", "=", sub).where("week", "=", week).execute();
}

export async function releaseDigestWeek(db: Db, sub: string, week: string): Promise<void> {
  await db.deleteFrom("digest_sent").where("sub", "=", sub).where("week", "=", week).where("message_id", "is", null).execute();
}
