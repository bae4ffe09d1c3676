import { sql, type Kysely } from "kysely";

// A claim's narrative, the story the maker reads in its packet: what was found, what was done, and why the failure is
// the maker's to pay; and notes between the warranty clerk and the shop, kept with the claim (never in the packet).
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`ALTER TABLE warranty_claim
    ADD COLUMN narrative_found text CHECK (char_length(narrative_found) <= 4000),
    ADD COLUMN narrative_done  text CHECK (char_length(narrative_done) <= 4000),
    ADD COLUMN narrative_why   text CHECK (char_length(narrative_why) <= 4000)`.execute(db);
  await sql`
    CREATE TABLE warranty_claim_note (
      note_id     bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      claim_id    bigint NOT NULL REFERENCES warranty_claim (claim_id) ON DELETE CASCADE,
      author_sub  text NOT NULL,
      author_name text NOT NULL,
      author_role text NOT NULL,
      body        text NOT NULL CHECK (char_length(body) BETWEEN 1 AND 2000),
      at          timestamptz NOT NULL DEFAULT now()
    )`.execute(db);
  await sql`CREATE INDEX warranty_claim_note_claim_idx ON warranty_claim_note (claim_id, at)`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE warranty_claim_note`.execute(db);
  await sql`ALTER TABLE warranty_claim DROP COLUMN narrative_found, DROP COLUMN narrative_done, DROP COLUMN narrative_why`.execute(db);
}
