import { hash } from "node:crypto";
import { layouts } from "../layouts.js";
import type { ExportKind, Profile } from "../profiles/profile-schema.js";
import { mapHeader } from "../profiles/registry.js";
import { SUSPECT_CHARACTER, type CsvRecord } from "../sources/read-csv.js";
import { columnLabel, missingFields } from "../sources/row-schemas.js";
import { FieldReader } from "../transform/fields.js";
import { transformHours } from "../transform/hours.js";
import { transformJob } from "../transform/jobs.js";
import { transformMachine } from "../transform/machines.js";
import { transformMeasurement } from "../transform/measurements.js";
import { RowRejected } from "../transform/reject.js";
import { transformWeather } from "../transform/weather.js";
import { keptColumns } from "./kept-columns.js";
import { KeyCache, KeySeenFilter, whKeyWithSpare } from "./keys.js";
import type { DimensionMembers } from "./merge-jobs.js";
import { rowBuilder, stagedText } from "./row-shape.js";
import { copyValue, keyColumns, stageColumns, stagesLoadDate } from "./staging.js";

type Transform = (f: FieldReader, shop: string | undefined) => Record<string, unknown>;

const transforms = {
  machines: transformMachine,
  jobs: transformJob,
  measurements: transformMeasurement,
  weather: transformWeather,
  hours: transformHours,
} as unknown as Record<ExportKind, Transform>;

/** The canonical column that names the shop in each kind, filled from --shop or the profile when blank. */
const SHOP_COLUMN: Partial<Record<ExportKind, string>> = { machines: "home_shop", jobs: "shop_code", measurements: "shop_code", weather: "shop_code" };

const DATE_COLUMNS: Record<ExportKind, string[]> = {
  machines: ["build_date", "delivery_date", "block_heater_date"],
  jobs: ["opened_date", "closed_date", "part_ordered_date", "part_received_date"],
  measurements: [],
  weather: ["date"],
  hours: ["reading_date"],
};

/**
 * Surrogate keys the loader stages with a row, in the order of keyColumns[kind] (etl/load/staging.ts):
 * the same natural-key text as the SQL merges would hash. Written into `out`, reused row after row.
 */
type RowKeyer = (r: Record<string, unknown>, keys: KeyCache, out: (string | null)[]) => [a: number, b: number];

/** The first key is the row's own (its natural key's); the two numbers returned feed the repeat filter. */
const rowKeys: Partial<Record<ExportKind, RowKeyer>> = {
  jobs: (r, keys, out) => {
    const shop = r.shop_code as string;
    const [key, a, b] = whKeyWithSpare(`repair_line|${shop}|${r.ro_number}|${r.line_no}`);
    out[0] = key;
    out[1] = keys.of("shop", shop);
    out[2] = keys.of("machine", r.serial as string);
    out[3] = keys.of("component", r.component_code as string);
    out[4] = r.failure_mode === null ? null : keys.of("failure_mode", r.failure_mode as string);
    out[5] = r.tech_id === null ? null : keys.of("technician", shop, r.tech_id as string);
    out[6] = r.part_number === null ? null : keys.of("part", r.part_number as string, (r.supplier_lot as string | null) ?? "");
    return [a, b];
  },
};

type Reject = { code: string; reason: string };

/** Longest value of a free-text column (complaint, cause, correction, notes) and of any other column, in characters. */
export const MAX_TEXT_CHARS = 4000;
export const MAX_CODE_CHARS = 200;
const FREE_TEXT = new Set(["complaint", "cause", "correction", "meter_note", "part_description"]);

/** The header cells (by index) of free-text columns, the only ones where a line break belongs (see readCsv). */
export function freeTextColumns(profile: Profile, header: string[]): ReadonlySet<number> {
  return new Set([...mapHeader(profile, header)].filter(([c]) => FREE_TEXT.has(c)).map(([, i]) => i));
}

/** Kinds whose rows name a shop that must be registered already (a machine master may add a bare one). */
const SHOP_MUST_EXIST: Partial<Record<ExportKind, string>> = { jobs: "shop_code", measurements: "shop_code", weather: "shop_code" };

/** A control character as people can read it in a stored raw row (NUL → ␀); see rawForReject. */
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g;
const RAW_FIELD_CHARS = 1000;

/** Text with its control characters made visible (NUL → ␀, ESC → ␛): safe to store and to show. */
export function visibleText(text: string): string {
  return text.replace(CONTROL, (c) => (c === "\u007f" ? "\u2421" : String.fromCharCode(0x2400 + c.charCodeAt(0))));
}

/** A rejected row's fields as they are stored: control characters made visible, very long values cut. */
export function rawForReject(fields: string[]): string[] {
  return fields.map((f) => {
    const v = visibleText(f);
    return v.length > RAW_FIELD_CHARS ? `${v.slice(0, RAW_FIELD_CHARS)}… (${v.length.toLocaleString("en-US")} characters in all)` : v;
  });
}

/** Why a character is out of place, in words. */
function describeCharacter(c: string): string {
  if (c === "\ufffd") return "bytes that are not valid in the file's encoding (was it saved in another one?)";
  const code = c.charCodeAt(0);
  return code === 0 ? "a NUL byte (character 0)" : `a control character (code ${code})`;
}

