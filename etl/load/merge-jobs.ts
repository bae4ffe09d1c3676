import type pg from "pg";
import { checkHourReadings } from "./hour-checks.js";
import { rejudgeLaterReadings } from "./rejudge-readings.js";
import { anyNotableLine, rejectDuplicates, rejectUnknownMachines, updateClause, type MergeCounts } from "./merge-common.js";

/**
 * Repair-order lines, merged in two steps so that reading the file and writing the warehouse overlap:
 *
 * 1. jobsBlock — while the loader reads on, each block of staged rows is merged straight into
 *    fact_repair_line (new lines inserted with their fault codes; changed lines updated, the trigger of
 *    migration 0041 keeping the prior version in fact_repair_line_history). Only rows that passed the row
 *    checks and name a known machine take part; the first copy of a key within the block stands for the others.
 * 2. finishJobs — once every row is staged, the checks that need the whole file run exactly as they would
 *    before any merge (duplicates within the file, hour meters against the warehouse's other readings;
 *    this file's own lines are excluded from "the warehouse" by key). Lines that these checks reject and
 *    that step 1 had already written are put back as they were (deleted if new, restored from history if
 *    updated). Then the fault codes of updated lines, the dimensions the file names, each line's
 *    hour-meter verdict and the counts.
 *
 * The result is the same as checking the whole file first and merging afterwards; most files have no
 * line to put back, so the merge costs little more than the inserts themselves.
 */

const FACT_COLS = [
  "repair_line_key", "shop_key", "ro_number", "line_no", "machine_key", "component_key", "failure_mode_key", "technician_key",
  "part_key", "opened_date", "closed_date", "hour_meter", "meter_note", "complaint", "cause", "correction", "labor_op",
  "standard_hours", "labor_hours", "parts_cost", "labor_cost", "pay_type", "line_type", "part_number", "part_description",
  "part_qty", "supplier_lot", "part_ordered_date", "part_received_date", "back_ordered", "fault_codes_raw", "ambient_temp_c",
  "row_hash", "first_batch_id", "batch_id",
];
const UPDATABLE = FACT_COLS.filter((c) => !["repair_line_key", "shop_key", "ro_number", "line_no", "first_batch_id"].includes(c));
const FROM_STAGE: Record<string, string> = { fault_codes_raw: "c.fault_codes", first_batch_id: "$B", batch_id: "$B" };

/**
 * The DO UPDATE of a block's merge. A file without the supplier-lot column keeps a line's stored lot (and
 * the part key it is part of) while the part number stays the same: a lot belongs to one part.
 */
function jobsUpdate(kept: readonly string[]): { set: string; changed: string } {
  const special: Record<string, string> = {};
  if (kept.includes("supplier_lot") && !kept.includes("part_number")) {
    const same = "excluded.part_number IS NOT DISTINCT FROM f.part_number";
    special.supplier_lot = `CASE WHEN ${same} THEN f.supplier_lot ELSE excluded.supplier_lot END`;
    special.part_key = `CASE WHEN ${same} THEN f.part_key ELSE excluded.part_key END`;
  }
  // a kept close date that the file's open date now comes after cannot stand (a line closes after it opens)
  if (kept.includes("closed_date")) special.closed_date = "CASE WHEN f.closed_date >= excluded.opened_date THEN f.closed_date END";
  return updateClause("f", UPDATABLE, kept.filter((c) => c !== "closed_date"), special);
}

/** Fault-code rows ("spn:fmi:count;…") of the lines in `source` (an SQL relation with repair_line_key and fault_codes). */
const faultCodeInsert = (source: string) =>
  `INSERT INTO fact_fault_code (repair_line_key, spn, fmi, occurrences)
   SELECT f.repair_line_key, split_part(item, ':', 1)::integer, split_part(item, ':', 2)::smallint, sum(split_part(item, ':', 3)::integer)
   FROM (${source}) f, unnest(string_to_array(f.fault_codes, ';')) AS item
   WHERE f.fault_codes IS NOT NULL
   GROUP BY 1, 2, 3`;

const int = (n: number) => {
  if (!Number.isSafeInteger(n)) throw new Error(`not an integer: ${n}`);
  return String(n);
};

/** What the loader learnt about the file while staging it. */
export interface FileFacts {
  /** false when no natural key can have come twice (see KeySeenFilter) */
  mayRepeatKeys: boolean;
  /** the shops, technicians and parts its rows name (first sighting of each), or null when too many to keep */
  members: DimensionMembers | null;
  /** whether a row that passed the row checks notes a meter change */
  meterChanges: boolean;
  /** warehouse columns the file's header lacks: kept as stored on the rows it updates (etl/load/kept-columns.ts) */
  kept: string[];
}

