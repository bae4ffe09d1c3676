import { sql, type Kysely } from "kysely";

// A claim's money and lifecycle. A line the claim holds but that is not covered (or cannot be decided) is kept
// apart from the amount claimed unless the clerk includes it deliberately, with a reason. "Submitted" records
// how the claim went out (the packet e-mailed from here, or another way with its reference and date) and how
// many days late it was. The maker's answer: accepted with the amount paid, partly accepted (amount and
// reason), rejected (reason); a rejected claim is corrected as a new version (same number, next revision)
// that points back to the one before, or written off. Claims filed before this migration keep their state;
// their way out is marked 'unrecorded' and an accepted or credited one is taken as paid what it claimed (or
// was credited).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE warranty_claim DROP CONSTRAINT warranty_claim_status_check`.execute(db);
  await sql`ALTER TABLE warranty_claim ADD CONSTRAINT warranty_claim_status_check
            CHECK (status IN ('draft','submitted','accepted','partly_accepted','rejected','credited','written_off'))`.execute(db);
  await sql`
    ALTER TABLE warranty_claim
      ADD COLUMN revision          integer NOT NULL DEFAULT 1 CHECK (revision >= 1),
      ADD COLUMN previous_claim_id bigint REFERENCES warranty_claim,
      ADD COLUMN correction        text,
      ADD COLUMN resubmit_from     date,
      ADD COLUMN amount_paid       numeric(12,2),
      ADD COLUMN filed_via         text CHECK (filed_via IN ('mail','other','unrecorded')),
      ADD COLUMN filed_reference   text,
      ADD COLUMN filed_on          date,
      ADD COLUMN days_late         integer CHECK (days_late >= 0),
      ADD COLUMN written_off_reason text
  `.execute(db);
  await sql`UPDATE warranty_claim SET filed_via = 'unrecorded' WHERE status <> 'draft'`.execute(db);
  await sql`UPDATE warranty_claim SET amount_paid = coalesce(amount_credited, amount_claimed) WHERE status IN ('accepted','credited')`.execute(db);
  await sql`
    ALTER TABLE warranty_claim
      ADD CONSTRAINT warranty_claim_filed_has_way CHECK (status = 'draft' OR filed_via IS NOT NULL),
      ADD CONSTRAINT warranty_claim_partly_has_reason CHECK (status <> 'partly_accepted' OR (reason IS NOT NULL AND amount_paid IS NOT NULL)),
      ADD CONSTRAINT warranty_claim_written_off_has_reason CHECK (status <> 'written_off' OR written_off_reason IS NOT NULL),
      ADD CONSTRAINT warranty_claim_version_has_previous CHECK ((revision = 1) = (previous_claim_id IS NULL))
  `.execute(db);
  // one number per claim, one row per revision of it
  await sql`ALTER TABLE warranty_claim DROP CONSTRAINT warranty_claim_claim_number_key`.execute(db);
  await sql`ALTER TABLE warranty_claim ADD CONSTRAINT warranty_claim_number_revision_key UNIQUE (claim_number, revision)`.execute(db);
  // a claim is corrected at most once: its next version
  await sql`CREATE UNIQUE INDEX warranty_claim_previous_idx ON warranty_claim (previous_claim_id) WHERE previous_claim_id IS NOT NULL`.execute(db);

  await sql`
    ALTER TABLE warranty_claim_line
      ADD COLUMN include_reason text,
      ADD COLUMN included_by    text,
      ADD COLUMN included_at    timestamptz,
      ADD CONSTRAINT warranty_claim_line_included_has_who CHECK (include_reason IS NULL OR (included_by IS NOT NULL AND included_at IS NOT NULL))
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE warranty_claim_line DROP CONSTRAINT warranty_claim_line_included_has_who,
            DROP COLUMN include_reason, DROP COLUMN included_by, DROP COLUMN included_at`.execute(db);
  await sql`DELETE FROM warranty_claim WHERE revision > 1`.execute(db);
  await sql`DROP INDEX warranty_claim_previous_idx`.execute(db);
  await sql`ALTER TABLE warranty_claim DROP CONSTRAINT warranty_claim_number_revision_key`.execute(db);
  await sql`ALTER TABLE warranty_claim ADD CONSTRAINT warranty_claim_claim_number_key UNIQUE (claim_number)`.execute(db);
  await sql`UPDATE warranty_claim SET status = 'rejected' WHERE status = 'written_off'`.execute(db);
  await sql`UPDATE warranty_claim SET status = 'accepted' WHERE status = 'partly_accepted'`.execute(db);
  await sql`ALTER TABLE warranty_claim DROP CONSTRAINT warranty_claim_filed_has_way, DROP CONSTRAINT warranty_claim_partly_has_reason,
            DROP CONSTRAINT warranty_claim_written_off_has_reason, DROP CONSTRAINT warranty_claim_version_has_previous`.execute(db);
  await sql`ALTER TABLE warranty_claim DROP COLUMN revision, DROP COLUMN previous_claim_id, DROP COLUMN correction, DROP COLUMN resubmit_from,
            DROP COLUMN amount_paid, DROP COLUMN filed_via, DROP COLUMN filed_reference, DROP COLUMN filed_on, DROP COLUMN days_late,
            DROP COLUMN written_off_reason`.execute(db);
  await sql`ALTER TABLE warranty_claim DROP CONSTRAINT warranty_claim_status_check`.execute(db);
  await sql`ALTER TABLE warranty_claim ADD CONSTRAINT warranty_claim_status_check
            CHECK (status IN ('draft','submitted','accepted','rejected','credited'))`.execute(db);
}
