import { once } from "node:events";
import type pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import type { ExportKind } from "../profiles/profile-schema.js";

/** Staging columns per kind, after the shared row_no/raw/reject columns; names match the transforms' records. */
export const stageColumns: Record<ExportKind, [string, string][]> = {
  machines: [
    ["serial", "text"], ["model_code", "text"], ["model_line", "text"], ["engine_family", "text"], ["cold_start_aid", "text"],
    ["engine_serial", "text"], ["build_date", "date"], ["delivery_date", "date"], ["delivery_hours", "numeric"],
    ["home_shop", "text"], ["heater_plug_lot", "text"], ["block_heater_fitted", "boolean"], ["block_heater_date", "date"],
    ["warranty_base_months", "smallint"], ["warranty_base_hours", "integer"], ["warranty_engine_months", "smallint"],
    ["warranty_engine_hours", "integer"], ["row_hash", "text"],
  ],
  jobs: [
    ["shop_code", "text"], ["ro_number", "text"], ["line_no", "integer"], ["serial", "text"], ["opened_date", "date"],
    ["closed_date", "date"], ["hour_meter", "numeric"], ["meter_change", "boolean"], ["meter_note", "text"], ["complaint", "text"],
    ["cause", "text"], ["correction", "text"], ["component_code", "text"], ["failure_mode", "text"], ["labor_op", "text"],
    ["standard_hours", "numeric"], ["labor_hours", "numeric"], ["parts_cost", "numeric"], ["labor_cost", "numeric"],
    ["pay_type", "text"], ["line_type", "text"], ["tech_id", "text"], ["part_number", "text"], ["part_description", "text"],
    ["part_qty", "numeric"], ["supplier_lot", "text"], ["part_ordered_date", "date"], ["part_received_date", "date"],
    ["back_ordered", "boolean"], ["fault_codes", "text"], ["ambient_temp_c", "numeric"], ["row_hash", "text"],
  ],
  measurements: [
    ["shop_code", "text"], ["ro_number", "text"], ["line_no", "integer"], ["kind", "text"], ["position", "smallint"],
    ["attempt", "smallint"], ["value", "numeric"], ["unit", "text"], ["over_range", "boolean"], ["raw_value", "text"],
    ["raw_unit", "text"], ["conversion_rule", "text"], ["row_hash", "text"],
  ],
  weather: [["shop_code", "text"], ["date", "date"], ["tmin_c", "numeric"], ["tmax_c", "numeric"], ["source_unit", "text"], ["row_hash", "text"]],
  hours: [
    ["serial", "text"], ["reading_date", "date"], ["hours", "numeric"], ["source", "text"], ["meter_change", "boolean"],
    ["meter_note", "text"], ["row_hash", "text"],
  ],
};

export async function createStage(client: pg.PoolClient, kind: ExportKind): Promise<void> {
  const cols = stageColumns[kind].map(([n, t]) => `${n} ${t}`).join(", ");
  await client.query(
    `CREATE TEMP TABLE stg (row_no integer PRIMARY KEY, raw text NOT NULL, reject_code text, reject_reason text, ${cols}) ON COMMIT DROP`,
  );
}

/** PostgreSQL COPY text format: \N for null, backslash escapes for the separators. */
function copyValue(v: unknown): string {
  if (v === null || v === undefined) return "\\N";
  const s = typeof v === "string" ? v : String(v);
  return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, "\\\\").replace(/\t/g, "\\t").replace(/\n/g, "\\n").replace(/\r/g, "\\r") : s;
}

export interface StageRow {
  rowNo: number;
  /** the raw fields as a JSON array */
  raw: string;
  reject?: { code: string; reason: string };
  record?: Record<string, unknown>;
}

/**
 * A COPY … FROM STDIN writer into stg. Rows are buffered into ~256 KB chunks and written with
 * backpressure, so the file streams through without piling up in memory.
 */
export class StageWriter {
  private buf: string[] = [];
  private size = 0;
  private readonly names: string[];
  private readonly stream: ReturnType<typeof copyFrom>;
  private failed: Error | null = null;
  private readonly done: Promise<void>;

  constructor(client: pg.PoolClient, kind: ExportKind) {
    this.names = stageColumns[kind].map(([n]) => n);
    const cols = ["row_no", "raw", "reject_code", "reject_reason", ...this.names].join(", ");
    this.stream = client.query(copyFrom(`COPY stg (${cols}) FROM STDIN`));
    this.done = new Promise((resolve, reject) => {
      this.stream.on("finish", resolve);
      this.stream.on("error", (e) => {
        this.failed = e;
        reject(e);
      });
    });
    this.done.catch(() => undefined);
  }

  async write(row: StageRow): Promise<void> {
    const parts = [String(row.rowNo), copyValue(row.raw), copyValue(row.reject?.code), copyValue(row.reject?.reason)];
    const rec = row.record;
    for (const n of this.names) parts.push(rec ? copyValue(rec[n]) : "\\N");
    const line = parts.join("\t") + "\n";
    this.buf.push(line);
    this.size += line.length;
    if (this.size >= 1 << 18) await this.flush();
  }

  private async flush(): Promise<void> {
    if (this.failed) throw this.failed;
    if (this.buf.length === 0) return;
    const chunk = this.buf.join("");
    this.buf = [];
    this.size = 0;
    if (!this.stream.write(chunk)) await Promise.race([once(this.stream, "drain"), this.done]);
  }

  async end(): Promise<void> {
    await this.flush();
    this.stream.end();
    await this.done;
  }
}
