import { sql, type Transaction } from "kysely";
import type { Db } from "../database.js";
import type { Database } from "../schema.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { scopedShopCodes } from "./scope.js";
import type { ClaimKindColumn, ClaimStatusColumn, SendStatusColumn } from "../warehouse-schema.js";

type Tx = Db | Transaction<Database>;

/** A repair line with its machine, component and shop, as the warranty evidence needs it. */
export interface RepairLineRow {
  repair_line_key: string;
  machine_key: string;
  shop_code: string;
  ro_number: string;
  line_no: number;
  opened_date: string;
  closed_date: string | null;
  hour_meter: string | null;
  complaint: string | null;
  cause: string | null;
  correction: string | null;
  labor_op: string | null;
  standard_hours: string | null;
  labor_hours: string | null;
  parts_cost: string | null;
  labor_cost: string | null;
  pay_type: string;
  part_number: string | null;
  part_description: string | null;
  part_qty: string | null;
  supplier_lot: string | null;
  component_code: string;
  component_name: string;
  system: string;
  assembly: string;
  serial: string;
  model_code: string;
  model_line: string;
  engine_family: string;
  engine_serial: string | null;
  build_date: string | null;
  delivery_date: string | null;
  heater_plug_lot: string | null;
  warranty_base_months: number | null;
  warranty_base_hours: number | null;
  warranty_engine_months: number | null;
  warranty_engine_hours: number | null;
}

export interface MeasurementRow {
  repair_line_key: string;
  kind: string;
  position: number;
  attempt: number;
  value: string | null;
  unit: string;
  over_range: boolean;
  raw_value: string;
  raw_unit: string | null;
}

export interface FaultCodeRow {
  repair_line_key: string;
  spn: number;
  fmi: number;
  meaning: string | null;
  occurrences: number;
}

/** Repair lines by key, restricted to the caller's shops (the shop where the repair order was written). */
export async function repairLinesByKeys(db: Db, scope: ShopScope, keys: readonly string[]) {
  if (keys.length === 0) return { lines: [] as RepairLineRow[], measurements: [] as MeasurementRow[], faults: [] as FaultCodeRow[] };
  const shops = scopedShopCodes(scope);
  let q = db
    .selectFrom("fact_repair_line as fl")
    .innerJoin("dim_shop as s", "s.shop_key", "fl.shop_key")
    .innerJoin("dim_machine as m", "m.machine_key", "fl.machine_key")
    .innerJoin("dim_component as c", "c.component_key", "fl.component_key")
    .select([
      "fl.repair_line_key", "fl.machine_key", "s.shop_code", "fl.ro_number", "fl.line_no", "fl.opened_date", "fl.closed_date", "fl.hour_meter",
      "fl.complaint", "fl.cause", "fl.correction", "fl.labor_op", "fl.standard_hours", "fl.labor_hours", "fl.parts_cost",
      "fl.labor_cost", "fl.pay_type", "fl.part_number", "fl.part_description", "fl.part_qty", "fl.supplier_lot",
      "c.component_code", "c.name as component_name", "c.system", "c.assembly",
      "m.serial", "m.model_code", "m.model_line", "m.engine_family", "m.engine_serial", "m.build_date", "m.delivery_date",
      "m.heater_plug_lot", "m.warranty_base_months", "m.warranty_base_hours", "m.warranty_engine_months", "m.warranty_engine_hours",
    ])
    .where("fl.repair_line_key", "in", [...keys]);
  if (shops) q = shops.length ? q.where("s.shop_code", "in", shops) : q.where(sql<boolean>`FALSE`);
  const lines = (await q.orderBy("fl.opened_date").orderBy("fl.repair_line_key").execute()) as RepairLineRow[];
  const found = lines.map((l) => l.repair_line_key);
  if (found.length === 0) return { lines, measurements: [], faults: [] };
  const measurements = (await db
    .selectFrom("fact_measurement")
    .select(["repair_line_key", "kind", "position", "attempt", "value", "unit", "over_range", "raw_value", "raw_unit"])
    .where("repair_line_key", "in", found)
    .orderBy("kind").orderBy("position").orderBy("attempt")
    .execute()) as MeasurementRow[];
  const faults = (await db
    .selectFrom("fact_fault_code as f")
    .leftJoin("dim_fmi as d", "d.fmi", "f.fmi")
    .select(["f.repair_line_key", "f.spn", "f.fmi", "d.meaning", "f.occurrences"])
    .where("f.repair_line_key", "in", found)
    .orderBy("f.spn")
    .execute()) as FaultCodeRow[];
  return { lines, measurements, faults };
}