/**
 * Turns each CSV record of a file into its staging line (COPY text): row checks, transform, content hash,
 * surrogate keys. A rejected row carries its raw fields (as a JSON array) and the reason; an accepted row
 * does not, since it is rarely needed: when a whole-file check rejects it later, the loader reads it back
 * from the file (see recoverRawRows in load-file.ts). Also tracks the range of dates the file names.
 */
export class RowStager {
  /** how many technicians and parts a load remembers before leaving them to the merge (a test seam) */
  static memberCap = 200_000;
  /** whether an accepted row notes a meter change (a replaced or reset hour meter) */
  meterChanges = false;
  minDate: string | null = null;
  maxDate: string | null = null;
  private readonly names: string[];
  /** a record's fields → its row object by canonical column; a record → its staged text (etl/load/row-shape.ts) */
  private readonly buildRow: (fields: string[]) => Record<string, string | undefined>;
  private readonly text: (record: Record<string, unknown>) => string;
  private readonly transform: Transform;
  private readonly dateCols: string[];
  private readonly shopCol: string | undefined;
  private readonly keyer: RowKeyer | undefined;
  private readonly keys = new KeyCache();
  private readonly keyValues: (string | null)[];
  /** whether a row's key may have come before in the file: in the block being filled, in the file so far */
  private readonly seen: KeySeenFilter | null;
  private blockRepeats = false;
  private fileRepeats = false;
  /** shops, technicians and parts named by accepted rows, first sighting of each (jobs only) */
  private readonly found = { machines: new Set<string>(), shops: new Map<string, string>(), technicians: new Map<string, [string, string]>(), parts: new Map<string, [string, string, string | null]>() };
  private foundOverflow = false;
  /** the staged text of a row without record: reject columns filled in, every other column \N */
  private readonly emptyTail: string;
  /** what every accepted row ends with after its keys: the load date, for kinds that stage it (outside the content hash) */
  private readonly loadTail: string;
  /** per mapped field: its index, the longest value accepted, its label */
  private readonly limits: [index: number, max: number, label: string][];
  private readonly fieldLabels: string[];
  private readonly shopMustExist: string | undefined;
  /** the warehouse columns this file cannot speak for (its header lacks them): kept as stored on updated rows */
  readonly kept: string[];
  /** lines that an open quote ran together and that were read again one by one */
  readonly mergedSpans: { first: number; last: number }[] = [];

  constructor(
    private readonly kind: ExportKind,
    private readonly profile: Profile,
    private readonly header: string[],
    private readonly shop: string | undefined,
    private readonly today: string,
    /** codes of the registered shops (null: no check) */
    private readonly knownShops: ReadonlySet<string> | null = null,
  ) {
    this.names = stageColumns[kind].map(([n]) => n);
    const colIndex = mapHeader(profile, header);
    this.limits = [...colIndex].map(([c, i]) => [i, FREE_TEXT.has(c) ? MAX_TEXT_CHARS : MAX_CODE_CHARS, `${columnLabel(c)} ("${header[i].trim()}")`]);
    this.fieldLabels = header.map((h, i) => {
      const c = [...colIndex].find(([, j]) => j === i)?.[0];
      return c ? columnLabel(c) : `column ${i + 1}${h.trim() ? ` ("${h.trim()}")` : ""}`;
    });
    this.shopMustExist = knownShops ? SHOP_MUST_EXIST[kind] : undefined;
    this.kept = keptColumns(kind, new Set(colIndex.keys()));
    this.buildRow = rowBuilder(layouts[kind], colIndex);
    this.text = stagedText(this.names);
    this.transform = transforms[kind];
    this.dateCols = DATE_COLUMNS[kind];
    this.shopCol = SHOP_COLUMN[kind];
    this.keyer = rowKeys[kind];
    this.seen = this.keyer ? new KeySeenFilter() : null;
    this.keyValues = new Array<string | null>(keyColumns[kind]?.length ?? 0).fill(null);
    this.loadTail = stagesLoadDate.has(kind) ? "\t" + copyValue(today) : "";
    this.emptyTail = new Array(this.names.length + 1 + this.keyValues.length + (this.loadTail ? 1 : 0)).fill("\\N").join("\t");
  }

