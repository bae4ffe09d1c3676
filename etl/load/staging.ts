import type pg from "pg";
// A namespace import: the boundary checker misreads "import { from as … }".
import * as copyStreams from "pg-copy-streams";
import type { ExportKind } from "../profiles/profile-schema.js";

/**
 * Staging columns per kind, after the shared row_no/raw/reject columns; names match the transforms' records.
 * Each row also gets row_hash (over these values) and the kind's key columns, see stagedColumns.
 */
export const stageColumns: Record<ExportKind, [string, string][]> = {
  machines: [
    ["serial", "text"], ["model_code", "text"], ["model_line", "text"], ["engine_family", "text"], ["cold_start_aid", "text"],
    ["engine_serial", "text"], ["build_date", "date"], ["delivery_date", "date"], ["delivery_hours", "numeric"],
    ["home_shop", "text"], ["heater_plug_lot", "text"], ["block_heater_fitted", "boolean"], ["block_heater_date", "date"],
    ["warranty_base_months", "smallint"], ["warranty_base_hours", "integer"], ["warranty_engine_months", "smallint"],
    ["warranty_engine_hours", "integer"], ["home_shop_since", "date"],
  ],
  jobs: [
    ["shop_code", "text"], ["ro_number", "text"], ["line_no", "integer"], ["serial", "text"], ["opened_date", "date"],
    ["closed_date", "date"], ["hour_meter", "numeric"], ["meter_change", "boolean"], ["meter_note", "text"], ["complaint", "text"],
    ["cause", "text"], ["correction", "text"], ["component_code", "text"], ["failure_mode", "text"], ["labor_op", "text"],
    ["standard_hours", "numeric"], ["labor_hours", "numeric"], ["parts_cost", "numeric"], ["labor_cost", "numeric"],
    ["pay_type", "text"], ["line_type", "text"], ["tech_id", "text"], ["part_number", "text"], ["part_description", "text"],
    ["part_qty", "numeric"], ["supplier_lot", "text"], ["part_ordered_date", "date"], ["part_received_date", "date"],
    ["back_ordered", "boolean"], ["fault_codes", "text"], ["ambient_temp_c", "numeric"],
  ],
  measurements: [
    ["shop_code", "text"], ["ro_number", "text"], ["line_no", "integer"], ["kind", "text"], ["position", "smallint"],
    ["attempt", "smallint"], ["value", "numeric"], ["unit", "text"], ["over_range", "boolean"], ["raw_value", "text"],
    ["raw_unit", "text"], ["conversion_rule", "text"],
  ],
  weather: [["shop_code", "text"], ["date", "date"], ["tmin_c", "numeric"], ["tmax_c", "numeric"], ["source_unit", "text"]],
  hours: [
    ["serial", "text"], ["reading_date", "date"], ["hours", "numeric"], ["source", "text"], ["meter_change", "boolean"],
    ["meter_note", "text"],
  ],
};

/**
 * Surrogate-key columns the loader computes (etl/load/keys.ts) and stages after the kind's columns, so
 * the merges need neither joins nor hashing. Kinds without an entry stage none.
 */
export const keyColumns: Partial<Record<ExportKind, readonly string[]>> = {
  jobs: ["repair_line_key", "shop_key", "machine_key", "component_key", "failure_mode_key", "technician_key", "part_key"],
};

/**
 * Kinds whose rows are staged with the load's "today" (LoadFileOptions.today) as the column load_date, after
 * the keys and outside the content hash (it says when the row was loaded, not what it says): the machines
 * merge dates a move of home shop by it when the row gives no home_shop_since.
 */
export const stagesLoadDate: ReadonlySet<ExportKind> = new Set<ExportKind>(["machines"]);

/** Every staged column of a kind after row_no/raw/reject: the record's, its content hash, the keys, then load_date. */
export function stagedColumns(kind: ExportKind): [string, string][] {
  return [
    ...stageColumns[kind], ["row_hash", "text"], ...(keyColumns[kind] ?? []).map((k): [string, string] => [k, "bigint"]),
    ...(stagesLoadDate.has(kind) ? [["load_date", "date"] as [string, string]] : []),
  ];
}

