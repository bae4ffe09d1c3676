/**
 * Grows a loaded warehouse to a target number of job lines by copying its fleet: copy i of every machine gets
 * the serial 'serialCi' and every repair line of it the repair order 'RO-Ci', keyed as the ETL keys them, and
 * its hour readings, measurements and fault codes come along. Dates,
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
      const t0 = Date.now();
      // machines and repair lines keyed as the ETL keys them (etl/load/keys.ts), so later loads find them
      await client.query(`
        CREATE TEMP TABLE machine_map AS
        SELECT m.machine_key AS old_key, g.i, m.serial || 'C' || g.i AS serial, wh_key('machine|' || m.serial || 'C' || g.i) AS new_key
        FROM dim_machine m CROSS JOIN generate_series(1, $1) AS g(i)`, [copies - 1]);
      await client.query(`
        CREATE TEMP TABLE line_map AS
        SELECT f.repair_line_key AS old_key, g.i, f.ro_number || 'C' || g.i AS ro_number,
               wh_key('repair_line|' || s.shop_code || '|' || f.ro_number || 'C' || g.i || '|' || f.line_no) AS new_key
        FROM fact_repair_line f JOIN dim_shop s USING (shop_key) CROSS JOIN generate_series(1, $1) AS g(i)`, [copies - 1]);
      await client.query("CREATE INDEX ON machine_map (old_key, i); CREATE INDEX ON line_map (old_key, i); ANALYZE machine_map; ANALYZE line_map");
      const mcols = await columnsOf(client, "dim_machine");
      const msel = mcols.map((c) => (c === "machine_key" ? "mm.new_key" : c === "serial" ? "mm.serial" : `t.${c}`));
      await client.query(`INSERT INTO dim_machine (${mcols.join(", ")}) SELECT ${msel.join(", ")} FROM dim_machine t JOIN machine_map mm ON mm.old_key = t.machine_key`);
      // and their home shops over time, which the exposure and the failure lines are attributed by
      await client.query(`
        INSERT INTO machine_home_shop (machine_key, shop_key, valid_from, valid_to, batch_id)
        SELECT mm.new_key, h.shop_key, h.valid_from, h.valid_to, h.batch_id FROM machine_home_shop h JOIN machine_map mm ON mm.old_key = h.machine_key`);
      log(`  machines copied ×${copies} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
      await withoutSecondaryIndexes(client, FACTS.map((f) => f.table), async () => {
        for (const f of FACTS) {
          const t1 = Date.now();
          const cols = await columnsOf(client, f.table);
          // copy i of a row: its machine and line through the maps, its own key hashed from the old one and i
          const anchor = f.machine ? "mm" : "lm";
          const joins = f.table === "fact_repair_line"
            ? `JOIN line_map lm ON lm.old_key = t.repair_line_key JOIN machine_map mm ON mm.old_key = t.machine_key AND mm.i = lm.i`
            : f.machine
              ? `JOIN machine_map mm ON mm.old_key = t.${f.machine} LEFT JOIN line_map lm ON lm.old_key = t.${f.line} AND lm.i = mm.i`
              : `JOIN line_map lm ON lm.old_key = t.${f.line}`;
          const sel = cols.map((c) =>
            f.table === "fact_repair_line" && c === f.key ? "lm.new_key"
            : c === f.key ? `wh_key(t.${c}::text || '-C' || ${anchor}.i)`
            : c === f.machine ? "mm.new_key"
            : c === f.line ? "lm.new_key"
            : f.ro && c === "ro_number" ? "lm.ro_number" : `t.${c}`,
          );
          const r = await client.query(`INSERT INTO ${f.table} (${cols.join(", ")}) SELECT ${sel.join(", ")} FROM ${f.table} t ${joins}`);
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
