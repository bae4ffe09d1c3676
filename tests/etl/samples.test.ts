import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile } from "../../etl/load/load-file.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { count, dropTestDb, sample, TODAY } from "./helpers.js";

// Every profile's sample, loaded in dependency order: machines, jobs, measurements, then weather and hours.
const expected: [file: string, profile: string, read: number, inserted: number, rejected: number][] = [
  ["generic-machines.csv", "generic-machines", 8, 7, 1],
  ["alder-jobs.csv", "alder-jobs", 5, 4, 1],
  ["birch-jobs.csv", "birch-jobs", 4, 3, 1],
  ["cedar-jobs.csv", "cedar-jobs", 5, 3, 2],
  ["generic-jobs.csv", "generic-jobs", 6, 2, 4],
  ["alder-measurements.csv", "alder-measurements", 6, 5, 1],
  ["birch-measurements.csv", "birch-measurements", 5, 4, 1],
  ["cedar-measurements.csv", "cedar-measurements", 7, 6, 1],
  ["generic-measurements.csv", "generic-measurements", 5, 4, 1],
  ["alder-weather.csv", "alder-weather", 4, 3, 1],
  ["birch-weather.csv", "birch-weather", 4, 3, 1],
  ["generic-weather.csv", "generic-weather", 4, 3, 1],
  ["generic-hours.csv", "generic-hours", 6, 4, 2],
];

describe("loadFile on the profile samples in etl/samples", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
  });
  afterAll(async () => dropTestDb(t));

  for (const [file, profile, read, inserted, rejected] of expected) {
    it(`detects ${profile} from the header of ${file} and loads ${inserted} of ${read} rows, rejecting ${rejected}`, async () => {
      const s = await loadFile(t.pool, { path: sample(file), loadedBy: "test", today: TODAY });
      expect(s).toMatchObject({ profile, status: "loaded", read, inserted, updated: 0, unchanged: 0, rejected });
      const rej = await t.pool.query(`SELECT count(*)::int AS n FROM etl_reject WHERE batch_id = $1`, [s.batchId]);
      expect(rej.rows[0].n).toBe(rejected);
    });
  }

  it("converts the European sample's h:mm hour meter, decimal commas and DD.MM.YYYY dates", async () => {
    const r = await t.pool.query(`SELECT opened_date, closed_date, hour_meter, standard_hours, labor_hours, parts_cost, ambient_temp_c
                                  FROM fact_repair_line WHERE ro_number = 'B-3101'`);
    expect(r.rows[0]).toEqual({
      opened_date: "2024-01-04", closed_date: "2024-01-09", hour_meter: "812.5", standard_hours: "1.80", labor_hours: "2.10",
      parts_cost: "171.50", ambient_temp_c: "-3.5",
    });
  });

  it("reads the Windows-1252 header and text of the European sample without mangling umlauts", async () => {
    const r = await t.pool.query(`SELECT complaint FROM fact_repair_line WHERE ro_number = 'B-3101'`);
    expect(r.rows[0].complaint).toBe("Startet schlecht bei Kälte");
  });

  it("converts the North American sample's °F ambient and MM/DD/YYYY dates", async () => {
    const r = await t.pool.query(`SELECT opened_date, ambient_temp_c FROM fact_repair_line WHERE ro_number = 'A-5001' AND line_no = 1`);
    expect(r.rows[0]).toEqual({ opened_date: "2023-01-09", ambient_temp_c: "-13.3" });
  });

  it("classes every OL resistance as open and reads 42k as 42,000 Ω", async () => {
    const r = await t.pool.query(`SELECT raw_value, value, over_range FROM fact_measurement WHERE kind = 'plug_resistance' AND raw_value IN ('OL', '42k')`);
    for (const row of r.rows) {
      if (row.raw_value === "OL") expect(row).toMatchObject({ value: null, over_range: true });
      else expect(row).toMatchObject({ value: "42000.0000", over_range: false });
    }
    expect(r.rows.filter((x) => x.raw_value === "OL")).toHaveLength(2);
  });

  it("stores no compression above 1,000 psi after normalisation, whatever unit the shop wrote", async () => {
    const r = await t.pool.query(`SELECT max(value)::float AS max, min(value)::float AS min FROM fact_measurement WHERE kind = 'compression'`);
    expect(r.rows[0].max).toBeLessThan(1000);
    expect(r.rows[0].min).toBeGreaterThan(250);
  });

  it("records an hour reading for every accepted repair-order line", async () => {
    const lines = await t.pool.query(`SELECT count(*)::int AS n FROM fact_repair_line WHERE hour_meter IS NOT NULL`);
    const ro = await t.pool.query(`SELECT count(*)::int AS n FROM fact_hour_reading WHERE source = 'ro'`);
    expect(ro.rows[0].n).toBe(lines.rows[0].n);
    expect(await count(t.pool, "fact_repair_line")).toBe(12);
  });

  it("keeps every batch's counts adding up: read = inserted + updated + unchanged + rejected", async () => {
    const r = await t.pool.query(`SELECT count(*)::int AS n FROM etl_batch WHERE rows_read <> rows_inserted + rows_updated + rows_unchanged + rows_rejected`);
    expect(r.rows[0].n).toBe(0);
    expect(await count(t.pool, "etl_batch")).toBe(expected.length);
  });
});