/**
 * The staging table of one load. An unlogged table (never WAL-logged, like a temp table) that a connection
 * of its own fills, block by block, with COPY in autocommit, so the database can COPY one block while the
 * load's transaction merges the one before; the transaction sees it as the temp view `stg`. It is dropped
 * when the load ends, however it ends. Its connection holds an advisory lock on the table's name, so a load
 * can tell the table of a live load from one a killed process left behind, and drops only the latter.
 */
export class StageTable {
  private constructor(
    readonly name: string,
    readonly copyClient: pg.PoolClient,
  ) {}

  static async create(client: pg.PoolClient, copyClient: pg.PoolClient, kind: ExportKind, batchId: number): Promise<StageTable> {
    const name = `etl_stage_${Math.trunc(batchId)}`;
    await sweepOrphans(copyClient);
    await copyClient.query(`SELECT pg_advisory_lock(hashtext($1))`, [name]);
    const cols = stagedColumns(kind).map(([n, t]) => `${n} ${t}`).join(", ");
    await copyClient.query(`DROP TABLE IF EXISTS ${name}`);
    await copyClient.query(`CREATE UNLOGGED TABLE ${name} (row_no integer PRIMARY KEY, raw text, reject_code text, reject_reason text, ${cols})`);
    await client.query(`DROP VIEW IF EXISTS pg_temp.stg`);
    await client.query(`CREATE TEMP VIEW stg AS SELECT * FROM ${name}`);
    return new StageTable(name, copyClient);
  }

  /** Drops the view (in the load's session) and the table; never throws. */
  async drop(client: pg.PoolClient): Promise<void> {
    await client.query(`DROP VIEW IF EXISTS pg_temp.stg`).catch(() => undefined);
    await this.copyClient.query(`DROP TABLE IF EXISTS ${this.name}`).catch(() => undefined);
    await this.copyClient.query(`SELECT pg_advisory_unlock(hashtext($1))`, [this.name]).catch(() => undefined);
  }
}

/** Staging tables whose load is gone (no session holds their lock) are dropped. */
async function sweepOrphans(c: pg.Client): Promise<void> {
  const r = await c.query<{ name: string }>(
    `SELECT relname AS name FROM pg_class WHERE relkind = 'r' AND relname ~ '^etl_stage_[0-9]+$' AND relnamespace = current_schema()::regnamespace`,
  );
  for (const { name } of r.rows) {
    const got = await c.query<{ ok: boolean }>(`SELECT pg_try_advisory_lock(hashtext($1)) AS ok`, [name]);
    if (!got.rows[0].ok) continue;
    await c.query(`DROP TABLE IF EXISTS ${name}`);
    await c.query(`SELECT pg_advisory_unlock(hashtext($1))`, [name]);
  }
}

/** PostgreSQL COPY text format: \N for null, backslash escapes for the separators. */
export function copyValue(v: unknown): string {
  if (v === null || v === undefined) return "\\N";
  if (typeof v !== "string") return String(v); // numbers and booleans never need escaping
  return /[\\\t\n\r]/.test(v) ? v.replace(/\\/g, "\\\\").replace(/\t/g, "\\t").replace(/\n/g, "\\n").replace(/\r/g, "\\r") : v;
}

/**
 * Feeds staging rows to PostgreSQL in blocks of `blockRows` rows. Each block is one COPY into the
 * staging table on its own connection, then `afterBlock(firstRowNo, lastRowNo, sealed)` (the kind's
 * per-block merge, or nothing) on the load's. While block k is merged, block k+1 is COPYed and the caller
 * prepares block k+2, so reading, COPY and merging overlap; at most two blocks are held in memory, so
 * memory stays flat however long the file is.
 *
 *   const w = pipe.write(rowNo, line); if (w) await w;   // a promise only when the caller must wait
 *   await pipe.end();
 */
