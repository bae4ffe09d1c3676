import { sql, type Kysely } from "kysely";

// csv_cell(text): a text value as a cell of the CSV files PostgreSQL writes for Ironledger (COPY … TO STDOUT
// (FORMAT csv)), by the same rule as shared/csv-cell.ts. A cell that starts with = + - @, a tab or a carriage
// return gets a leading apostrophe so a spreadsheet shows it as typed instead of running it, unless it is a
// plain number such as -12.5. The empty string becomes NULL: COPY writes NULL as an empty field and '' as "",
// and the rule writes both as an empty field.
// A plain SQL function without STRICT or SET clauses, so the planner inlines it into the query: ascii() of the
// first character is the only test most cells pay.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE FUNCTION csv_cell(cell text) RETURNS text
    LANGUAGE sql IMMUTABLE PARALLEL SAFE
    AS $$
      SELECT CASE
        -- 0 is ascii(''); 9 tab, 13 carriage return, 43 +, 45 -, 61 =, 64 @
        WHEN ascii(cell) NOT IN (0, 9, 13, 43, 45, 61, 64) THEN cell
        WHEN cell = '' THEN NULL
        WHEN cell ~ '^-?[0-9]+([.][0-9]+)?$' THEN cell
        ELSE '''' || cell
      END
    $$
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP FUNCTION csv_cell(text)`.execute(db);
}
