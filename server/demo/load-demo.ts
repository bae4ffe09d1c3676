import path from "node:path";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { format } from "date-fns";
import type pg from "pg";
import type { Db } from "../db/database.js";
import { demoShops, GENERATOR_VERSION, generateDemo, loadFile, refreshExposure, upsertShops, type Manifest } from "../../etl/index.js";

export interface DemoLoadSummary {
  files: number;
  read: number;
  inserted: number;
  rejected: number;
  seconds: number;
  exposureSeconds: number;
  /** the demo's history ends the day before this date */
  anchor: string;
}

/** True when the warehouse holds no machines yet. */
export async function warehouseIsEmpty(db: Db): Promise<boolean> {
  const row = await db.selectFrom("dim_machine").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirst();
  return Number(row?.n ?? 0) === 0;
}

/** The file in a demo directory that keeps the anchor chosen on the first start. */
export const ANCHOR_FILE = "anchor.txt";

/**
 * The demo's anchor when none is given: the one stored in `dir` by an earlier start, or else today (the
 * starter's local calendar), which is then stored, so a restart never regenerates the world on another day.
 */
export function storedDemoAnchor(dir: string, now: Date = new Date()): string {
  const file = path.join(dir, ANCHOR_FILE);
  if (existsSync(file)) {
    const stored = readFileSync(file, "utf8").trim();
    if (/^\d{4}-\d{2}-\d{2}$/.test(stored)) return stored;
  }
  const today = format(now, "yyyy-MM-dd");
  mkdirSync(dir, { recursive: true });
  writeFileSync(file, `${today}\n`);
  return today;
}

/**
 * Generates the invented demo world into `dir` (unless a manifest with the same seed, scale and anchor is
 * there), registers its shops, loads every export in the manifest's order through the ETL, names the
 * technicians and rebuilds the exposure aggregate. The history ends the day before `anchor`; without one,
 * before the anchor stored in `dir` by the first start (storedDemoAnchor).
 */
export async function loadDemo(
  db: Db,
  pool: pg.Pool,
  o: { dir: string; seed?: number; scale?: number; anchor?: string; log?: (line: string) => void },
): Promise<DemoLoadSummary> {
  const started = performance.now();
  const seed = o.seed ?? 1;
  const scale = o.scale ?? 1;
  const anchor = o.anchor ?? storedDemoAnchor(o.dir);
  const log = o.log ?? (() => {});
  const manifestPath = path.join(o.dir, "manifest.json");
  let manifest: Manifest | null = null;
  if (existsSync(manifestPath)) {
    const m = JSON.parse(readFileSync(manifestPath, "utf8")) as Manifest;
    if (m.version === GENERATOR_VERSION && m.seed === seed && m.scale === scale && m.anchor === anchor) manifest = m;
  }
  if (!manifest) {
    log(`Generating the demo world (seed ${seed}, scale ${scale}, history up to the day before ${anchor})…`);
    manifest = await generateDemo({ out: o.dir, seed, scale, anchor });
  }
  await upsertShops(
    pool,
    demoShops.map((s) => ({ code: s.code, name: s.town, town: s.town, climateZone: s.zone })),
  );
  const totals = { read: 0, inserted: 0, rejected: 0 };
  for (const [i, f] of manifest.files.entries()) {
    const s = await loadFile(pool, { path: path.join(o.dir, f.file), kind: f.kind, profile: f.profile, loadedBy: "demo" });
    totals.read += s.read;
    totals.inserted += s.inserted;
    totals.rejected += s.rejected;
    log(`  [${String(i + 1).padStart(2)}/${manifest.files.length}] ${f.file.padEnd(24)} read ${s.read}, inserted ${s.inserted}, rejected ${s.rejected}`);
  }
  for (const t of manifest.technicians) {
    await db
      .updateTable("dim_technician")
      .set({ display_name: t.name })
      .where("tech_id", "=", t.id)
      .execute();
  }
  // Every file of the demo changed the warehouse: one full rebuild is cheaper than folding in each of them.
  log("Rebuilding exposure by hour band and temperature band…");
  const exp = await refreshExposure(db, { full: true });
  return { files: manifest.files.length, ...totals, seconds: (performance.now() - started) / 1000, exposureSeconds: exp.seconds, anchor };
}
