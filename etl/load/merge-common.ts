import type pg from "pg";
import { components, failureModes } from "../../shared/catalog.js";

/** Numbers in reasons as a shop manager writes them: 3,812 or 3,812.5. */
export const fmtSql = (expr: string) => `rtrim(to_char(${expr}, 'FM999,999,990.9'), '.')`;

/** Components and failure modes from shared/catalog.ts; idempotent, run at the start of every load. */
export async function seedReference(client: pg.PoolClient): Promise<void> {
  await client.query(
    `INSERT INTO dim_component (component_key, component_code, name, system, assembly, cold_start_aid)
     SELECT wh_key('component|' || code), code, name, system, assembly, csa
     FROM unnest($1::text[], $2::text[], $3::text[], $4::text[], $5::boolean[]) AS t(code, name, system, assembly, csa)
     ON CONFLICT (component_code) DO UPDATE SET name = excluded.name, system = excluded.system, assembly = excluded.assembly,
       cold_start_aid = excluded.cold_start_aid
     WHERE (dim_component.name, dim_component.system, dim_component.assembly, dim_component.cold_start_aid)
       IS DISTINCT FROM (excluded.name, excluded.system, excluded.assembly, excluded.cold_start_aid)`,
    [
      components.map((c) => c.code),
      components.map((c) => c.name),
      components.map((c) => c.system),
      components.map((c) => c.assembly),
      components.map((c) => c.coldStartAid ?? false),
    ],
  );
  await client.query(
    `INSERT INTO dim_failure_mode (failure_mode_key, failure_mode_code, name)
     SELECT wh_key('failure_mode|' || code), code, name FROM unnest($1::text[], $2::text[]) AS t(code, name)
     ON CONFLICT (failure_mode_code) DO UPDATE SET name = excluded.name WHERE dim_failure_mode.name <> excluded.name`,
    [failureModes.map((f) => f.code), failureModes.map((f) => f.name)],
  );
}

/** Calendar rows for every day from `from` to `to` (inclusive); winter seasons run July–June ("2022–23"). */
export async function ensureDates(client: pg.PoolClient, from: string | null, to: string | null): Promise<void> {
  if (!from || !to) return;
  await client.query(
    `INSERT INTO dim_date (date, iso_year, iso_week, year, quarter, month, month_label, day_of_week, winter_season)
     SELECT d, extract(isoyear FROM d), extract(week FROM d), extract(year FROM d), extract(quarter FROM d), extract(month FROM d),
       to_char(d, 'YYYY-MM'), extract(isodow FROM d),
       CASE WHEN extract(month FROM d) >= 7
         THEN to_char(d, 'YYYY') || '–' || to_char(d + interval '1 year', 'YY')
         ELSE to_char(d - interval '1 year', 'YYYY') || '–' || to_char(d, 'YY') END
     FROM generate_series($1::date, $2::date, interval '1 day') AS g(t), LATERAL (SELECT t::date AS d) x
     ON CONFLICT (date) DO NOTHING`,
    [from, to],
  );
}

/** Shops named in accepted rows that the warehouse does not know yet get a row with their code as name. */
export async function registerShops(client: pg.PoolClient, shopCol: string): Promise<void> {
  await client.query(
    `INSERT INTO dim_shop (shop_key, shop_code, name)
     SELECT DISTINCT wh_key('shop|' || ${shopCol}), ${shopCol}, ${shopCol} FROM stg WHERE reject_code IS NULL AND ${shopCol} <> ''
     ON CONFLICT (shop_code) DO NOTHING`,
  );
}

/**
 * Duplicates within the file. Copies with the same natural key and the same content: the first is kept,
 * later ones are rejected as duplicates. Copies that disagree: all are rejected, since the file cannot
 * say which one is right. `groupKey`, when given, is a staging column equivalent to the natural key
 * (its surrogate key), which groups faster than the text columns.
 */
export async function rejectDuplicates(client: pg.PoolClient, keyCols: string[], label: string, groupKey?: string): Promise<number> {
  const key = groupKey ? [groupKey] : keyCols;
  const on = key.map((c) => `s.${c} = k.${c}`).join(" AND ");
  const r = await client.query(
    `WITH d AS (
       SELECT ${key.join(", ")} FROM stg WHERE reject_code IS NULL GROUP BY ${key.join(", ")} HAVING count(*) > 1
     ), k AS (
       -- the details only for keys that repeat: most files have none
       SELECT ${key.map((c) => `s.${c}`).join(", ")}, min(s.row_no) AS first_row, min(s.row_hash) <> max(s.row_hash) AS conflicting,
              count(*) AS copies, string_agg(s.row_no::text, ', ' ORDER BY s.row_no) AS lines
       FROM stg s JOIN d ON ${key.map((c) => `s.${c} = d.${c}`).join(" AND ")}
       WHERE s.reject_code IS NULL GROUP BY ${key.map((c) => `s.${c}`).join(", ")}
     )
     UPDATE stg AS t SET
       reject_code = CASE WHEN k.conflicting THEN 'conflicting_duplicate' ELSE 'duplicate_in_file' END,
       reject_reason = CASE WHEN k.conflicting
         THEN format('${label} appears %s times in this file with different contents (lines %s); none of them was loaded', ${keyCols.map((c) => `s.${c}`).join(", ")}, k.copies, k.lines)
         ELSE format('the same line is already on line %s of this file; this copy was skipped', k.first_row) END
     FROM stg s JOIN k ON ${on}
     WHERE t.row_no = s.row_no AND s.reject_code IS NULL AND (k.conflicting OR s.row_no > k.first_row)`,
  );
  return r.rowCount ?? 0;
}

