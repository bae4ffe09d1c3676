import type { BenchLine, BenchSheet, BenchTemperatureUnit, BenchTestResult, EngineState } from "@shared/schemas/bench-sheet";
import type { PressureUnit } from "@shared/format";

/**
 * A bench sheet as the technician is typing it: every value kept as typed (a half-written "1," stays), so the
 * draft can live on the phone and be turned into the API's sheet only when it is sent.
 */
export interface BenchDraft {
  version: 1;
  lineId: string;
  readingDate: string;
  ambient: string;
  ambientUnit: BenchTemperatureUnit;
  engine: EngineState | null;
  hourMeter: string;
  rail: string;
  preheatLamp: boolean | null;
  plugs: { position: number; value: string; unit: "ohm" | "kohm"; ol: boolean; bench: BenchTestResult }[];
  pressureUnit: PressureUnit;
  cylinders: { position: number; attempts: string[] }[];
  /** a save the server has not answered yet: sent again, once, when the connection returns */
  pending: { key: string } | null;
  /** when the server last took the sheet (ISO instant) */
  sentAt: string | null;
}

/** Plugs and cylinders offered when the engine family's cylinder count is unknown. */
export const DEFAULT_CYLINDERS = 4;
export const DEFAULT_ATTEMPTS = 3;

const today = () => new Date().toISOString().slice(0, 10);

export function emptyDraft(line: BenchLine, o: { temperatureUnit: BenchTemperatureUnit; pressureUnit: PressureUnit }): BenchDraft {
  const n = line.cylinders ?? DEFAULT_CYLINDERS;
  const positions = Array.from({ length: n }, (_, i) => i + 1);
  return {
    version: 1,
    lineId: line.id,
    readingDate: today(),
    ambient: "",
    ambientUnit: o.temperatureUnit,
    engine: null,
    hourMeter: "",
    rail: "",
    preheatLamp: null,
    plugs: positions.map((position) => ({ position, value: "", unit: "ohm", ol: false, bench: "not_tested" })),
    pressureUnit: o.pressureUnit,
    cylinders: positions.map((position) => ({ position, attempts: Array.from({ length: DEFAULT_ATTEMPTS }, () => "") })),
    pending: null,
    sentAt: null,
  };
}

/**
 * A number as typed on a phone's decimal keypad: "1.2" or "1,2" (a decimal comma where the keypad offers one);
 * "" is no value. Anything else is not a number.
 */
export function parseDecimal(typed: string): number | null | "invalid" {
  const t = typed.trim().replace(/\s/g, "");
  if (t === "") return null;
  const normal = t.includes(",") && !t.includes(".") ? t.replace(",", ".") : t;
  if (!/^[-+]?(\d+\.?\d*|\.\d+)$/.test(normal)) return "invalid";
  return Number(normal);
}

export interface DraftProblem {
  /** the draft's field id (as the page's inputs use it) */
  field: string;
  message: string;
}

/** Draft field ids: the same as the API's field paths for a sheet built by draftToSheet. */
export const fieldIds = {
  ambient: "conditions.ambient",
  hourMeter: "conditions.hourMeter",
  rail: "railVoltage",
  plug: (i: number) => `plugs.${i}.resistance`,
  attempt: (i: number, j: number) => `compression.cylinders.${i}.attempts.${j}`,
} as const;

export interface DraftAsSheet {
  sheet: BenchSheet;
  problems: DraftProblem[];
  /** the API's field path of a sent value → the draft's field id (attempts left empty are not sent, so indexes move) */
  fieldOf: Record<string, string>;
}

/** The draft as the API's sheet: numbers parsed, empty values left out, values that are not numbers listed as problems. */
export function draftToSheet(d: BenchDraft): DraftAsSheet {
  const problems: DraftProblem[] = [];
  const fieldOf: Record<string, string> = {};
  const num = (typed: string, field: string, label: string): number | null => {
    const v = parseDecimal(typed);
    if (v === "invalid") {
      problems.push({ field, message: `${label}: “${typed}” is not a number` });
      return null;
    }
    return v;
  };
  const ambient = num(d.ambient, fieldIds.ambient, "Ambient temperature");
  const hourMeter = num(d.hourMeter, fieldIds.hourMeter, "Hour meter");
  const rail = num(d.rail, fieldIds.rail, "Rail voltage");
  const plugs = d.plugs.map((p, i) => {
    fieldOf[fieldIds.plug(i)] = fieldIds.plug(i);
    fieldOf[`plugs.${i}.bench`] = `plugs.${i}.bench`;
    if (p.ol) return { position: p.position, resistance: { unit: "OL" as const }, bench: p.bench };
    const v = num(p.value, fieldIds.plug(i), `Plug ${p.position} resistance`);
    return { position: p.position, resistance: v === null ? null : { unit: p.unit, value: v }, bench: p.bench };
  });
  const cylinders = d.cylinders.map((c, i) => {
    const attempts: number[] = [];
    c.attempts.forEach((a, j) => {
      const v = num(a, fieldIds.attempt(i, j), `Cylinder ${c.position}, attempt ${j + 1}`);
      if (v === null) return;
      fieldOf[fieldIds.attempt(i, attempts.length)] = fieldIds.attempt(i, j);
      attempts.push(v);
    });
    return { position: c.position, attempts };
  });
  for (const f of [fieldIds.ambient, fieldIds.hourMeter, fieldIds.rail, "conditions.engine", "preheatLamp", "readingDate"]) fieldOf[f] = f;
  return {
    sheet: {
      readingDate: d.readingDate,
      conditions: { ambient: ambient === null ? null : { value: ambient, unit: d.ambientUnit }, engine: d.engine, hourMeter },
      railVoltage: rail,
      preheatLamp: d.preheatLamp,
      plugs,
      compression: { unit: d.pressureUnit, cylinders },
    },
    problems,
    fieldOf,
  };
}

/** Where a draft lives on the device: one per signed-in user and repair-order line. */
export const draftKey = (userSub: string, lineId: string) => `ironledger.benchDraft.${userSub}.${lineId}`;

export function readDraft(userSub: string, lineId: string): BenchDraft | null {
  try {
    const raw = localStorage.getItem(draftKey(userSub, lineId));
    if (!raw) return null;
    const d = JSON.parse(raw) as BenchDraft;
    return d && d.version === 1 && d.lineId === lineId ? d : null;
  } catch {
    return null;
  }
}

/** Keeps the draft on the device; false when the browser refuses (private mode, storage full). */
export function writeDraft(userSub: string, d: BenchDraft): boolean {
  try {
    localStorage.setItem(draftKey(userSub, d.lineId), JSON.stringify(d));
    return true;
  } catch {
    return false;
  }
}

export function forgetDraft(userSub: string, lineId: string): void {
  try {
    localStorage.removeItem(draftKey(userSub, lineId));
  } catch {
    /* nothing kept */
  }
}
