import { sql, type Kysely } from "kysely";

// A claim's packet states temperatures (the cautions, a cluster's temperature band) in one unit: the unit of the
// clerk who built the claim, recorded here when it is made. Claims made before default to °C.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`ALTER TABLE warranty_claim ADD COLUMN temperature_unit text NOT NULL DEFAULT 'C'
            CONSTRAINT warranty_claim_temperature_unit_check CHECK (temperature_unit IN ('C', 'F'))`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`ALTER TABLE warranty_claim DROP COLUMN temperature_unit`.execute(db);
}
