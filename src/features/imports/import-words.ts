import type { ExportKindName, ImportPreview, ImportProgress, ImportStatus } from "@shared/schemas/imports";

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

export const count = (n: number) => n.toLocaleString("en-US");

/** 1,024-based, as file managers show sizes: 200 MB is the limit above. */
export function bytesInWords(n: number): string {
  if (n < 1024) return `${n.toLocaleString("en-US")} bytes`;
  const units = ["KB", "MB", "GB"];
  let v = n / 1024;
  let u = 0;
  while (v >= 1024 && u < units.length - 1) {
    v /= 1024;
    u++;
  }
  return `${v.toLocaleString("en-US", { maximumFractionDigits: v < 10 ? 1 : 0 })} ${units[u]}`;
}

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

/** A reason code as a label: `hour_meter_backwards` → "hour meter backwards". */
export const reasonLabel = (code: string) => code.replaceAll("_", " ");

/** The preview table's columns: every key the rows carry, in the order they first appear. */
export function previewColumns(rows: ImportPreview["rows"]): string[] {
  const seen = new Set<string>();
  for (const r of rows) for (const k of Object.keys(r.values)) seen.add(k);
  return [...seen];
}

export function cellText(v: string | number | boolean | null): string {
  if (v === null) return "—";
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "number") return v.toLocaleString("en-US", { maximumFractionDigits: 6 });
  return v;
}

/** Files the page will send, and the others with why, before anything is uploaded. */
export function screenFiles(files: readonly File[]): { accepted: File[]; turnedAway: { name: string; why: string }[] } {
  const accepted: File[] = [];
  const turnedAway: { name: string; why: string }[] = [];
  for (const f of files) {
    const lower = f.name.toLowerCase();
    if (!IMPORT_EXTENSIONS.some((e) => lower.endsWith(e))) turnedAway.push({ name: f.name, why: "only .csv and .txt exports can be loaded" });
    else if (f.size > MAX_IMPORT_BYTES) turnedAway.push({ name: f.name, why: `it is larger than ${bytesInWords(MAX_IMPORT_BYTES)}, the limit for one file` });
    else if (f.size === 0) turnedAway.push({ name: f.name, why: "the file is empty" });
    else accepted.push(f);
  }
  return { accepted, turnedAway };
}

export function dateTimeInWords(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" });
}
