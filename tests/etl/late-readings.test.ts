import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { refreshExposure } from "../../etl/derived/refresh-exposure.js";
import { loadFile } from "../../etl/load/load-file.js";
import { upsertShops } from "../../etl/shops/upsert-shops.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { fixture, snapshot, TODAY } from "./helpers.js";

// A reading dated earlier than stored ones, loaded later: the machine's readings from its date on are judged
// again by the hour-meter rules, both ways, and each changed verdict is recorded. The rules (DOMAIN.md, "Hour-
// meter cleaning"; common practice, no source): a reading more than 2 h below an earlier-dated valid reading
// of its meter generation is invalid, and so is a rise of more than 24 h per calendar day (at least one day)
// since the previous valid reading. Every verdict below is worked by hand in its comment.

const HEADER = "shop_code,ro_number,line_no,serial,opened_date,hour_meter,component_code";
const HOURS_HEADER = "serial,reading_date,hours,source,meter_note";
const dir = mkdtempSync(path.join(os.tmpdir(), "late-readings-"));
const write = (name: string, lines: string[]) => {
  const p = path.join(dir, name);
  writeFileSync(p, lines.join("\n") + "\n");
  return p;
};
const file = (name: string, lines: string[]) => write(name, [HEADER, ...lines]);

interface Verdict {
  ro: string;
  valid: boolean;
  reason: string | null;
}

interface Change {
  d: string;
  h: number;
  source: string;
  was_valid: boolean;
  now_valid: boolean;
  reason: string;
}

