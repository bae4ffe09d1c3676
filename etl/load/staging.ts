import { once } from "node:events";
import type pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
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
    ["warranty_engine_hours", "integer"],
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

/** Every staged column of a kind after row_no/raw/reject: the record's, its content hash, then the keys. */
export function stagedColumns(kind: ExportKind): [string, string][] {
  return [...stageColumns[kind], ["row_hash", "text"], ...(keyColumns[kind] ?? []).map((k): [string, string] => [k, "bigint"])];
}

export async function createStage(client: pg.PoolClient, kind: ExportKind): Promise<void> {
  const cols = stagedColumns(kind).map(([n, t]) => `${n} ${t}`).join(", ");
  await client.query(
    `CREATE TEMP TABLE stg (row_no integer PRIMARY KEY, raw text, reject_code text, reject_reason text, ${cols}) ON COMMIT DROP`,
  );
}

/** PostgreSQL COPY text format: \N for null, backslash escapes for the separators. */
export function copyValue(v: unknown): string {
  if (v === null || v === undefined) return "\\N";
  if (typeof v !== "string") return String(v); // numbers and booleans never need escaping
  return /[\\\t\n\r]/.test(v) ? v.replace(/\\/g, "\\\\").replace(/\t/g, "\\t").replace(/\n/g, "\\n").replace(/\r/g, "\\r") : v;
}

/**
 * Feeds staging rows to PostgreSQL in blocks of `blockRows` rows. Each block is one COPY into stg,
 * followed by `afterBlock(firstRowNo, lastRowNo)` (the kind's per-block merge, or nothing). While the
 * database works on one block the caller goes on preparing the next, so reading and merging overlap;
 * at most one block waits in memory, so memory stays flat however long the file is.
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
  private queue: Promise<void> = Promise.resolve();
  private queued = 0;
  private failure: unknown = null;
  readonly copySql: string;

  constructor(
    private readonly client: pg.PoolClient,
    kind: ExportKind,
    private readonly blockRows: number,
    private readonly afterBlock: (first: number, last: number, sealed: unknown) => Promise<void>,
    /** called as a block is sealed (synchronously, before the next row is staged); its result goes to afterBlock */
    private readonly onSeal: () => unknown = () => undefined,
  ) {
    const cols = ["row_no", "raw", "reject_code", "reject_reason", ...stagedColumns(kind).map(([n]) => n)].join(", ");
    this.copySql = `COPY stg (${cols}) FROM STDIN`;
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

  /** Hands the block to the database; waits only when the block before it is still being worked on. */
  private seal(): Promise<void> | undefined {
    if (this.lines.length) this.pieces.push(this.lines.join(""));
    const pieces = this.pieces;
    const [first, last] = [this.first, this.last];
    const sealed = this.onSeal();
    this.pieces = [];
    this.lines = [];
    this.rows = 0;
    this.first = -1;
    const waitFor = this.queued > 0 ? this.queue : undefined;
    this.queued++;
    this.queue = this.queue
      .then(async () => {
        await this.copy(pieces);
        await this.afterBlock(first, last, sealed);
      })
      .catch((e: unknown) => {
        this.failure ??= e;
      })
      .finally(() => {
        this.queued--;
      });
    return waitFor;
  }

  private async copy(pieces: string[]): Promise<void> {
    if (this.failure) return;
    const stream = this.client.query(copyFrom(this.copySql));
    const done = new Promise<void>((resolve, reject) => {
      stream.on("finish", resolve);
      stream.on("error", reject);
    });
    done.catch(() => undefined);
    for (const piece of pieces) {
      if (!stream.write(piece)) await Promise.race([once(stream, "drain"), done]);
    }
    stream.end();
    await done;
  }

  /** Sends the last block and waits for every block; rethrows the first database error. */
  async end(): Promise<void> {
    if (this.rows) void this.seal();
    await this.queue;
    if (this.failure) throw this.failure;
  }

  /** Waits for the blocks already handed over, without sending the one being filled (used on errors). */
  async settle(): Promise<void> {
    await this.queue;
  }
}