export interface DimensionMembers {
  /** machine keys the accepted rows name */
  machines: string[];
  shops: { key: string; code: string }[];
  technicians: { key: string; shopKey: string; techId: string }[];
  parts: { key: string; number: string; lot: string; description: string | null }[];
}

export interface BlockTally {
  inserted: number;
  updated: number;
}

/** Staging columns a block carries into the fact (all but the raw row and reject columns). */
const BLOCK_COLS = [
  "row_no", ...FACT_COLS.filter((c) => !["fault_codes_raw", "first_batch_id", "batch_id"].includes(c)), "fault_codes",
];

/** Step 1 for staged rows first..last (row numbers); returns how many lines it inserted and updated. */
export async function jobsBlock(
  client: pg.PoolClient, batchId: number, first: number, last: number, repeats = true, kept: readonly string[] = [],
): Promise<BlockTally> {
  const B = int(batchId);
  const candidates = `FROM stg s
      WHERE s.row_no BETWEEN ${int(first)} AND ${int(last)} AND s.reject_code IS NULL
        AND EXISTS (SELECT 1 FROM dim_machine m WHERE m.machine_key = s.machine_key)`;
  const cols = BLOCK_COLS.map((c) => `s.${c}`).join(", ");
  // with a key repeated in the block, the first copy of each is copied once into blk; otherwise the
  // block's rows are read straight from stg
  const src = repeats ? "blk c" : `(SELECT ${cols} ${candidates}) c`;
  const values = FACT_COLS.map((c) => (FROM_STAGE[c] ?? `c.${c}`).replace("$B", B)).join(", ");
  const update = jobsUpdate(kept);
  // One round trip, in the load's transaction. A changed line's prior version goes to history through the
  // trigger fact_repair_line_keep_history (migration 0041), which costs nothing for new lines. Fault codes
  // are written here for new lines; those of updated lines are replaced in finishJobs.
  const script = `
    ${repeats ? `TRUNCATE blk; INSERT INTO blk SELECT DISTINCT ON (s.repair_line_key) ${cols} ${candidates} ORDER BY s.repair_line_key, s.row_no;` : ""}
    WITH up AS (
      INSERT INTO fact_repair_line AS f (${FACT_COLS.join(", ")})
      SELECT ${values} FROM ${src}
      ON CONFLICT (repair_line_key) DO UPDATE SET ${update.set}
      WHERE ${update.changed}
      RETURNING f.repair_line_key, (xmax = 0) AS inserted, f.fault_codes_raw
    ), codes AS (
      ${faultCodeInsert(`SELECT repair_line_key, fault_codes_raw AS fault_codes FROM up WHERE inserted`)}
    )
    SELECT count(*) FILTER (WHERE inserted)::int AS inserted, count(*) FILTER (WHERE NOT inserted)::int AS updated FROM up;
  `;
  const results = (await client.query(script)) as unknown as pg.QueryResult<BlockTally> | pg.QueryResult<BlockTally>[];
  const tally = (Array.isArray(results) ? results[results.length - 1] : results).rows[0];
  return { inserted: tally.inserted, updated: tally.updated };
}

/** Created once per load, before the first block. */
export async function prepareJobs(client: pg.PoolClient): Promise<void> {
  await client.query(`CREATE TEMP TABLE blk ON COMMIT DROP AS SELECT ${BLOCK_COLS.join(", ")} FROM stg WITH NO DATA`);
}

/**
 * Puts back the lines that step 1 wrote but the whole-file checks rejected: keys of rejected rows with no
 * accepted copy left. New lines are deleted (their fault codes and history go with them); updated lines get
 * their version from before this batch back, with its fault codes. Returns how many lines it put back.
 */
