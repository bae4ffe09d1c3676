import { sql, type Kysely } from "kysely";

// A repair line whose content changes keeps its prior version in fact_repair_line_history. A row trigger
// records it at the moment of the update, so a load no longer looks every incoming line up beforehand to
// find the few that change: new lines, the bulk of any load, cost nothing here. Putting a line back as it
// was (the loader undoing its own update within the same transaction) sets ironledger.restoring_lines.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE FUNCTION keep_repair_line_history() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF coalesce(current_setting('ironledger.restoring_lines', true), '') <> 'on' THEN
        INSERT INTO fact_repair_line_history (repair_line_key, prior_row, prior_batch_id, replaced_by_batch)
        VALUES (OLD.repair_line_key, to_jsonb(OLD), OLD.batch_id, NEW.batch_id);
      END IF;
      RETURN NEW;
    END
    $$
  `.execute(db);
  await sql`
    CREATE TRIGGER fact_repair_line_keep_history BEFORE UPDATE ON fact_repair_line
    FOR EACH ROW WHEN (OLD.row_hash IS DISTINCT FROM NEW.row_hash)
    EXECUTE FUNCTION keep_repair_line_history()
  `.execute(db);
  await sql`CREATE INDEX fact_repair_line_history_batch_idx ON fact_repair_line_history (replaced_by_batch)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX fact_repair_line_history_batch_idx`.execute(db);
  await sql`DROP TRIGGER fact_repair_line_keep_history ON fact_repair_line`.execute(db);
  await sql`DROP FUNCTION keep_repair_line_history()`.execute(db);
}