export class StagePipeline {
  /** the block's text, joined every few hundred lines: a few large strings are cheap to keep, many small ones are not */
  private pieces: string[] = [];
  private lines: string[] = [];
  private rows = 0;
  private first = -1;
  private last = -1;
  /** COPYs run one after another on the staging connection, merges one after another on the load's */
  private copies: Promise<void> = Promise.resolve();
  private merges: Promise<void> = Promise.resolve();
  private inFlight = 0;
  private failure: unknown = null;
  readonly copySql: string;

  constructor(
    private readonly stage: StageTable,
    kind: ExportKind,
    private readonly blockRows: number,
    private readonly afterBlock: (first: number, last: number, sealed: unknown) => Promise<void>,
    /** called as a block is sealed (synchronously, before the next row is staged); its result goes to afterBlock */
    private readonly onSeal: () => unknown = () => undefined,
  ) {
    const cols = ["row_no", "raw", "reject_code", "reject_reason", ...stagedColumns(kind).map(([n]) => n)].join(", ");
    this.copySql = `COPY ${stage.name} (${cols}) FROM STDIN`;
  }

  write(rowNo: number, line: string): Promise<void> | undefined {
    if (this.failure) throw this.failure;
    if (this.first < 0) this.first = rowNo;
    this.last = rowNo;
    this.lines.push(line);
    this.rows++;
    if (this.lines.length >= 512) {
      this.pieces.push(this.lines.join(""));
      this.lines = [];
    }
    if (this.rows >= this.blockRows) return this.seal();
    return undefined;
  }

  /** Hands the block over; waits only when the block before it is not merged yet. */
  private seal(): Promise<void> | undefined {
    if (this.lines.length) this.pieces.push(this.lines.join(""));
    const pieces = this.pieces;
    const [first, last] = [this.first, this.last];
    const sealed = this.onSeal();
    this.pieces = [];
    this.lines = [];
    this.rows = 0;
    this.first = -1;
    const waitFor = this.inFlight > 0 ? this.merges : undefined;
    this.inFlight++;
    const sealedAt = Date.now();
    let copiedAt = 0;
    const copied = this.copies.then(async () => {
      const t0 = Date.now();
      await this.copy(pieces);
      copiedAt = Date.now();
      if (process.env.ETL_TIMINGS) process.stderr.write(`block ${first}–${last}: COPY ${copiedAt - t0} ms, ${t0 - sealedAt} ms after it was sealed\n`);
    });
    this.copies = copied.catch((e: unknown) => {
      this.failure ??= e;
    });
    this.merges = Promise.all([this.merges, copied])
      .then(async () => {
        if (this.failure) return;
        const t1 = Date.now();
        await this.afterBlock(first, last, sealed);
        if (process.env.ETL_TIMINGS) process.stderr.write(`block ${first}–${last}: merge ${Date.now() - t1} ms, ${t1 - copiedAt} ms after its COPY\n`);
      })
      .catch((e: unknown) => {
        this.failure ??= e;
      })
      .finally(() => {
        this.inFlight--;
      });
    return waitFor;
  }

  private async copy(pieces: string[]): Promise<void> {
    if (this.failure) return;
    const stream = this.stage.copyClient.query(copyStreams.from(this.copySql));
    const done = new Promise<void>((resolve, reject) => {
      stream.on("finish", resolve);
      stream.on("error", reject);
    });
    done.catch(() => undefined);
    // The block is in memory already: hand it to the socket as ONE write. The COPY stream writes piece by
    // piece and waits for the socket to drain in between, and each wait needs the reader, busy parsing the
    // next block, to yield; a single write is pushed by the event loop alone, as fast as the server reads.
    stream.write(pieces.join(""));
    stream.end();
    await done;
  }

  /** Sends the last block and waits for every block; rethrows the first database error. */
  async end(): Promise<void> {
    if (this.rows) void this.seal();
    await this.copies;
    await this.merges;
    if (this.failure) throw this.failure;
  }

  /** Waits for the blocks already handed over, without sending the one being filled (used on errors). */
  async settle(): Promise<void> {
    await this.copies;
    await this.merges;
  }
}
