import type { ExportKindName, ImportPreview, ImportProgress, ImportStatus } from "@shared/schemas/imports";
import { createFormat, type Format } from "@shared/format";

/** The largest export the page sends; a bigger file is turned away before it is uploaded. */
export const MAX_IMPORT_BYTES = 200 * 1024 * 1024;
export const IMPORT_EXTENSIONS = [".csv", ".txt"] as const;

export const kindLabels: Record<ExportKindName, string> = {
  machines: "Machines",
  jobs: "Repair-order lines",
  measurements: "Measurements",
  weather: "Weather",
  hours: "Hour-meter readings",
};

export const phaseLabels: Record<ImportProgress["phase"], string> = {
  reading: "Reading and checking rows",
  merging: "Merging into the warehouse",
  refreshing: "Updating the derived tables",
  done: "Finishing",
};

/** Statuses the server is still working on: the page asks again every second until one of the others. */
const ACTIVE: ReadonlySet<ImportStatus> = new Set(["checking", "queued", "loading"]);
export const isActive = (status: ImportStatus | undefined) => status !== undefined && ACTIVE.has(status);


/** A duration as people say it: "45 s", "3 min 20 s", "1 h 05 min". */
export function secondsInWords(seconds: number): string {
  const s = Math.max(0, Math.round(seconds));
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min${s % 60 ? ` ${s % 60} s` : ""}`;
  return `${Math.floor(s / 3600)} h ${String(Math.floor((s % 3600) / 60)).padStart(2, "0")} min`;
}

export function timeLeftInWords(secondsLeft: number | null): string {
  if (secondsLeft === null) return "time left not known yet";
  if (secondsLeft < 1) return "less than a second left";
  return `about ${secondsInWords(secondsLeft)} left`;
}

/** Whole percent, never 100 before the load says it is done. */
export function percentOf(p: ImportProgress): number {
  const pct = Math.floor(Math.min(100, Math.max(0, p.percent)));
  return pct === 100 && p.phase !== "done" ? 99 : pct;
}

/** A reason as a shop manager reads it: a known code in words, any other code with its underscores as spaces. */
export const reasonLabel = (code: string) => reasonWords[code] ?? code.replaceAll("_", " ");

const reasonWords: Record<string, string> = {
  wrong_column_count: "wrong number of columns",
  unreadable_row: "row could not be read",
  missing_field: "a required value is missing",
  bad_date: "date not readable",
  bad_number: "number not readable",
  future_date: "date in the future",
  closed_before_opened: "closed before it was opened",
  received_before_ordered: "part received before it was ordered",
  delivered_before_built: "delivered before it was built",
  negative_value: "negative value",
  absurd_value: "value outside any sensible range",
  unknown_code: "code not in the catalogue",
  unknown_machine: "machine not known",
  unknown_repair_line: "repair line not known",
  hour_meter_backwards: "hour meter went backwards",
  duplicate_in_file: "row repeated in the file",
  conflicting_duplicate: "row repeated with different values",
  tmin_above_tmax: "daily minimum above the daily maximum",
  unknown_shop: "shop not known",
  bad_characters: "characters that cannot be stored",
  bad_encoding: "text encoding not readable",
  too_long: "value too long",
  unbalanced_quote: "quote mark not closed",
};

/** The preview table's columns: every key the rows carry, in the order they first appear. */
export function previewColumns(rows: ImportPreview["rows"]): string[] {
  const seen = new Set<string>();
  for (const r of rows) for (const k of Object.keys(r.values)) seen.add(k);
  return [...seen];
}

/** A previewed cell as read: numbers in the reader's locale (up to 2 decimals), booleans as yes/no. */
export function cellText(v: string | number | boolean | null, fmt: Format): string {
  if (v === null) return "—";
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "number") return fmt.quantity("plain", v);
  return v;
}

/** Files the page will send, and the others with why, before anything is uploaded. */
export function screenFiles(files: readonly File[], fmt: Format): { accepted: File[]; turnedAway: { name: string; why: string }[] } {
  const accepted: File[] = [];
  const turnedAway: { name: string; why: string }[] = [];
  for (const f of files) {
    const lower = f.name.toLowerCase();
    if (!IMPORT_EXTENSIONS.some((e) => lower.endsWith(e))) turnedAway.push({ name: f.name, why: "only .csv and .txt exports can be loaded" });
    else if (f.size > MAX_IMPORT_BYTES) turnedAway.push({ name: f.name, why: `it is larger than ${fmt.fileSize(MAX_IMPORT_BYTES)}, the limit for one file` });
    else if (f.size === 0) turnedAway.push({ name: f.name, why: "the file is empty" });
    else accepted.push(f);
  }
  return { accepted, turnedAway };
}

/** An instant in the browser's locale (medium date, short time), for lists outside React's format hook. */
export function dateTimeInWords(iso: string): string {
  const locale = (typeof navigator !== "undefined" && navigator.language) || "en-US";
  return createFormat({ locale, currency: "USD" }).dateTime(iso);
}
