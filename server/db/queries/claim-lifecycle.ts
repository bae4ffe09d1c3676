import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ClaimStatusColumn } from "../warehouse-schema.js";
import { writeAudit, type Actor } from "./claims.js";
import { isInt64 } from "../../../shared/int64.js";

/** The lines of a claim the clerk included deliberately, with the reason, who and when. */
export async function claimInclusions(db: Db, claimId: string) {
  return await db
    .selectFrom("warranty_claim_line")
    .select(["repair_line_key", "include_reason", "included_by", "included_at"])
    .where("claim_id", "=", claimId)
    .where("include_reason", "is not", null)
    .execute();
}

/** Whether the claim holds this repair line. */
export async function claimHoldsLine(db: Db, claimId: string, lineKey: string): Promise<boolean> {
  if (!isInt64(lineKey)) return false;
  const row = await db.selectFrom("warranty_claim_line").select("repair_line_key").where("claim_id", "=", claimId).where("repair_line_key", "=", lineKey).executeTakeFirst();
  return Boolean(row);
}

/**
 * Includes a line (reason given) or leaves it out again (reason null), stores the draft's new amount claimed and
 * writes the audit row, only while the claim is still a draft. False when it is no longer one.
 */
export async function setLineInclusion(
  db: Db,
  claimId: string,
  lineKey: string,
  reason: string | null,
  amountClaimed: number | null,
  actor: Actor,
  audit: Record<string, unknown>,
): Promise<boolean> {
  return await db.transaction().execute(async (trx) => {
    const now = new Date();
    const moved = await trx
      .updateTable("warranty_claim")
      .set({ amount_claimed: amountClaimed, updated_at: now })
      .where("claim_id", "=", claimId)
      .where("status", "=", "draft")
      .executeTakeFirst();
    if (Number(moved.numUpdatedRows) !== 1) return false;
    await trx
      .updateTable("warranty_claim_line")
      .set(reason === null ? { include_reason: null, included_by: null, included_at: null } : { include_reason: reason, included_by: actor.name, included_at: now })
      .where("claim_id", "=", claimId)
      .where("repair_line_key", "=", lineKey)
      .execute();
    await writeAudit(trx, claimId, actor, reason === null ? "line left out" : "line included", audit);
    return true;
  });
}

export interface MoveFields {
  amount_claimed?: number | null;
  amount_paid?: number | null;
  amount_credited?: number | null;
  reason?: string | null;
  written_off_reason?: string | null;
  filed_via?: "mail" | "other";
  filed_reference?: string | null;
  filed_on?: string;
  days_late?: number;
}

/** Moves a claim from the status it was checked in (no lost update), with its fields and audit row. */
export async function moveClaim(db: Db, claimId: string, from: ClaimStatusColumn, to: ClaimStatusColumn, fields: MoveFields, actor: Actor, audit: Record<string, unknown>): Promise<boolean> {
  return await db.transaction().execute(async (trx) => {
    const now = new Date();
    const res = await trx
      .updateTable("warranty_claim")
      .set({
        ...fields,
        status: to,
        updated_at: now,
        ...(to === "submitted" ? { submitted_at: now } : {}),
        ...(to === "accepted" || to === "partly_accepted" || to === "rejected" ? { decided_at: now } : {}),
        ...(to === "credited" ? { credited_at: now } : {}),
      })
      .where("claim_id", "=", claimId)
      .where("status", "=", from)
      .executeTakeFirst();
    if (Number(res.numUpdatedRows) !== 1) return false;
    await writeAudit(trx, claimId, actor, "status", { status: { from, to }, ...audit });
    return true;
  });
}

/** The id of the version that corrected each of these claims, where one did. */
export async function successorsOf(db: Db, claimIds: readonly string[]): Promise<Map<string, string>> {
  if (claimIds.length === 0) return new Map();
  const rows = await db
    .selectFrom("warranty_claim")
    .select(["claim_id", "previous_claim_id"])
    .where("previous_claim_id", "in", [...claimIds])
    .execute();
  return new Map(rows.map((r) => [String(r.previous_claim_id), String(r.claim_id)]));
}

