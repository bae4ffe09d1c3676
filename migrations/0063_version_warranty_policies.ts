import { sql, type Kysely } from "kysely";

// Warranty policies become versioned, as the import profiles are (0053): an admin's save is a new version and
// never changes an old one, and every claim records the version it was judged under, so its eligibility and
// deadline can always be explained by the exact policy that decided them. A version holds the coverage per
// class (months and hours, "whichever comes first"), the filing window, the part-retention days and where
// packets go. Version 1 of every family is today's policy: its filing days, retention and address from
// warranty_policy, and the coverage the code held as constants (base machine 24 months / 2,000 h, engine
// 36 months / 3,000 h; common practice, no source), so no existing claim changes.
//
// warranty_policy itself becomes a view of each family's current version with the old columns first, so a
// reader written against the table reads the current version.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE warranty_policy_version (
      policy_version_id   bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      engine_family       text NOT NULL CHECK (engine_family = '*' OR engine_family ~ '^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$'),
      version             integer NOT NULL CHECK (version >= 1),
      base_months         integer NOT NULL CHECK (base_months BETWEEN 1 AND 240),
      base_hours          integer NOT NULL CHECK (base_hours BETWEEN 1 AND 100000),
      engine_months       integer NOT NULL CHECK (engine_months BETWEEN 1 AND 240),
      engine_hours        integer NOT NULL CHECK (engine_hours BETWEEN 1 AND 100000),
      claim_days          integer NOT NULL CHECK (claim_days BETWEEN 1 AND 365),
      part_retention_days integer NOT NULL CHECK (part_retention_days BETWEEN 0 AND 365),
      warranty_email      text NOT NULL CHECK (warranty_email LIKE '%_@_%'),
      saved_by            text NOT NULL,
      saved_at            timestamptz NOT NULL DEFAULT now(),
      note                text,
      UNIQUE (engine_family, version)
    )
  `.execute(db);
  await sql`
    INSERT INTO warranty_policy_version
      (engine_family, version, base_months, base_hours, engine_months, engine_hours, claim_days, part_retention_days, warranty_email, saved_by, saved_at, note)
    SELECT engine_family, 1, 24, 2000, 36, 3000, claim_days, part_retention_days, warranty_email, 'defaults', updated_at,
           'The policy as it stood before versions were kept.'
    FROM warranty_policy
  `.execute(db);

  await sql`ALTER TABLE warranty_claim ADD COLUMN policy_version_id bigint REFERENCES warranty_policy_version`.execute(db);
  await sql`
    UPDATE warranty_claim c SET policy_version_id = (
      SELECT v.policy_version_id FROM warranty_policy_version v
      WHERE v.engine_family IN (c.engine_family, '*') AND v.version = 1
      ORDER BY (v.engine_family = '*') LIMIT 1)
  `.execute(db);

  await sql`DROP TABLE warranty_policy`.execute(db);
  await sql`
    CREATE VIEW warranty_policy AS
    SELECT DISTINCT ON (engine_family)
      engine_family, claim_days, part_retention_days, warranty_email, saved_at AS updated_at,
      policy_version_id, version, base_months, base_hours, engine_months, engine_hours
    FROM warranty_policy_version
    ORDER BY engine_family, version DESC
  `.execute(db);

  // A claim inserted without a version (a corrected version of a rejected claim, or any other path) keeps the
  // version of the claim it corrects, else the current version of its engine family (or the default, '*').
  await sql`
    CREATE FUNCTION warranty_claim_policy_version() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF NEW.policy_version_id IS NULL AND NEW.previous_claim_id IS NOT NULL THEN
        SELECT policy_version_id INTO NEW.policy_version_id FROM warranty_claim WHERE claim_id = NEW.previous_claim_id;
      END IF;
      IF NEW.policy_version_id IS NULL THEN
        SELECT p.policy_version_id INTO NEW.policy_version_id FROM warranty_policy p
        WHERE p.engine_family IN (NEW.engine_family, '*') ORDER BY (p.engine_family = '*') LIMIT 1;
      END IF;
      RETURN NEW;
    END $$
  `.execute(db);
  await sql`
    CREATE TRIGGER warranty_claim_policy_version BEFORE INSERT ON warranty_claim
    FOR EACH ROW EXECUTE FUNCTION warranty_claim_policy_version()
  `.execute(db);
  await sql`ALTER TABLE warranty_claim ALTER COLUMN policy_version_id SET NOT NULL`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TRIGGER warranty_claim_policy_version ON warranty_claim`.execute(db);
  await sql`DROP FUNCTION warranty_claim_policy_version()`.execute(db);
  await sql`DROP VIEW warranty_policy`.execute(db);
  await sql`
    CREATE TABLE warranty_policy (
      engine_family       text PRIMARY KEY,
      claim_days          integer NOT NULL CHECK (claim_days BETWEEN 1 AND 365),
      part_retention_days integer NOT NULL CHECK (part_retention_days BETWEEN 0 AND 365),
      warranty_email      text NOT NULL CHECK (warranty_email LIKE '%_@_%'),
      updated_at          timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`
    INSERT INTO warranty_policy (engine_family, claim_days, part_retention_days, warranty_email, updated_at)
    SELECT DISTINCT ON (engine_family) engine_family, claim_days, part_retention_days, warranty_email, saved_at
    FROM warranty_policy_version ORDER BY engine_family, version DESC
  `.execute(db);
  await sql`ALTER TABLE warranty_claim DROP COLUMN policy_version_id`.execute(db);
  await sql`DROP TABLE warranty_policy_version`.execute(db);
}
