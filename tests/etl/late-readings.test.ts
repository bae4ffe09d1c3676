import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile } from "../../etl/load/load-file.js";
import { upsertShops } from "../../etl/shops/upsert-shops.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb, fixture, TODAY } from "./helpers.js";

// A reading dated earlier than stored ones, loaded later: the stored readings after it are judged again by
// the hour-meter rules (more than 2 h below an earlier-dated reading; more than 24 h a day since the previous
// one — common practice, no source) and the change is recorded. Worked by hand below.

const HEADER = "shop_code,ro_number,line_no,serial,opened_date,hour_meter,component_code";
const dir = mkdtempSync(path.join(os.tmpdir(), "late-readings-"));
const file = (name: string, lines: string[]) => {
  const p = path.join(dir, name);
  writeFileSync(p, [HEADER, ...lines].join("\n") + "\n");
  return p;
};

describe("a reading that arrives late", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
    await upsertShops(t.pool, [{ code: "S4", name: "Fourth" }, { code: "S5", name: "Fifth" }]);
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
    // KT35-20001: 1,000 h on 10 January, 1,100 h on 10 March, 1,150 h on 30 March
    await loadFile(t.pool, {
      path: file("first.csv", ["S4,L-1,1,KT35-20001,2024-01-10,1000,ENG-CSA-HPLUG", "S4,L-2,1,KT35-20001,2024-03-10,1100,ENG-CSA-HPLUG", "S4,L-3,1,KT35-20001,2024-03-30,1150,ENG-CSA-HPLUG"]),
      loadedBy: "test",
      today: TODAY,
    });
  });
  afterAll(async () => dropTestDb(t));

  const verdicts = async () =>
    (await t.pool.query<{ ro: string; valid: boolean; reason: string | null }>(
      `SELECT ro_number AS ro, hour_valid AS valid, hour_invalid_reason AS reason FROM fact_repair_line WHERE ro_number LIKE 'L-%' ORDER BY opened_date`,
    )).rows;

  it("leaves every stored reading valid when nothing arrives late", async () => {
    expect((await verdicts()).every((v) => v.valid)).toBe(true);
  });

  it("sets aside the stored readings the late one contradicts, with the reason, and records the change", async () => {
    // 1,300 h on 10 February: 300 h in 31 days after January (fine), but March's 1,100 h and 1,150 h are now
    // more than 2 h below an earlier-dated reading
    const s = await loadFile(t.pool, { path: file("late.csv", ["S4,L-9,1,KT35-20001,2024-02-10,1300,ENG-CSA-HPLUG"]), loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 1, inserted: 1, rejected: 0 });
    const v = await verdicts();
    expect(v.map((x) => [x.ro, x.valid])).toEqual([["L-1", true], ["L-9", true], ["L-2", false], ["L-3", false]]);
    expect(v[2].reason).toMatch(/^1,100 h is lower than the 1,300 h of a reading dated before it that was loaded later \(batch \d+\)$/);
    const changes = await t.pool.query(`SELECT reading_date::text AS d, hours::float8 AS h, was_valid, now_valid, batch_id::int AS batch FROM hour_verdict_change ORDER BY reading_date`);
    expect(changes.rows).toEqual([
      { d: "2024-03-10", h: 1100, was_valid: true, now_valid: false, batch: s.batchId },
      { d: "2024-03-30", h: 1150, was_valid: true, now_valid: false, batch: s.batchId },
    ]);
  });

  it("judges a rise faster than a day allows since the late reading, and leaves the rest alone", async () => {
    // KL70-20002: 700 h on 1 May, 760 h on 20 May; then 20 May's neighbour arrives: 745 h on 19 May → 15 h in a day, fine;
    // and KT18-20003: 300 h on 1 May, 340 h on 3 May; 301 h on 2 May arrives late → 39 h in the day after it: set aside
    await loadFile(t.pool, {
      path: file("may.csv", ["S4,M-1,1,KL70-20002,2024-05-01,700,HYD-LIN-HOSE", "S4,M-2,1,KL70-20002,2024-05-20,760,HYD-LIN-HOSE", "S5,M-3,1,KT18-20003,2024-05-01,300,ENG-CSA-RELAY", "S5,M-4,1,KT18-20003,2024-05-03,340,ENG-CSA-RELAY"]),
      loadedBy: "test",
      today: TODAY,
    });
    await loadFile(t.pool, { path: file("may-late.csv", ["S4,M-5,1,KL70-20002,2024-05-19,745,HYD-LIN-HOSE", "S5,M-6,1,KT18-20003,2024-05-02,301,ENG-CSA-RELAY"]), loadedBy: "test", today: TODAY });
    const r = await t.pool.query<{ ro: string; valid: boolean; reason: string | null }>(
      `SELECT ro_number AS ro, hour_valid AS valid, hour_invalid_reason AS reason FROM fact_repair_line WHERE ro_number LIKE 'M-%' ORDER BY ro_number`,
    );
    expect(r.rows.map((x) => [x.ro, x.valid])).toEqual([["M-1", true], ["M-2", true], ["M-3", true], ["M-4", false], ["M-5", true], ["M-6", true]]);
    expect(r.rows[3].reason).toMatch(/^rose 39 h in 1 day\(s\) since 301 h on 2024-05-02, a reading loaded later \(batch \d+\)$/);
  });
});