/** Rows whose machine serial is not in dim_machine: the machines export must come first. */
export async function rejectUnknownMachines(client: pg.PoolClient, byKey = false): Promise<number> {
  const known = byKey ? "m.machine_key = s.machine_key" : "m.serial = s.serial";
  const r = await client.query(
    `UPDATE stg s SET reject_code = 'unknown_machine',
       reject_reason = format('machine serial %s is not in the machine master; load the machines export that lists it first', s.serial)
     WHERE s.reject_code IS NULL AND NOT EXISTS (SELECT 1 FROM dim_machine m WHERE ${known})`,
  );
  return r.rowCount ?? 0;
}

/**
 * Whether a query over the few repair lines with an unusual hour-meter verdict (the partial index
 * fact_repair_line_notable_reading_idx) finds any. Lines inserted by this very transaction have no
 * statistics yet, and the planner then takes `meter_generation <> 0` to hold for nearly every line and
 * reads the whole table instead of the index; the table scan is ruled out for this one query.
 */
export async function anyNotableLine(client: pg.PoolClient, sql: string): Promise<boolean> {
  await client.query(`SET LOCAL enable_seqscan = off`);
  try {
    return (await client.query<{ any: boolean }>(`SELECT EXISTS (${sql}) AS any`)).rows[0].any;
  } finally {
    await client.query(`SET LOCAL enable_seqscan TO DEFAULT`);
  }
}

/** Every rejected row into etl_reject, its raw fields keyed by the file's header. */
export async function storeRejects(client: pg.PoolClient, batchId: number, header: string[]): Promise<void> {
  await client.query(
    `INSERT INTO etl_reject (batch_id, row_number, raw_row, reason_code, reason)
     SELECT $1, s.row_no,
       COALESCE((SELECT jsonb_object_agg(COALESCE(NULLIF(h.name, ''), 'column ' || f.ord), f.value)
                 FROM jsonb_array_elements_text(s.raw::jsonb) WITH ORDINALITY AS f(value, ord)
                 LEFT JOIN unnest($2::text[]) WITH ORDINALITY AS h(name, ord) ON h.ord = f.ord), '{}'::jsonb),
       s.reject_code, s.reject_reason
     FROM stg s WHERE s.reject_code IS NOT NULL`,
    [batchId, header],
  );
}

const BOOKKEEPING = new Set(["row_hash", "batch_id", "first_batch_id"]);

/**
 * The SET list and the WHERE of an upsert's DO UPDATE into `target` (its alias) over `cols`:
 * - columns in `kept` (the file's header lacks them) are left as stored;
 * - `special` sets a column by an expression of its own (and leaves it out of the comparison);
 * - a row is updated only when its content hash differs AND a value it sets differs, so a file that
 *   says less than the warehouse knows (fewer columns) neither blanks values nor counts as a change.
 */
export function updateClause(target: string, cols: string[], kept: readonly string[], special: Record<string, string> = {}): { set: string; changed: string } {
  const keep = new Set(kept);
  const setCols = cols.filter((c) => !keep.has(c));
  const set = setCols.map((c) => `${c} = ${special[c] ?? `excluded.${c}`}`).join(", ");
  const compared = setCols.filter((c) => !BOOKKEEPING.has(c) && !(c in special));
  const changed = compared.length
    ? `${target}.row_hash <> excluded.row_hash AND (${compared.map((c) => `${target}.${c}`).join(", ")}) IS DISTINCT FROM (${compared.map((c) => `excluded.${c}`).join(", ")})`
    : `${target}.row_hash <> excluded.row_hash`;
  return { set, changed };
}

export interface MergeCounts {
  inserted: number;
  updated: number;
  unchanged: number;
}

/** Counts of an upsert whose RETURNING gave (xmax = 0) AS inserted into `changed`; the rest of `accepted` is unchanged. */
export async function countChanges(client: pg.PoolClient, accepted: number): Promise<MergeCounts> {
  const r = await client.query<{ inserted: number; updated: number }>(
    `SELECT count(*) FILTER (WHERE inserted)::int AS inserted, count(*) FILTER (WHERE NOT inserted)::int AS updated FROM changed`,
  );
  const { inserted, updated } = r.rows[0];
  return { inserted, updated, unchanged: accepted - inserted - updated };
}

export async function acceptedCount(client: pg.PoolClient): Promise<number> {
  const r = await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM stg WHERE reject_code IS NULL`);
  return r.rows[0].n;
}

export async function createChanged(client: pg.PoolClient): Promise<void> {
  await client.query(`CREATE TEMP TABLE changed (key bigint PRIMARY KEY, inserted boolean NOT NULL) ON COMMIT DROP`);
}