describe("a reading that arrives late", () => {
  let t: TestDb;
  /** the batch of the late 1,300 h reading (second case), named in the reasons it gave */
  let lateBatch = 0;
  const load = async (p: string) => {
    const s = await loadFile(t.pool, { path: p, loadedBy: "test", today: TODAY });
    await refreshExposure(t.db);
    return s;
  };
  beforeAll(async () => {
    t = await freshTestDb();
    await upsertShops(t.pool, [{ code: "S4", name: "Fourth" }, { code: "S5", name: "Fifth" }]);
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
    // KDLV-20001: 1,000 h on 10 January, 1,100 h on 10 March, 1,150 h on 30 March
    await loadFile(t.pool, {
      path: file("first.csv", ["S4,L-1,1,KDLV-20001,2024-01-10,1000,ENG-CSA-HPLUG", "S4,L-2,1,KDLV-20001,2024-03-10,1100,ENG-CSA-HPLUG", "S4,L-3,1,KDLV-20001,2024-03-30,1150,ENG-CSA-HPLUG"]),
      loadedBy: "test",
      today: TODAY,
    });
    await refreshExposure(t.db, { full: true });
  });
  afterAll(async () => t.drop());

  const verdicts = async (prefix: string) =>
    (await t.pool.query<Verdict>(
      `SELECT ro_number AS ro, hour_valid AS valid, hour_invalid_reason AS reason FROM fact_repair_line WHERE ro_number LIKE $1 ORDER BY opened_date, ro_number`,
      [`${prefix}-%`],
    )).rows;
  const changesOf = async (batchId: number) =>
    (await t.pool.query<Change>(
      `SELECT reading_date::text AS d, hours::float8 AS h, source, was_valid, now_valid, reason FROM hour_verdict_change WHERE batch_id = $1 ORDER BY reading_date, hours`,
      [batchId],
    )).rows;
  /** the machine's last valid engine hours as the exposure refresh keeps them (agg_machine_trail) */
  const trailEnd = async (serial: string) =>
    (await t.pool.query<{ last_h: number }>(
      `SELECT a.last_h FROM agg_machine_trail a JOIN dim_machine m USING (machine_key) WHERE m.serial = $1`,
      [serial.replace("-", "")],
    )).rows[0]?.last_h;

  it("leaves every stored reading valid when nothing arrives late", async () => {
    expect((await verdicts("L")).every((v) => v.valid)).toBe(true);
    expect((await t.pool.query(`SELECT 1 FROM hour_verdict_change`)).rowCount).toBe(0);
    expect(await trailEnd("KDLV-20001")).toBe(1150);
  });

  it("sets aside the stored readings the late one contradicts, with the reason, and records the change", async () => {
    // 1,300 h on 10 February: 300 h in 31 days after January (fine), but March's 1,100 h and 1,150 h are now
    // more than 2 h below an earlier-dated reading
    const s = await load(file("late.csv", ["S4,L-9,1,KDLV-20001,2024-02-10,1300,ENG-CSA-HPLUG"]));
    expect(s).toMatchObject({ read: 1, inserted: 1, rejected: 0 });
    lateBatch = s.batchId;
    const v = await verdicts("L");
    expect(v.map((x) => [x.ro, x.valid])).toEqual([["L-1", true], ["L-9", true], ["L-2", false], ["L-3", false]]);
    const again = `judged again when batch ${s.batchId} brought a reading of this machine dated 2024-02-10`;
    expect(v[2].reason).toBe(`1,100 h is lower than the 1,300 h recorded for this machine on 2024-02-10; ${again}`);
    expect(v[3].reason).toBe(`1,150 h is lower than the 1,300 h recorded for this machine on 2024-02-10; ${again}`);
    expect(await changesOf(s.batchId)).toEqual([
      { d: "2024-03-10", h: 1100, source: "ro", was_valid: true, now_valid: false, reason: v[2].reason },
      { d: "2024-03-30", h: 1150, source: "ro", was_valid: true, now_valid: false, reason: v[3].reason },
    ]);
    // the exposure refresh after the load counts the machine's trail up to 1,300 h, March set aside
    expect(await trailEnd("KDLV-20001")).toBe(1300);
  });

  it("judges a rise faster than a day allows since the late reading, and leaves the rest alone", async () => {
    // KSKL-20002: 700 h on 1 May, 760 h on 20 May; then 20 May's neighbour arrives: 745 h on 19 May → 15 h in a day, fine;
    // and KWRN-20003: 300 h on 1 May, 340 h on 3 May; 301 h on 2 May arrives late → 39 h in the day after it: set aside
    await load(file("may.csv", ["S4,M-1,1,KSKL-20002,2024-05-01,700,HYD-LIN-HOSE", "S4,M-2,1,KSKL-20002,2024-05-20,760,HYD-LIN-HOSE", "S5,M-3,1,KWRN-20003,2024-05-01,300,ENG-CSA-RELAY", "S5,M-4,1,KWRN-20003,2024-05-03,340,ENG-CSA-RELAY"]));
    const s = await load(file("may-late.csv", ["S4,M-5,1,KSKL-20002,2024-05-19,745,HYD-LIN-HOSE", "S5,M-6,1,KWRN-20003,2024-05-02,301,ENG-CSA-RELAY"]));
    const r = await t.pool.query<Verdict>(
      `SELECT ro_number AS ro, hour_valid AS valid, hour_invalid_reason AS reason FROM fact_repair_line WHERE ro_number LIKE 'M-%' ORDER BY ro_number`,
    );
    expect(r.rows.map((x) => [x.ro, x.valid])).toEqual([["M-1", true], ["M-2", true], ["M-3", true], ["M-4", false], ["M-5", true], ["M-6", true]]);
    expect(r.rows[3].reason).toBe(`rose 39 h in 1 day(s) since 301 h on 2024-05-02; judged again when batch ${s.batchId} brought a reading of this machine dated 2024-05-02`);
    expect((await changesOf(s.batchId)).map((c) => [c.d, c.was_valid, c.now_valid])).toEqual([["2024-05-03", true, false]]);
  });

  it("makes valid again the readings set aside by a comparison with a reading the new order condemns", async () => {
    // KDLV-20001 holds 1,000 h (10 Jan), 1,300 h (10 Feb), and 1,100 h (10 Mar) and 1,150 h (30 Mar) set aside
    // as below 1,300 h. 1,010 h on 5 February arrives: 10 Feb's 1,300 h is now a rise of 290 h in 5 days
    // (more than 5 × 24 = 120 h): set aside. Compared with the valid readings only, 10 March's 1,100 h is
    // 90 h in 34 days since 1,010 h and 30 March's 1,150 h 50 h in 20 days: both valid again.
    const s = await load(file("february.csv", ["S4,L-10,1,KDLV-20001,2024-02-05,1010,ENG-CSA-HPLUG"]));
    expect(s).toMatchObject({ read: 1, inserted: 1, rejected: 0 });
    const v = await verdicts("L");
    expect(v).toEqual([
      { ro: "L-1", valid: true, reason: null },
      { ro: "L-10", valid: true, reason: null },
      {
        ro: "L-9",
        valid: false,
        reason: `rose 290 h in 5 day(s) since 1,010 h on 2024-02-05; judged again when batch ${s.batchId} brought a reading of this machine dated 2024-02-05`,
      },
      { ro: "L-2", valid: true, reason: null },
      { ro: "L-3", valid: true, reason: null },
    ]);
    const changes = await changesOf(s.batchId);
    expect(changes.map((c) => [c.d, c.h, c.was_valid, c.now_valid])).toEqual([
      ["2024-02-10", 1300, true, false],
      ["2024-03-10", 1100, false, true],
      ["2024-03-30", 1150, false, true],
    ]);
    expect(changes[0].reason).toBe(v[2].reason);
    expect(changes[1].reason).toBe(
      `valid again: judged again when batch ${s.batchId} brought a reading of this machine dated 2024-02-05, it is neither more than 2 h ` +
        "below an earlier valid reading nor a rise of more than 24 h a day since the previous one (it had been set aside: 1,100 h is lower " +
        "than the 1,300 h recorded for this machine on 2024-02-10; judged again when batch " +
        `${lateBatch} brought a reading of this machine dated 2024-02-10)`,
    );
    // the exposure refresh after the load sees the trail end at 30 March's 1,150 h again
    expect(await trailEnd("KDLV-20001")).toBe(1150);
  });

  it("makes valid again a meter reading whose rise looked too fast until a reading between arrives", async () => {
    // KSKL-20002, telematics: 800 h on 1 June, 830 h on 2 June, a rise of 30 h in a day: set aside. A repair
    // order read 810 h later on 1 June: 10 h the same day, then 20 h to 2 June's 830 h: valid again.
    await load(write("june-hours.csv", [HOURS_HEADER, "KSKL-20002,2024-06-01,800,telematics,", "KSKL-20002,2024-06-02,830,telematics,"]));
    const reading = async () =>
      (await t.pool.query<{ valid: boolean; reason: string | null; batch: number }>(
        `SELECT valid, invalid_reason AS reason, batch_id::int AS batch FROM fact_meter_reading WHERE source = 'telematics' AND reading_date = '2024-06-02'`,
      )).rows[0];
    expect(await reading()).toMatchObject({ valid: false, reason: "rose 30 h in 1 day(s) since 800 h on 2024-06-01" });
    expect(await trailEnd("KSKL-20002")).toBe(800);

    const s = await load(file("june-ro.csv", ["S4,N-1,1,KSKL-20002,2024-06-01,810,HYD-LIN-HOSE"]));
    // the reading is stamped with the batch that changed its verdict, as every row whose content changes
    expect(await reading()).toEqual({ valid: true, reason: null, batch: s.batchId });
    expect(await verdicts("N")).toEqual([{ ro: "N-1", valid: true, reason: null }]);
    const changes = await changesOf(s.batchId);
    expect(changes).toHaveLength(1);
    expect(changes[0]).toMatchObject({ d: "2024-06-02", h: 830, source: "telematics", was_valid: false, now_valid: true });
    expect(changes[0].reason).toMatch(/\(it had been set aside: rose 30 h in 1 day\(s\) since 800 h on 2024-06-01\)$/);
    expect(await trailEnd("KSKL-20002")).toBe(830);
  });

  it("keeps a reading set aside by a rule it does not own as it is", async () => {
    // KWRN-20003: 500 h on 1 July, 540 h on 2 July (40 h in a day: set aside), 545 h on 3 July (5 h after 540 h
    // in the same file: valid), then set aside by another rule (a reason the re-judging does not own).
    await load(file("july.csv", ["S5,P-1,1,KWRN-20003,2024-07-01,500,ENG-CSA-RELAY", "S5,P-2,1,KWRN-20003,2024-07-02,540,ENG-CSA-RELAY", "S5,P-3,1,KWRN-20003,2024-07-03,545,ENG-CSA-RELAY"]));
    const note = "the meter note says the meter was replaced, but the line gives no new reading";
    await t.pool.query(`UPDATE fact_repair_line SET hour_valid = false, hour_invalid_reason = $1 WHERE ro_number = 'P-3'`, [note]);
    // 520 h later on 1 July (20 h the same day): 2 July's 540 h is 20 h after it, valid again; 3 July's 545 h
    // would pass too, but its verdict is another rule's: it stays set aside, with its reason, and unrecorded
    const s = await load(file("july-late.csv", ["S5,P-4,1,KWRN-20003,2024-07-01,520,ENG-CSA-RELAY"]));
    expect(await verdicts("P")).toEqual([
      { ro: "P-1", valid: true, reason: null },
      { ro: "P-4", valid: true, reason: null },
      { ro: "P-2", valid: true, reason: null },
      { ro: "P-3", valid: false, reason: note },
    ]);
    expect((await changesOf(s.batchId)).map((c) => [c.d, c.was_valid, c.now_valid])).toEqual([["2024-07-02", false, true]]);
  });

  it("changes nothing when the same readings are loaded again", async () => {
    const before = await snapshot(t.pool);
    const changes = async () => (await t.pool.query(`SELECT count(*)::int AS n FROM hour_verdict_change`)).rows[0].n;
    const recorded = await changes();
    // the same file: known by its sha256
    expect(await load(path.join(dir, "february.csv"))).toMatchObject({ status: "already_loaded" });
    // the same rows in other files (another order, another name): read, judged again, nothing changes
    const lines = (name: string) => readFileSync(path.join(dir, name), "utf8").trim().split("\n");
    const [header, ...rows] = lines("may-late.csv");
    expect(await load(write("may-late-again.csv", [header, ...rows.reverse()]))).toMatchObject({ status: "loaded", read: 2, unchanged: 2, rejected: 0 });
    copyFileSync(path.join(dir, "february.csv"), path.join(dir, "february-again.csv"));
    writeFileSync(path.join(dir, "february-again.csv"), "\n", { flag: "a" });
    expect(await load(path.join(dir, "february-again.csv"))).toMatchObject({ status: "loaded", read: 1, unchanged: 1, rejected: 0 });
    expect(await load(write("june-ro-again.csv", [...lines("june-ro.csv"), ""]))).toMatchObject({ status: "loaded", read: 1, unchanged: 1 });
    expect(await snapshot(t.pool)).toEqual(before);
    expect(await changes()).toBe(recorded);
  });

  it("leaves exposure folded in after each load equal to a full rebuild", async () => {
    // each load above was followed by an incremental refresh (the load helper); rebuilt in full, nothing differs
    const derived = async () => ({
      trail: (await t.pool.query(`SELECT * FROM agg_machine_trail ORDER BY machine_key`)).rows,
      shares: (await t.pool.query(
        `SELECT (to_jsonb(a) - 'engine_hours')::text AS grain, round(a.engine_hours::numeric, 6)::text AS h FROM agg_exposure_machine a ORDER BY 1`,
      )).rows,
    });
    const folded = await derived();
    expect(folded.trail.length).toBe(3);
    await refreshExposure(t.db, { full: true });
    expect(await derived()).toEqual(folded);
  });
});