async function putBack(client: pg.PoolClient, batchId: number): Promise<number> {
  await client.query(`CREATE TEMP TABLE IF NOT EXISTS put_back (key bigint PRIMARY KEY, was_new boolean NOT NULL) ON COMMIT DROP`);
  await client.query(`TRUNCATE put_back`);
  await client.query(
    `INSERT INTO put_back
     SELECT DISTINCT f.repair_line_key AS key, f.first_batch_id = $1 AS was_new
     FROM stg s JOIN fact_repair_line f ON f.repair_line_key = s.repair_line_key
     WHERE s.reject_code IS NOT NULL AND s.repair_line_key IS NOT NULL AND f.batch_id = $1
       AND NOT EXISTS (SELECT 1 FROM stg a WHERE a.repair_line_key = s.repair_line_key AND a.reject_code IS NULL)`,
    [batchId],
  );
  const n = (await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM put_back`)).rows[0].n;
  if (n === 0) return 0;
  await client.query(`DELETE FROM fact_repair_line f USING put_back p WHERE f.repair_line_key = p.key AND p.was_new`);
  // putting a line back is not a change of its own: the history trigger stands aside
  await client.query(`SET LOCAL ironledger.restoring_lines = 'on'`);
  await client.query(
    `UPDATE fact_repair_line f SET ${UPDATABLE.map((c) => `${c} = r.${c}`).join(", ")}
     FROM put_back p,
       LATERAL (SELECT h.prior_row FROM fact_repair_line_history h
                WHERE h.repair_line_key = p.key AND h.replaced_by_batch = $1 ORDER BY h.history_id LIMIT 1) h,
       LATERAL jsonb_populate_record(NULL::fact_repair_line, h.prior_row) r
     WHERE f.repair_line_key = p.key AND NOT p.was_new`,
    [batchId],
  );
  await client.query(`SET LOCAL ironledger.restoring_lines = 'off'`);
  await client.query(
    `DELETE FROM fact_repair_line_history h USING put_back p WHERE h.repair_line_key = p.key AND h.replaced_by_batch = $1`,
    [batchId],
  );
  await client.query(`DELETE FROM fact_fault_code d USING put_back p WHERE d.repair_line_key = p.key AND NOT p.was_new`);
  await client.query(
    faultCodeInsert(
      `SELECT f.repair_line_key, f.fault_codes_raw AS fault_codes FROM fact_repair_line f JOIN put_back p ON p.key = f.repair_line_key WHERE NOT p.was_new`,
    ),
  );
  return n;
}

/** Step 2: whole-file checks, putting back what they reject, dimensions, hour-meter verdicts, counts. */
export async function finishJobs(client: pg.PoolClient, batchId: number, blocks: BlockTally, file: FileFacts): Promise<MergeCounts> {
  // the loader's filter knows when no key came twice: then there is nothing for the duplicate check to find
  const duplicates = file.mayRepeatKeys
    ? await rejectDuplicates(client, ["shop_code", "ro_number", "line_no"], "shop %s repair order %s line %s", "repair_line_key")
    : 0;
  // when the loader's list of the file's machines is complete and all are known, no row can name an unknown one
  const allKnown =
    file.members !== null &&
    (
      await client.query<{ n: number }>(
        `SELECT count(*)::int AS n FROM unnest($1::bigint[]) AS k WHERE NOT EXISTS (SELECT 1 FROM dim_machine m WHERE m.machine_key = k)`,
        [file.members.machines],
      )
    ).rows[0].n === 0;
  const unknown = allKnown ? 0 : await rejectUnknownMachines(client, true);
  // before the hour checks, so that they see the warehouse's own version of a line the file contradicts
  let putBackCount = duplicates + unknown > 0 ? await putBack(client, batchId) : 0;
  const acceptedBeforeHours = (await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM stg WHERE reject_code IS NULL`)).rows[0].n;
  // An RO reading's key is its line's key, so the file's own lines (already merged) are not counted twice.
  // A line of the file stored under an earlier batch is one it leaves unchanged; when every accepted line
  // was inserted or updated, there is none, and the warehouse's readings need no matching against the file.
  const backwards = await checkHourReadings(client, {
    dateCol: "opened_date",
    hoursCol: "hour_meter",
    precomputed: { machineKey: "machine_key", readingKey: "repair_line_key" },
    batchId,
    onlyNotable: true,
    fileMeterChanges: file.meterChanges,
    machineKeys: file.members?.machines,
    noneStoredBefore: putBackCount === 0 && blocks.inserted + blocks.updated === acceptedBeforeHours,
  });
  if (backwards > 0) putBackCount += await putBack(client, batchId);

  // fault codes of the lines this file updated (the ones with a history row of this batch): replaced whole
  await client.query(
    `CREATE TEMP TABLE updated_lines ON COMMIT DROP AS
     SELECT DISTINCT repair_line_key AS key FROM fact_repair_line_history WHERE replaced_by_batch = $1`,
    [batchId],
  );
  await client.query(`DELETE FROM fact_fault_code d USING updated_lines u WHERE d.repair_line_key = u.key`);
  await client.query(
    faultCodeInsert(
      `SELECT f.repair_line_key, f.fault_codes_raw AS fault_codes FROM fact_repair_line f JOIN updated_lines u ON u.key = f.repair_line_key`,
    ),
  );

  // Shops, technicians and parts the file names (rows that passed the row checks; a line rejected later may
  // leave its technician or part behind: they exist all the same). The loader collected them as it went.
  if (file.members) {
    const m = file.members;
    await client.query(
      `INSERT INTO dim_shop (shop_key, shop_code, name) SELECT k, c, c FROM unnest($1::bigint[], $2::text[]) AS t(k, c) WHERE c <> ''
       ON CONFLICT DO NOTHING`,
      [m.shops.map((x) => x.key), m.shops.map((x) => x.code)],
    );
    await client.query(
      `INSERT INTO dim_technician (technician_key, shop_key, tech_id, display_name)
       SELECT k, s, t, t FROM unnest($1::bigint[], $2::bigint[], $3::text[]) AS x(k, s, t) ON CONFLICT (technician_key) DO NOTHING`,
      [m.technicians.map((x) => x.key), m.technicians.map((x) => x.shopKey), m.technicians.map((x) => x.techId)],
    );
    await client.query(
      `INSERT INTO dim_part (part_key, part_number, supplier_lot, description)
       SELECT k, n, l, d FROM unnest($1::bigint[], $2::text[], $3::text[], $4::text[]) AS x(k, n, l, d) ON CONFLICT (part_key) DO NOTHING`,
      [m.parts.map((x) => x.key), m.parts.map((x) => x.number), m.parts.map((x) => x.lot), m.parts.map((x) => x.description)],
    );
  } else {
    await client.query(
      `WITH d AS MATERIALIZED (
         SELECT GROUPING(shop_key) AS by_shop, GROUPING(technician_key) AS by_tech, GROUPING(part_key) AS by_part,
                  shop_key, technician_key, part_key, min(shop_code) AS shop_code, min(shop_key) AS tech_shop_key, min(tech_id) AS tech_id,
                  min(part_number) AS part_number, COALESCE(min(supplier_lot), '') AS supplier_lot,
                (array_agg(part_description ORDER BY row_no))[1] AS part_description
         FROM stg WHERE repair_line_key IS NOT NULL
         GROUP BY GROUPING SETS ((shop_key), (technician_key), (part_key))
       ), shops AS (
         INSERT INTO dim_shop (shop_key, shop_code, name)
         SELECT shop_key, shop_code, shop_code FROM d WHERE by_shop = 0 AND shop_key IS NOT NULL AND shop_code <> ''
         ON CONFLICT DO NOTHING
       ), techs AS (
         INSERT INTO dim_technician (technician_key, shop_key, tech_id, display_name)
         SELECT technician_key, tech_shop_key, tech_id, tech_id FROM d WHERE by_tech = 0 AND technician_key IS NOT NULL
         ON CONFLICT (technician_key) DO NOTHING
       )
       INSERT INTO dim_part (part_key, part_number, supplier_lot, description)
       SELECT part_key, part_number, supplier_lot, part_description FROM d WHERE by_part = 0 AND part_key IS NOT NULL
       ON CONFLICT (part_key) DO NOTHING`,
    );
  }

  // The checks' verdict on each line's reading. A line is written with the usual verdict (generation 0,
  // valid); hr_out holds only the readings judged otherwise. So: lines with an unusual verdict get it, and
  // lines of this file stored with an unusual verdict that no longer holds get the usual one back (the
  // partial index fact_repair_line_notable_reading_idx finds those without reading every line).
  await client.query(
    `UPDATE fact_repair_line f SET meter_generation = h.generation, hour_valid = h.valid, hour_invalid_reason = h.invalid_reason
     FROM hr_out h
     WHERE f.repair_line_key = h.rk
       AND (f.meter_generation, f.hour_valid, f.hour_invalid_reason) IS DISTINCT FROM (h.generation, h.valid, h.invalid_reason)`,
  );
  const stale = `SELECT f.repair_line_key AS key FROM fact_repair_line f
     WHERE (f.meter_generation <> 0 OR NOT f.hour_valid) AND NOT EXISTS (SELECT 1 FROM hr_out h WHERE h.rk = f.repair_line_key)`;
  if (await anyNotableLine(client, stale)) {
    await client.query(
      `WITH stale AS MATERIALIZED (${stale})
       UPDATE fact_repair_line f SET meter_generation = 0, hour_valid = true, hour_invalid_reason = NULL
       FROM (SELECT DISTINCT t.key FROM stale t JOIN stg s ON s.repair_line_key = t.key WHERE s.reject_code IS NULL) x
       WHERE f.repair_line_key = x.key`,
    );
  }

  // stored readings after a reading of this file that arrives late are judged again
  await rejudgeLaterReadings(client, batchId, `SELECT machine_key, opened_date AS d, repair_line_key AS k FROM stg WHERE reject_code IS NULL AND hour_meter IS NOT NULL`);

  const accepted = acceptedBeforeHours - backwards;
  let { inserted, updated } = blocks;
  if (putBackCount > 0) {
    // lines were put back: count from the warehouse itself
    const r = await client.query<BlockTally>(
      `SELECT count(*) FILTER (WHERE f.first_batch_id = $1)::int AS inserted,
              count(*) FILTER (WHERE f.first_batch_id <> $1 AND f.batch_id = $1)::int AS updated
       FROM stg s JOIN fact_repair_line f ON f.repair_line_key = s.repair_line_key WHERE s.reject_code IS NULL`,
      [batchId],
    );
    ({ inserted, updated } = r.rows[0]);
  }
  return { inserted, updated, unchanged: accepted - inserted - updated };
}