export interface HourReadingRow {
  reading_date: string;
  hours: string;
  source: string;
  valid: boolean;
  invalid_reason: string | null;
  meter_generation: number;
  repair_line_key: string | null;
}

/** The machine's hour-meter readings around a failure: the last `before` up to 60 days after it opened. */
export async function hourTrail(db: Db, machineKey: string, openedDate: string, before = 12): Promise<HourReadingRow[]> {
  const rows = await db
    .selectFrom("fact_hour_reading")
    .select(["reading_date", "hours", "source", "valid", "invalid_reason", "meter_generation", "repair_line_key"])
    .where("machine_key", "=", machineKey)
    .where("reading_date", "<=", sql<string>`(${openedDate}::date + 60)`)
    .orderBy("reading_date", "desc")
    .orderBy("hour_reading_key", "desc")
    .limit(before)
    .execute();
  return (rows as HourReadingRow[]).reverse();
}

export interface PolicyRow {
  engine_family: string;
  claim_days: number;
  part_retention_days: number;
  warranty_email: string;
  /** the version read (warranty_policy_version, migration 0063) and its coverage per class */
  policy_version_id: string;
  version: number;
  base_months: number;
  base_hours: number;
  engine_months: number;
  engine_hours: number;
}

const policyColumns = [
  "engine_family", "claim_days", "part_retention_days", "warranty_email", "policy_version_id", "version",
  "base_months", "base_hours", "engine_months", "engine_hours",
] as const;

/** The current filing policy for an engine family, or the group default ('*'): the latest saved version. */
export async function policyFor(db: Tx, engineFamily: string): Promise<PolicyRow> {
  const rows = await db
    .selectFrom("warranty_policy")
    .select([...policyColumns])
    .where("engine_family", "in", [engineFamily, "*"])
    .execute();
  const row = rows.find((r) => r.engine_family === engineFamily) ?? rows.find((r) => r.engine_family === "*");
  if (!row) throw new Error(`no warranty policy for ${engineFamily} and no default row`);
  return { ...row, policy_version_id: String(row.policy_version_id) };
}

/** One stored policy version by its id (the version a claim was judged under). */
export async function policyVersionById(db: Tx, policyVersionId: string): Promise<PolicyRow | undefined> {
  const row = await db
    .selectFrom("warranty_policy_version")
    .select([...policyColumns])
    .where("policy_version_id", "=", policyVersionId)
    .executeTakeFirst();
  return row && { ...row, policy_version_id: String(row.policy_version_id) };
}

/** Claims that already hold any of these repair lines (to warn before a second claim on the same failure). */
export async function claimsHoldingLines(db: Tx, keys: readonly string[]) {
  if (keys.length === 0) return [];
  return await db
    .selectFrom("warranty_claim_line as l")
    .innerJoin("warranty_claim as c", "c.claim_id", "l.claim_id")
    .select(["c.claim_id", "c.claim_number", "c.kind", "c.status", "l.repair_line_key"])
    .where("l.repair_line_key", "in", [...keys])
    .orderBy("c.claim_id")
    .execute();
}

export interface NewClaim {
  kind: ClaimKindColumn;
  title: string;
  shop_code: string | null;
  engine_family: string;
  closed_date: string;
  claim_days: number;
  deadline: string;
  amount_claimed: number | null;
  note: string | null;
  cluster_id: string | null;
  cluster_snapshot: unknown;
  temperature_unit: "C" | "F";
  /** the policy version the claim is judged under (when absent, a trigger records the current one) */
  policy_version_id?: string;
  created_by: string;
  created_by_name: string;
}

export interface Actor {
  sub: string;
  name: string;
}