/** Every version of the claim this one belongs to (back to the first, on to the latest), oldest first. */
export async function claimVersions(db: Db, claimId: string) {
  const res = await sql<{ claim_id: string; revision: number; status: string; amount_claimed: string | null; reason: string | null; correction: string | null; created_at: Date }>`
    WITH RECURSIVE back AS (
      SELECT claim_id, previous_claim_id FROM warranty_claim WHERE claim_id = ${claimId}
      UNION ALL
      SELECT w.claim_id, w.previous_claim_id FROM warranty_claim w JOIN back b ON w.claim_id = b.previous_claim_id
    ), root AS (SELECT claim_id FROM back WHERE previous_claim_id IS NULL),
    fwd AS (
      SELECT claim_id FROM root
      UNION ALL
      SELECT w.claim_id FROM warranty_claim w JOIN fwd f ON w.previous_claim_id = f.claim_id
    )
    SELECT c.claim_id::text, c.revision, c.status, c.amount_claimed::text, c.reason, c.correction, c.created_at
    FROM warranty_claim c JOIN fwd USING (claim_id) ORDER BY c.revision`.execute(db);
  return res.rows;
}

/** The day the rejection of a claim was recorded (its decision time, as a UTC date). */
export async function rejectedOn(db: Db, claimId: string): Promise<string | null> {
  const row = await db.selectFrom("warranty_claim").select("decided_at").where("claim_id", "=", claimId).executeTakeFirst();
  return row?.decided_at ? new Date(row.decided_at).toISOString().slice(0, 10) : null;
}

/**
 * Makes the next version of a rejected claim: the same number, kind, lines and deliberate inclusions, in draft,
 * pointing back to it; both claims' audit trails say so. Null when it has a next version already.
 */
export async function insertVersion(
  db: Db,
  previousId: string,
  v: { correction: string; resubmitFrom: string; deadline: string; amountClaimed: number | null },
  actor: Actor,
): Promise<string | null> {
  return await db.transaction().execute(async (trx) => {
    const prev = await trx.selectFrom("warranty_claim").selectAll().where("claim_id", "=", previousId).forUpdate().executeTakeFirstOrThrow();
    const taken = await trx.selectFrom("warranty_claim").select("claim_id").where("previous_claim_id", "=", previousId).executeTakeFirst();
    if (taken) return null;
    const revision = prev.revision + 1;
    const { claim_id } = await trx
      .insertInto("warranty_claim")
      .values({
        claim_number: prev.claim_number,
        kind: prev.kind,
        title: prev.title,
        shop_code: prev.shop_code,
        engine_family: prev.engine_family,
        closed_date: prev.closed_date,
        claim_days: prev.claim_days,
        deadline: v.deadline,
        amount_claimed: v.amountClaimed,
        note: prev.note,
        cluster_id: prev.cluster_id,
        cluster_snapshot: prev.cluster_snapshot === null ? null : JSON.stringify(prev.cluster_snapshot),
        temperature_unit: prev.temperature_unit,
        created_by: actor.sub,
        created_by_name: actor.name,
        revision,
        previous_claim_id: previousId,
        correction: v.correction,
        resubmit_from: v.resubmitFrom,
      })
      .returning("claim_id")
      .executeTakeFirstOrThrow();
    await sql`
      INSERT INTO warranty_claim_line (claim_id, repair_line_key, shop_code, include_reason, included_by, included_at)
      SELECT ${claim_id}, repair_line_key, shop_code, include_reason, included_by, included_at FROM warranty_claim_line WHERE claim_id = ${previousId}`.execute(trx);
    const lines = await trx.selectFrom("warranty_claim_line").select((eb) => eb.fn.countAll<string>().as("n")).where("claim_id", "=", claim_id).executeTakeFirstOrThrow();
    await writeAudit(trx, String(claim_id), actor, "created", {
      claimNumber: prev.claim_number,
      kind: prev.kind,
      status: "draft",
      revision,
      previousClaimId: previousId,
      lines: Number(lines.n),
      deadline: v.deadline,
      correction: v.correction,
    });
    await writeAudit(trx, previousId, actor, "resubmitted", { revision, claimId: String(claim_id), correction: v.correction });
    await trx.updateTable("warranty_claim").set({ updated_at: new Date() }).where("claim_id", "=", previousId).execute();
    return String(claim_id);
  });
}
