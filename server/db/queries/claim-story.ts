import type { Db } from "../database.js";
import { writeAudit, type Actor } from "./claims.js";

export async function claimNarrative(db: Db, claimId: string) {
  return await db
    .selectFrom("warranty_claim")
    .select(["narrative_found", "narrative_done", "narrative_why"])
    .where("claim_id", "=", claimId)
    .executeTakeFirstOrThrow();
}

/** Saves the narrative (empty parts as null) and audits which parts changed. Returns the parts that changed. */
export async function saveNarrative(db: Db, claimId: string, n: { found: string; done: string; why: string }, actor: Actor): Promise<string[]> {
  return await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom("warranty_claim").select(["narrative_found", "narrative_done", "narrative_why"]).where("claim_id", "=", claimId).forUpdate().executeTakeFirstOrThrow();
    const next = { narrative_found: n.found || null, narrative_done: n.done || null, narrative_why: n.why || null };
    const names: Record<keyof typeof next, string> = { narrative_found: "what was found", narrative_done: "what was done", narrative_why: "why it is the maker's" };
    const changed = (Object.keys(next) as (keyof typeof next)[]).filter((k) => (before[k] ?? null) !== next[k]).map((k) => names[k]);
    if (!changed.length) return [];
    await trx.updateTable("warranty_claim").set({ ...next, updated_at: new Date() }).where("claim_id", "=", claimId).execute();
    await writeAudit(trx, claimId, actor, "narrative edited", { parts: changed });
    return changed;
  });
}

export async function claimNotes(db: Db, claimId: string) {
  return await db
    .selectFrom("warranty_claim_note")
    .select(["note_id", "at", "author_name", "author_role", "body"])
    .where("claim_id", "=", claimId)
    .orderBy("at")
    .orderBy("note_id")
    .execute();
}

export async function addNote(db: Db, claimId: string, text: string, actor: Actor & { role: string }): Promise<void> {
  await db.transaction().execute(async (trx) => {
    await trx.insertInto("warranty_claim_note").values({ claim_id: claimId, author_sub: actor.sub, author_name: actor.name, author_role: actor.role, body: text }).execute();
    await writeAudit(trx, claimId, actor, "note added", { by: actor.role });
  });
}

/** Removes an attachment's record and audits it; returns its storage key (for the caller to remove the object), or null when there is none. */
export async function removeAttachmentRecord(db: Db, claimId: string, attachmentId: string, actor: Actor): Promise<{ key: string; name: string } | null> {
  if (!/^\d{1,18}$/.test(attachmentId)) return null;
  return await db.transaction().execute(async (trx) => {
    const gone = await trx
      .deleteFrom("warranty_attachment")
      .where("claim_id", "=", claimId)
      .where("attachment_id", "=", attachmentId)
      .returning(["s3_key", "original_name"])
      .executeTakeFirst();
    if (!gone) return null;
    await writeAudit(trx, claimId, actor, "attachment removed", { attachment: gone.original_name });
    await trx.updateTable("warranty_claim").set({ updated_at: new Date() }).where("claim_id", "=", claimId).execute();
    return { key: gone.s3_key, name: gone.original_name };
  });
}