/** Inserts a claim, its lines and the first audit row in one transaction; the number comes from a sequence. */
export async function insertClaim(db: Db, c: NewClaim, lines: { key: string; shopCode: string }[], actor: Actor, auditExtra: Record<string, unknown> = {}): Promise<string> {
  return await db.transaction().execute(async (trx) => {
    const seq = await sql<{ n: string }>`SELECT nextval('warranty_claim_number_seq') AS n`.execute(trx);
    const yy = new Date().getUTCFullYear() % 100;
    const claimNumber = `IL-${String(yy).padStart(2, "0")}${c.kind === "campaign" ? "C" : "R"}${String(seq.rows[0].n).padStart(5, "0")}`;
    const { claim_id } = await trx
      .insertInto("warranty_claim")
      .values({ ...c, claim_number: claimNumber, cluster_snapshot: c.cluster_snapshot === null ? null : JSON.stringify(c.cluster_snapshot) })
      .returning("claim_id")
      .executeTakeFirstOrThrow();
    await trx
      .insertInto("warranty_claim_line")
      .values(lines.map((l) => ({ claim_id, repair_line_key: l.key, shop_code: l.shopCode })))
      .execute();
    await writeAudit(trx, claim_id, actor, "created", {
      claimNumber,
      kind: c.kind,
      status: "draft",
      lines: lines.length,
      deadline: c.deadline,
      ...(c.cluster_id ? { clusterId: c.cluster_id } : {}),
      ...auditExtra,
    });
    return String(claim_id);
  });
}

export async function writeAudit(db: Tx, claimId: string, actor: Actor, action: string, changes: Record<string, unknown>): Promise<void> {
  await db
    .insertInto("warranty_claim_audit")
    .values({ claim_id: claimId, actor_sub: actor.sub, actor_name: actor.name, action, changes: JSON.stringify(changes) })
    .execute();
}

const claimColumns = [
  "c.claim_id", "c.claim_number", "c.kind", "c.status", "c.title", "c.shop_code", "c.engine_family", "c.closed_date",
  "c.claim_days", "c.deadline", "c.amount_claimed", "c.amount_credited", "c.reason", "c.note", "c.cluster_id",
  "c.cluster_snapshot", "c.temperature_unit", "c.created_by", "c.created_by_name", "c.created_at", "c.updated_at",
  // versions, the way out and the maker's payment (migration 0059)
  "c.revision", "c.previous_claim_id", "c.correction", "c.resubmit_from", "c.amount_paid", "c.filed_via", "c.filed_reference",
  "c.filed_on", "c.days_late", "c.written_off_reason", "c.decided_at",
  // the warranty policy version it was judged under (migration 0063)
  "c.policy_version_id",
] as const;

/** Claims in the caller's scope: a manager sees only claims of their own shops (campaign cases across shops are group-wide). */
function scopedClaims(db: Tx, scope: ShopScope) {
  const shops = scopedShopCodes(scope);
  let q = db.selectFrom("warranty_claim as c");
  if (shops) q = shops.length ? q.where("c.shop_code", "in", shops) : q.where(sql<boolean>`FALSE`);
  return q;
}

export async function listClaims(db: Db, scope: ShopScope) {
  return await scopedClaims(db, scope)
    .select([...claimColumns])
    .select((eb) => eb.selectFrom("warranty_claim_line as l").select(eb.fn.countAll<string>().as("n")).whereRef("l.claim_id", "=", "c.claim_id").as("line_count"))
    .orderBy("c.deadline")
    .execute();
}

export type ClaimRow = Awaited<ReturnType<typeof getClaim>> & object;

/** One claim, or undefined when it does not exist or lies outside the caller's scope. */
export async function getClaim(db: Tx, scope: ShopScope, claimId: string) {
  if (!/^\d{1,18}$/.test(claimId)) return undefined;
  return await scopedClaims(db, scope).select([...claimColumns]).where("c.claim_id", "=", claimId).executeTakeFirst();
}

export async function claimLineKeys(db: Tx, claimId: string): Promise<string[]> {
  const rows = await db.selectFrom("warranty_claim_line").select("repair_line_key").where("claim_id", "=", claimId).execute();
  return rows.map((r) => String(r.repair_line_key));
}

export async function claimAudit(db: Tx, claimId: string) {
  return await db
    .selectFrom("warranty_claim_audit")
    .select(["audit_id", "at", "actor_name", "action", "changes"])
    .where("claim_id", "=", claimId)
    .orderBy("at").orderBy("audit_id")
    .execute();
}

