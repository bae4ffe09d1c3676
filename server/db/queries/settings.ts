import type { Db } from "../database.js";
import { FALLBACK_CURRENCY, type Settings } from "../../../shared/schemas/settings.js";

export async function getSetting(db: Db, key: "currency") {
  return await db.selectFrom("app_setting").select(["value", "set_at", "set_by_name"]).where("key", "=", key).executeTakeFirst();
}

/** Stores a setting and its change as a sentence, in one transaction; nothing is written when the value is unchanged. */
export async function changeSetting(db: Db, key: "currency", value: string, actor: { sub: string; name: string }, sentence: (old: string | null) => string): Promise<boolean> {
  return await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom("app_setting").select("value").where("key", "=", key).forUpdate().executeTakeFirst();
    if (before?.value === value) return false;
    await trx
      .insertInto("app_setting")
      .values({ key, value, set_by_sub: actor.sub, set_by_name: actor.name })
      .onConflict((oc) => oc.column("key").doUpdateSet({ value, set_at: new Date(), set_by_sub: actor.sub, set_by_name: actor.name }))
      .execute();
    await trx
      .insertInto("app_setting_event")
      .values({ key, old_value: before?.value ?? null, new_value: value, actor_sub: actor.sub, actor_name: actor.name, sentence: sentence(before?.value ?? null) })
      .execute();
    return true;
  });
}

export async function listSettingEvents(db: Db, key: "currency") {
  return await db.selectFrom("app_setting_event").select(["at", "actor_name", "sentence"]).where("key", "=", key).orderBy("at", "desc").orderBy("event_id", "desc").limit(50).execute();
}

/** The group's settings as stored, else the fallback currency (currencySet false). */
export async function readSettings(db: Db): Promise<Settings> {
  const c = await getSetting(db, "currency");
  return c
    ? { currency: c.value, currencySet: true, currencySetAt: c.set_at.toISOString(), currencySetBy: c.set_by_name }
    : { currency: FALLBACK_CURRENCY, currencySet: false, currencySetAt: null, currencySetBy: null };
}
