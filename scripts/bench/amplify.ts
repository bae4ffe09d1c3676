/**
 * Grows a loaded warehouse to a target number of job lines by copying its fleet: copy i of every machine gets
 * the key wh_key(key || '~i') and the serial 'serial~i', and every repair line, hour reading, measurement and
 * fault code of that machine comes along under keys derived the same way (repair orders 'RO~i'). Dates,
 * shops, components, lots and weather stay as they are, so every distribution of the loaded world (failure
 * rates, life curves, planted clusters) is kept at a larger volume. For benchmarks only: far faster than
 * generating and loading the same volume through the ETL, which bench:etl measures on its own.
 */
import type pg from "pg";

/** Copied facts: each with its key columns and the columns that point at a copied row. */
const FACTS = [
  { table: "fact_repair_line", key: "repair_line_key", machine: "machine_key", line: null, ro: true },
  { table: "fact_meter_reading", key: "hour_reading_key", machine: "machine_key", line: "repair_line_key", ro: false },
  { table: "fact_measurement", key: "measurement_key", machine: "machine_key", line: "repair_line_key", ro: false },
  { table: "fact_fault_code", key: null, machine: null, line: "repair_line_key", ro: false },
] as const;

async function columnsOf(client: pg.PoolClient, table: string): Promise<string[]> {
  const r = await client.query<{ column_name: string }>(
    `SELECT column_name FROM information_schema.columns WHERE table_schema = 'public' AND table_name = $1 AND is_generated = 'NEVER'
     ORDER BY ordinal_position`,
    [table],
  );
  return r.rows.map((x) => x.column_name);
}

/** Secondary indexes are dropped while the copies go in and built again after (much faster than maintaining them). */
async function withoutSecondaryIndexes<T>(client: pg.PoolClient, tables: string[], work: () => Promise<T>): Promise<T> {
  const idx = await client.query<{ indexname: string; indexdef: string }>(
    `SELECT i.indexname, i.indexdef FROM pg_indexes i
     WHERE i.schemaname = 'public' AND i.tablename = ANY($1)
       AND NOT EXISTS (SELECT 1 FROM pg_constraint c WHERE c.conname = i.indexname)`,
    [tables],
  );
  for (const i of idx.rows) await client.query(`DROP INDEX ${i.indexname}`);
  const result = await work();
  for (const i of idx.rows) await client.query(i.indexdef);
  return result;
}

/** Copies the fleet `copies − 1` times (copy 0 is the original). Returns the job lines now in the warehouse. */
export async function amplifyWarehouse(pool: pg.Pool, copies: number, log: (line: string) => void): Promise<number> {
  const client = await pool.connect();
  try {
    await client.query("SET maintenance_work_mem = '512MB'");
    await client.query("SET jit = off");
    if (copies > 1) {
      const mapped = (col: string) => `wh_key(t.${col}::text || '~' || g.i)`;
      const mcols = await columnsOf(client, "dim_machine");
      const msel = mcols.map((c) => (c === "machine_key" ? mapped(c) : c === "serial" ? `t.serial || '~' || g.i` : `t.${c}`));
      const t0 = Date.now();
      await client.query(
        `INSERT INTO dim_machine (${mcols.join(", ")}) SELECT ${msel.join(", ")} FROM dim_machine t CROSS JOIN generate_series(1, $1) AS g(i)`,
        [copies - 1],
      );
      log(`  machines copied ×${copies} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
      await withoutSecondaryIndexes(client, FACTS.map((f) => f.table), async () => {
        for (const f of FACTS) {
          const t1 = Date.now();
          const cols = await columnsOf(client, f.table);
          const sel = cols.map((c) =>
            c === f.key || c === f.machine || c === f.line ? `CASE WHEN t.${c} IS NULL THEN NULL ELSE ${mapped(c)} END`
            : f.ro && c === "ro_number" ? `t.ro_number || '~' || g.i` : `t.${c}`,
          );
          const r = await client.query(
            `INSERT INTO ${f.table} (${cols.join(", ")}) SELECT ${sel.join(", ")} FROM ${f.table} t CROSS JOIN generate_series(1, $1) AS g(i)`,
            [copies - 1],
          );
          log(`  ${f.table}: ${r.rowCount?.toLocaleString("en-US")} rows in ${((Date.now() - t1) / 1000).toFixed(1)} s`);
        }
      });
    }
    await client.query("ANALYZE");
    const n = await client.query<{ n: string }>("SELECT count(*)::text AS n FROM fact_repair_line");
    return Number(n.rows[0].n);
  } finally {
    client.release();
  }
}