/** Moves a claim's status only if it is still in the status the check was made against (no lost update). */
export async function updateClaimStatus(
  db: Db,
  claimId: string,
  from: ClaimStatusColumn,
  to: ClaimStatusColumn,
  fields: { reason?: string | null; amount?: number | null },
  actor: Actor,
): Promise<boolean> {
  return await db.transaction().execute(async (trx) => {
    const now = new Date();
    const res = await trx
      .updateTable("warranty_claim")
      .set({
        status: to,
        updated_at: now,
        ...(to === "submitted" ? { submitted_at: now } : {}),
        ...(to === "accepted" || to === "rejected" ? { decided_at: now } : {}),
        ...(to === "rejected" ? { reason: fields.reason ?? null } : {}),
        ...(to === "credited" ? { credited_at: now, amount_credited: fields.amount ?? null } : {}),
      })
      .where("claim_id", "=", claimId)
      .where("status", "=", from)
      .executeTakeFirst();
    if (Number(res.numUpdatedRows) !== 1) return false;
    await writeAudit(trx, claimId, actor, "status", {
      status: { from, to },
      ...(to === "rejected" ? { reason: fields.reason } : {}),
      ...(to === "credited" ? { amountCredited: fields.amount } : {}),
    });
    return true;
  });
}

export async function claimAttachments(db: Tx, claimId: string) {
  return await db
    .selectFrom("warranty_attachment")
    .select(["attachment_id", "s3_key", "content_type", "extension", "size_bytes", "original_name", "uploaded_by", "uploaded_at"])
    .where("claim_id", "=", claimId)
    .orderBy("uploaded_at").orderBy("attachment_id")
    .execute();
}

export async function insertAttachment(
  db: Db,
  a: { claimId: string; s3Key: string; contentType: string; extension: string; sizeBytes: number; originalName: string },
  actor: Actor,
): Promise<string> {
  return await db.transaction().execute(async (trx) => {
    const { attachment_id } = await trx
      .insertInto("warranty_attachment")
      .values({ claim_id: a.claimId, s3_key: a.s3Key, content_type: a.contentType, extension: a.extension, size_bytes: a.sizeBytes, original_name: a.originalName, uploaded_by: actor.name })
      .returning("attachment_id")
      .executeTakeFirstOrThrow();
    await writeAudit(trx, a.claimId, actor, "attachment added", { attachment: a.originalName, type: a.contentType, bytes: a.sizeBytes });
    await trx.updateTable("warranty_claim").set({ updated_at: new Date() }).where("claim_id", "=", a.claimId).execute();
    return String(attachment_id);
  });
}

export async function claimSends(db: Tx, claimIds: readonly string[]) {
  if (claimIds.length === 0) return [];
  return await db
    .selectFrom("warranty_send")
    .select(["send_id", "claim_id", "to_address", "status", "attempts", "last_error", "requested_by", "requested_at", "sent_at"])
    .where("claim_id", "in", [...claimIds])
    .orderBy("requested_at").orderBy("send_id")
    .execute();
}

export async function insertSend(db: Db, claimId: string, toAddress: string, actor: Actor): Promise<string> {
  return await db.transaction().execute(async (trx) => {
    const { send_id } = await trx
      .insertInto("warranty_send")
      .values({ claim_id: claimId, to_address: toAddress, status: "sending", requested_by: actor.name })
      .returning("send_id")
      .executeTakeFirstOrThrow();
    await writeAudit(trx, claimId, actor, "send requested", { to: toAddress });
    return String(send_id);
  });
}

export async function getSend(db: Tx, sendId: string) {
  return await db
    .selectFrom("warranty_send")
    .select(["send_id", "claim_id", "to_address", "status", "attempts", "last_error", "requested_by"])
    .where("send_id", "=", sendId)
    .executeTakeFirst();
}

/** Records one delivery attempt's outcome; a success also writes the audit row. */
export async function recordSendAttempt(
  db: Db,
  sendId: string,
  outcome: { status: SendStatusColumn; error?: string | null; messageId?: string | null },
): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const now = new Date();
    const row = await trx
      .updateTable("warranty_send")
      .set((eb) => ({
        status: outcome.status,
        attempts: eb("attempts", "+", 1),
        last_error: outcome.error ?? null,
        updated_at: now,
        ...(outcome.status === "sent" ? { sent_at: now, message_id: outcome.messageId ?? null } : {}),
      }))
      .where("send_id", "=", sendId)
      .returning(["claim_id", "to_address", "attempts"])
      .executeTakeFirst();
    if (!row) return;
    const system = { sub: "system", name: "Ironledger" };
    if (outcome.status === "sent") await writeAudit(trx, String(row.claim_id), system, "packet sent", { to: row.to_address, attempts: row.attempts });
    else if (outcome.status === "failed") await writeAudit(trx, String(row.claim_id), system, "send failed", { to: row.to_address, attempts: row.attempts, error: outcome.error });
  });
}
