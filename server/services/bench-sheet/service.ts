import { HEATER_PLUG } from "../../../shared/catalog.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { BenchCreateLine, BenchLineDetail, BenchSaveResponse, BenchSheet } from "../../../shared/schemas/bench-sheet.js";
import { HttpError } from "../../errors.js";
import { getBenchLine, lineExists, lineReadings, plugParts, sheetHourMeter } from "../../db/queries/bench-sheet.js";
import { currentSpec } from "../../db/queries/engine-family-specs.js";
import { scopeIncludes } from "../../db/queries/scope.js";
import { hoursRows, jobRows, measurementRows } from "./sheet-rows.js";
import { loadSheetFiles, type SheetLoadDeps } from "./save-sheet.js";
import { layouts } from "../../../etl/index.js";

export interface LineRef {
  shopCode: string;
  roNumber: string;
  lineNo: number;
}

/** "<shop>|<ro>|<line>" → its parts, or null when it has not that shape. */
export function parseLineId(id: string): LineRef | null {
  const m = /^([^|]{1,10})\|([^|]{1,30})\|(\d{1,3})$/.exec(id);
  if (!m) return null;
  return { shopCode: m[1]!.trim().toUpperCase(), roNumber: m[2]!.trim().toUpperCase(), lineNo: Number(m[3]) };
}

// the words never repeat a shop code the caller asked for: outside their scope it is not theirs to hear named
const lineNotFound = (ref: LineRef) =>
  new HttpError(404, "not_found", `Repair order ${ref.roNumber} line ${ref.lineNo} is not among your shops' lines.`);

/** One line of the caller's shops with its readings, or 404 in words (outside the scope reads as absent). */
export async function lineDetail(deps: SheetLoadDeps, scope: ShopScope, ref: LineRef): Promise<BenchLineDetail> {
  const line = await getBenchLine(deps.db, scope, ref.shopCode, ref.roNumber, ref.lineNo);
  if (!line) throw lineNotFound(ref);
  const { key, ...rest } = line;
  const [readings, hourMeter, parts, familySpec] = await Promise.all([
    lineReadings(deps.db, key),
    sheetHourMeter(deps.db, line.serial, line.openedDate),
    plugParts(deps.db, line.engineFamily, line.shopCode),
    currentSpec(deps.db, line.engineFamily),
  ]);
  return { line: rest, readings, hourMeter, plugParts: parts, familySpec };
}

/**
 * Adds a line the shop's system has not exported yet, through the jobs loader (source 'sheet'). The shop's
 * export of the same shop + RO + line later merges into it: the line's key is its natural key, the export's
 * fields replace the sheet's, and the readings stay attached to the key.
 */
export async function createLine(deps: SheetLoadDeps, scope: ShopScope, user: string, input: BenchCreateLine): Promise<BenchLineDetail> {
  const ref = { shopCode: input.shopCode.toUpperCase(), roNumber: input.roNumber.toUpperCase(), lineNo: input.lineNo };
  if (!scopeIncludes(scope, ref.shopCode)) {
    throw new HttpError(403, "forbidden", "That shop is not one of yours; you can add lines only to your own shops.");
  }
  if (await lineExists(deps.db, ref.shopCode, ref.roNumber, ref.lineNo)) {
    throw new HttpError(409, "line_exists", `Repair order ${ref.roNumber} line ${ref.lineNo} of shop ${ref.shopCode} is already in Ironledger; search for it and open it.`);
  }
  const rows = jobRows({ ...input, ...ref, componentCode: HEATER_PLUG });
  await loadSheetFiles(deps, [{ kind: "jobs", profile: "generic-jobs", columns: Object.keys(rows[0]!.row), rows }], `${ref.roNumber}/${ref.lineNo}`, user);
  return lineDetail(deps, scope, ref);
}

/** Saves a sheet for a line of the caller's shops: all of it, or nothing and every refusal in words. */
export async function saveSheet(deps: SheetLoadDeps, scope: ShopScope, user: string, ref: LineRef, sheet: BenchSheet): Promise<BenchSaveResponse> {
  const line = await getBenchLine(deps.db, scope, ref.shopCode, ref.roNumber, ref.lineNo);
  if (!line) throw lineNotFound(ref);
  const positions = (xs: { position: number }[], what: string) => {
    const seen = new Set<number>();
    for (const x of xs) {
      if (seen.has(x.position)) throw new HttpError(400, "invalid_request", `${what} ${x.position} is on the sheet twice; enter each once.`);
      seen.add(x.position);
    }
  };
  positions(sheet.plugs, "Plug");
  positions(sheet.compression.cylinders, "Cylinder");
  const m = measurementRows(line, sheet);
  const h = hoursRows(line.serial, sheet);
  if (m.length === 0 && h.length === 0) throw new HttpError(400, "invalid_request", "The sheet holds no reading; enter at least one before saving.");
  const done = await loadSheetFiles(
    deps,
    [
      { kind: "measurements", profile: "generic-measurements", columns: layouts.measurements, rows: m },
      { kind: "hours", profile: "generic-hours", columns: ["serial", "reading_date", "hours", "source"], rows: h },
    ],
    `${line.roNumber}/${line.lineNo}`,
    user,
  );
  const detail = await lineDetail(deps, scope, ref);
  return { ...detail, stored: done.reduce((s, d) => s + d.inserted + d.updated, 0) };
}
