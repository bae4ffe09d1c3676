import { sql, type Kysely } from "kysely";

/**
 * Empties a table and fills it again, with its indexes dropped meanwhile and built afterwards from their own
 * definitions (pg_get_indexdef, so they stay defined in the migrations alone): building an index once from
 * all rows costs a fraction of inserting each row into it. Indexes that back a constraint are kept. Meant for
 * the full rebuild of a derived table inside its refresh transaction, which TRUNCATE locks for its duration.
 */
export async function reloadTable<T>(db: Kysely<any>, table: string, fill: () => Promise<T>): Promise<T> {
  const indexes = await sql<{ name: string; def: string }>`
    SELECT c.relname AS name, pg_get_indexdef(i.indexrelid) AS def
    FROM pg_index i JOIN pg_class c ON c.oid = i.indexrelid
    WHERE i.indrelid = ${table}::regclass AND NOT EXISTS (SELECT 1 FROM pg_constraint k WHERE k.conindid = i.indexrelid)
  `.execute(db);
  for (const ix of indexes.rows) await sql`DROP INDEX ${sql.id(ix.name)}`.execute(db);
  await sql`TRUNCATE ${sql.table(table)}`.execute(db);
  const filled = await fill();
  for (const ix of indexes.rows) await sql.raw(ix.def).execute(db);
  return filled;
}
