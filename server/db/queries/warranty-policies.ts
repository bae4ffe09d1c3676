import { sql, type Selectable } from "kysely";
import type { WarrantyPolicyVersionTable } from "../warehouse-schema.js";
import type { Db } from "../database.js";
import type { PolicyTerms } from "../../../shared/schemas/warranty-policies.js";

/**
 * The versioned warranty policies (warranty_policy_version, migration 0063): one row per saved version, never
 * updated; a family's current policy is its highest version. A save names the version it started from, so two
 * admins editing at once cannot overwrite each other: the second is told to reopen the policy.
 */

/** A stored version as read back, with the number of claims judged under it. */
export type PolicyVersionRow = Selectable<WarrantyPolicyVersionTable> & { claims: number };

export const termsOfRow = (r: Pick<PolicyVersionRow, "base_months" | "base_hours" | "engine_months" | "engine_hours" | "claim_days" | "part_retention_days" | "warranty_email">): PolicyTerms => ({
  coverage: { base: { months: r.base_months, hours: r.base_hours }, engine: { months: r.engine_months, hours: r.engine_hours } },
  claimDays: r.claim_days,
  partRetentionDays: r.part_retention_days,
  warrantyEmail: r.warranty_email,
});

const claimsUnder = sql<number>`(SELECT count(*)::int FROM warranty_claim c WHERE c.policy_version_id = v.policy_version_id)`;

/** Every family's current version (the default '*' first), with how many versions it has. */
export async function listCurrentPolicies(db: Db): Promise<(PolicyVersionRow & { versions: number })[]> {
  const r = await sql<PolicyVersionRow & { versions: number }>`
    SELECT DISTINCT ON (v.engine_family) v.*, v.policy_version_id::text AS policy_version_id, ${claimsUnder} AS claims,
      (SELECT count(*)::int FROM warranty_policy_version w WHERE w.engine_family = v.engine_family) AS versions
    FROM warranty_policy_version v
    ORDER BY v.engine_family, v.version DESC`.execute(db);
  return r.rows.sort((a, b) => (a.engine_family === "*" ? -1 : b.engine_family === "*" ? 1 : a.engine_family.localeCompare(b.engine_family)));
}

/** Every version of one family's policy, newest first (empty when the family has no policy of its own). */
export async function policyHistory(db: Db, family: string): Promise<PolicyVersionRow[]> {
  const r = await sql<PolicyVersionRow>`
    SELECT v.*, v.policy_version_id::text AS policy_version_id, ${claimsUnder} AS claims
    FROM warranty_policy_version v WHERE v.engine_family = ${family}
    ORDER BY v.version DESC`.execute(db);
  return r.rows;
}

export type SaveOutcome = { saved: true; version: number } | { saved: false; latest: number | null };

/**
 * Saves the terms as the family's next version when `basedOn` is still its latest (null: a family with no
 * policy yet, which starts at version 1); otherwise saves nothing and returns the latest version.
 */
export async function savePolicyVersion(
  db: Db,
  family: string,
  terms: PolicyTerms,
  basedOn: number | null,
  savedBy: string,
  note: string,
): Promise<SaveOutcome> {
  return await db.transaction().execute(async (trx) => {
    // one save at a time per family: the advisory lock is released with the transaction
    await sql`SELECT pg_advisory_xact_lock(hashtext('warranty_policy_version'), hashtext(${family}))`.execute(trx);
    const top = await trx
      .selectFrom("warranty_policy_version")
      .select((eb) => eb.fn.max("version").as("latest"))
      .where("engine_family", "=", family)
      .executeTakeFirst();
    const latest = top?.latest ?? null;
    if (latest !== basedOn) return { saved: false, latest };
    const version = (latest ?? 0) + 1;
    await trx
      .insertInto("warranty_policy_version")
      .values({
        engine_family: family,
        version,
        base_months: terms.coverage.base.months,
        base_hours: terms.coverage.base.hours,
        engine_months: terms.coverage.engine.months,
        engine_hours: terms.coverage.engine.hours,
        claim_days: terms.claimDays,
        part_retention_days: terms.partRetentionDays,
        warranty_email: terms.warrantyEmail,
        saved_by: savedBy,
        note,
      })
      .execute();
    return { saved: true, version };
  });
}