  line(rec: CsvRecord): string {
    if (rec.merged) {
      const last = this.mergedSpans[this.mergedSpans.length - 1];
      if (!last || last.first !== rec.merged.first) this.mergedSpans.push({ first: rec.merged.first, last: rec.merged.last });
    }
    if (rec.error) {
      return this.rejected(
        rec,
        rec.merged ? { code: "unbalanced_quote", reason: rec.error } : { code: "unreadable_row", reason: `the row cannot be read as CSV: ${rec.error}` },
      );
    }
    if (rec.fields.length !== this.header.length) {
      return this.rejected(rec, { code: "wrong_column_count", reason: `the row has ${rec.fields.length} fields but the header has ${this.header.length}` });
    }
    if (rec.suspect) {
      for (let i = 0; i < rec.fields.length; i++) {
        const m = SUSPECT_CHARACTER.exec(rec.fields[i]);
        if (!m) continue;
        const invalid = m[0] === "\ufffd";
        return this.rejected(rec, {
          code: invalid ? "bad_encoding" : "bad_characters",
          reason: `${this.fieldLabels[i]} holds ${describeCharacter(m[0])}${invalid ? "" : ", which no export value may contain"}`,
        });
      }
    }
    for (const [i, max, label] of this.limits) {
      const n = rec.fields[i].length;
      if (n > max) {
        return this.rejected(rec, {
          code: "too_long",
          reason: `${label} is ${n.toLocaleString("en-US")} characters long; at most ${max.toLocaleString("en-US")} are accepted`,
        });
      }
    }
    const row = this.buildRow(rec.fields);
    if (this.shopCol && this.shop && !row[this.shopCol]?.trim()) row[this.shopCol] = this.shop;
    const missing = missingFields(this.kind, row);
    if (missing.length) {
      return this.rejected(rec, { code: "missing_field", reason: `required ${missing.length > 1 ? "fields are" : "field is"} blank: ${missing.map(columnLabel).join(", ")}` });
    }
    let record: Record<string, unknown>;
    try {
      record = this.transform(new FieldReader(this.profile, this.today, row), this.shop);
    } catch (e) {
      if (!(e instanceof RowRejected)) throw e;
      return this.rejected(rec, { code: e.code, reason: e.reason });
    }
    if (this.shopMustExist) {
      const code = record[this.shopMustExist] as string;
      if (!this.knownShops!.has(code)) {
        return this.rejected(rec, {
          code: "unknown_shop",
          reason: `shop "${code}" is not in the shop register; register the shop first (an export never adds a shop)`,
        });
      }
    }
    if (record.meter_change === true) this.meterChanges = true;
    for (const c of this.dateCols) {
      const d = record[c] as string | null;
      if (d) {
        if (this.minDate === null || d < this.minDate) this.minDate = d;
        if (this.maxDate === null || d > this.maxDate) this.maxDate = d;
      }
    }
    const text = this.text(record);
    // the content hash: same natural key + same hash means nothing changed
    let tail = hash("md5", text);
    if (this.keyer) {
      const [a, b] = this.keyer(record, this.keys, this.keyValues);
      for (const k of this.keyValues) tail += "\t" + (k ?? "\\N");
      if (this.seen!.add(a, b)) this.blockRepeats = this.fileRepeats = true;
      this.collectMembers(record);
    }
    return rec.line + "\t\\N\t\\N\t\\N\t" + text + "\t" + tail + this.loadTail + "\n";
  }

  /**
   * Whether a natural key may have come twice among the rows staged since the last call (the block being
   * sealed); a block without repeats can be merged without first picking one copy per key.
   */
  blockHadRepeats(): boolean {
    const r = this.blockRepeats;
    this.blockRepeats = false;
    return r;
  }

  /** Whether any natural key may have come twice in the file: when not, the duplicate check can be skipped. */
  get fileHadRepeats(): boolean {
    return this.fileRepeats || !this.keyer;
  }

  /** Remembers the shop, technician and part a job line names, the first time each is seen. */
  private collectMembers(r: Record<string, unknown>): void {
    if (this.kind !== "jobs" || this.foundOverflow) return;
    const [shopKey, techKey, partKey] = [this.keyValues[1]!, this.keyValues[5], this.keyValues[6]];
    const f = this.found;
    f.machines.add(this.keyValues[2]!);
    if (!f.shops.has(shopKey)) f.shops.set(shopKey, r.shop_code as string);
    if (techKey !== null && !f.technicians.has(techKey)) f.technicians.set(techKey, [shopKey, r.tech_id as string]);
    if (partKey !== null && !f.parts.has(partKey)) {
      f.parts.set(partKey, [r.part_number as string, (r.supplier_lot as string | null) ?? "", r.part_description as string | null]);
    }
    // a bounded memory: past this many, the merge finds them in the staged rows instead
    if (f.machines.size + f.technicians.size + f.parts.size > RowStager.memberCap) this.foundOverflow = true;
  }

  /** The shops, technicians and parts of the file's accepted job lines, or null when there were too many to keep. */
  get members(): DimensionMembers | null {
    if (this.kind !== "jobs" || this.foundOverflow) return null;
    const f = this.found;
    return {
      machines: [...f.machines],
      shops: [...f.shops].map(([key, code]) => ({ key, code })),
      technicians: [...f.technicians].map(([key, [shopKey, techId]]) => ({ key, shopKey, techId })),
      parts: [...f.parts].map(([key, [number, lot, description]]) => ({ key, number, lot, description })),
    };
  }

  /** The staging line of a rejected row: its raw fields and the reason, nothing else. */
  private rejected(rec: CsvRecord, r: Reject): string {
    return `${rec.line}\t${copyValue(JSON.stringify(rawForReject(rec.fields)))}\t${copyValue(r.code)}\t${copyValue(r.reason)}\t${this.emptyTail}\n`;
  }
}
