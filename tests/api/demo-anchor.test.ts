import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ANCHOR_FILE, loadDemo, storedDemoAnchor, type DemoLoadSummary } from "../../server/demo/load-demo.js";
import type { Manifest } from "../../etl/index.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";

// A present-day anchor: the day these checks were written. Work still running on the history's last day is
// exported open (no close date, no receipt for a part not yet in), so even a load on the anchor day itself
// rejects no real row as in the future; a later run only moves the load's "today" further on. Scale 0.1
// rather than 0.05 so that some repair orders are still open at the end (3 at seed 1).
const ANCHOR = "2026-12-03";
const DAY_BEFORE = "2026-12-02";
const SCALE = 0.1;

let t: TestDb;
let dir: string;
let summary: DemoLoadSummary;
beforeAll(async () => {
  t = await freshTestDb();
  dir = await mkdtemp(path.join(tmpdir(), "ironledger-demo-anchor-"));
  summary = await loadDemo(t.db, t.pool, { dir, seed: 1, scale: SCALE, anchor: ANCHOR });
}, 300_000);
afterAll(async () => {
  await t?.drop();
  if (dir) await rm(dir, { recursive: true, force: true });
});

const newest = async (query: ReturnType<typeof sql<{ d: string | null }>>): Promise<string | null> => (await query.execute(t.db)).rows[0]!.d;

describe("loadDemo(db, pool, { dir, seed, scale, anchor })", () => {
  it("the demo anchor makes the newest repair order fall on the day before the chosen anchor date", async () => {
    expect(summary.anchor).toBe(ANCHOR);
    expect(await newest(sql<{ d: string | null }>`SELECT max(opened_date)::text AS d FROM fact_repair_line`)).toBe(DAY_BEFORE);
    expect(await newest(sql<{ d: string | null }>`SELECT max(reading_date)::text AS d FROM fact_hour_reading`)).toBe(DAY_BEFORE);
  });

  it("ends the weather on the same day, and rejects as future only the dates the generator typed wrong", async () => {
    expect(await newest(sql<{ d: string | null }>`SELECT max(date)::text AS d FROM fact_weather_day`)).toBe(DAY_BEFORE);
    const manifest = JSON.parse(await readFile(path.join(dir, "manifest.json"), "utf8")) as Manifest;
    const future = (await sql<{ reason: string }>`SELECT reason FROM etl_reject WHERE reason_code = 'future_date'`.execute(t.db)).rows;
    expect(future.length).toBeGreaterThan(0);
    expect(future.length).toBeLessThanOrEqual(manifest.injected.futureDate);
    // a wrongly typed year lands after the history's last year; nothing of the history itself is "in the future"
    for (const r of future) expect(Number(/(\d{4})-\d{2}-\d{2}/.exec(r.reason)![1]), r.reason).toBeGreaterThan(2026);
  });

  it("holds work still running on the last day as open repair orders, closed and supplied no later than that day", async () => {
    expect(await newest(sql<{ d: string | null }>`SELECT max(closed_date)::text AS d FROM fact_repair_line`)).not.toBeNull();
    const late = await sql<{ n: string }>`
      SELECT count(*) AS n FROM fact_repair_line WHERE closed_date > ${DAY_BEFORE}::date OR part_received_date > ${DAY_BEFORE}::date`.execute(t.db);
    expect(Number(late.rows[0]!.n)).toBe(0);
    const open = await sql<{ ros: string; opened: string }>`
      SELECT count(DISTINCT (shop_key, ro_number)) AS ros, min(opened_date)::text AS opened FROM fact_repair_line WHERE closed_date IS NULL`.execute(t.db);
    expect(Number(open.rows[0]!.ros)).toBeGreaterThan(0);
    // only the last weeks' work can still be running: no part waits longer than 120 days (SCENARIO.md (c))
    expect(open.rows[0]!.opened >= "2026-08-04").toBe(true);
  });

  it("keeps the manifest's anchor, so a second load with the same anchor does not regenerate", async () => {
    const manifest = JSON.parse(await readFile(path.join(dir, "manifest.json"), "utf8")) as Manifest;
    expect(manifest.anchor).toBe(ANCHOR);
    expect(manifest.window.to).toBe(DAY_BEFORE);
    const lines: string[] = [];
    await loadDemo(t.db, t.pool, { dir, seed: 1, scale: SCALE, anchor: ANCHOR, log: (l) => lines.push(l) });
    expect(lines.some((l) => l.startsWith("Generating"))).toBe(false);
    expect(await newest(sql<{ d: string | null }>`SELECT max(opened_date)::text AS d FROM fact_repair_line`)).toBe(DAY_BEFORE);
  });
});

describe("loadDemo(db, pool, { dir }) over a directory generated for another anchor", () => {
  it("regenerates the world for the new anchor", async () => {
    const other = await freshTestDb();
    try {
      const lines: string[] = [];
      await loadDemo(other.db, other.pool, { dir, seed: 1, scale: SCALE, anchor: "2026-02-01", log: (l) => lines.push(l) });
      expect(lines.some((l) => l.startsWith("Generating"))).toBe(true);
      const manifest = JSON.parse(await readFile(path.join(dir, "manifest.json"), "utf8")) as Manifest;
      expect(manifest.anchor).toBe("2026-02-01");
      const d = (await sql<{ d: string }>`SELECT max(opened_date)::text AS d FROM fact_repair_line`.execute(other.db)).rows[0]!.d;
      expect(d).toBe("2026-01-31");
    } finally {
      await other.drop();
    }
  }, 300_000);
});

describe("loadDemo(db, pool, { dir }) over a directory an older generator wrote", () => {
  it("writes the world again rather than loading files of another generator version", async () => {
    const manifestPath = path.join(dir, "manifest.json");
    const current = JSON.parse(await readFile(manifestPath, "utf8")) as Manifest;
    await writeFile(manifestPath, JSON.stringify({ ...current, version: current.version - 1 }));
    const other = await freshTestDb();
    try {
      const lines: string[] = [];
      await loadDemo(other.db, other.pool, { dir, seed: 1, scale: SCALE, anchor: current.anchor, log: (l) => lines.push(l) });
      expect(lines.some((l) => l.startsWith("Generating"))).toBe(true);
      expect((JSON.parse(await readFile(manifestPath, "utf8")) as Manifest).version).toBe(current.version);
    } finally {
      await other.drop();
    }
  }, 300_000);
});

describe("storedDemoAnchor(dir, now)", () => {
  it("stores the day of the first start and gives it back on later starts", async () => {
    const d = await mkdtemp(path.join(tmpdir(), "ironledger-demo-anchor-store-"));
    try {
      expect(storedDemoAnchor(d, new Date(2026, 0, 15, 9, 30))).toBe("2026-01-15");
      expect((await readFile(path.join(d, ANCHOR_FILE), "utf8")).trim()).toBe("2026-01-15");
      expect(storedDemoAnchor(d, new Date(2026, 4, 2, 23, 59))).toBe("2026-01-15");
    } finally {
      await rm(d, { recursive: true, force: true });
    }
  });
});
