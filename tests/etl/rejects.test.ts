import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile, type BatchSummary } from "../../etl/load/load-file.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { count, dropTestDb, fixture, rejectsOf, TODAY } from "./helpers.js";

describe("loadFile with bad rows", () => {
  let t: TestDb;
  let jobs: BatchSummary;
  let byLine: Map<number, { reason_code: string; reason: string; raw_row: Record<string, string> }>;

  beforeAll(async () => {
    t = await freshTestDb();
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
    jobs = await loadFile(t.pool, { path: fixture("jobs-bad-rows.csv"), loadedBy: "test", today: TODAY });
    byLine = new Map((await rejectsOf(t.pool, jobs.batchId)).map((r) => [r.row_number, r]));
  });
  afterAll(async () => dropTestDb(t));

  it("loses no row: every row read is either in the facts or in etl_reject", async () => {
    expect(jobs).toMatchObject({ read: 16, inserted: 3, updated: 0, unchanged: 0, rejected: 13 });
    expect(await count(t.pool, "fact_repair_line")).toBe(3);
    expect(byLine.size).toBe(13);
  });

  const cases: [line: number, code: string, reason: RegExp][] = [
    [3, "bad_date", /opened date "2024-13-45" is not a date/],
    [4, "bad_number", /hour meter "12x4" is not a number/],
    [5, "future_date", /opened date 2099-01-01 is in the future/],
    [6, "closed_before_opened", /closed 2024-01-11 before it was opened 2024-01-12/],
    [7, "hour_meter_backwards", /^hour meter 3,812 h is lower than the 4,020 h recorded for this machine on 2024-01-03/],
    [9, "negative_value", /labour hours -1\.5 h is negative/],
    [10, "unknown_machine", /machine serial ZZ0000000 is not in the machine master/],
    [11, "unknown_code", /component code "FLUX-CAPACITOR" is not in this shop's code table/],
    [12, "missing_field", /required field is blank: ro number/],
    [13, "wrong_column_count", /the row has 5 fields but the header has 30/],
    [14, "duplicate_in_file", /the same line is already on line 2 of this file/],
    [15, "conflicting_duplicate", /repair order R-9 line 1 appears 2 times in this file with different contents \(lines 15, 16\)/],
    [16, "conflicting_duplicate", /none of them was loaded/],
  ];
  for (const [line, code, reason] of cases) {
    it(`rejects line ${line} as ${code} with a reason in plain words`, () => {
      const r = byLine.get(line);
      expect(r?.reason_code).toBe(code);
      expect(r?.reason).toMatch(reason);
    });
  }

  it("keeps the raw row keyed by the file's own header", () => {
    expect(byLine.get(4)?.raw_row).toMatchObject({ ro_number: "R-3", hour_meter: "12x4", serial: "KDLV-20001" });
  });

  it("keeps the raw row of rows that only the whole-file checks reject, read back from the file", () => {
    // lines 7 (hour meter backwards), 10 (unknown machine), 14–16 (duplicates) are staged without raw fields
    expect(byLine.get(7)?.raw_row).toMatchObject({ hour_meter: "3812" });
    expect(byLine.get(10)?.raw_row).toMatchObject({ serial: "ZZ00-00000" });
    for (const line of [14, 15, 16]) expect(Object.keys(byLine.get(line)?.raw_row ?? {})).toHaveLength(30);
    expect(byLine.get(15)?.raw_row.ro_number).toBe("R-9");
  });

  it("accepts a reading below the earlier ones when its meter note says the meter was replaced, starting a new generation", async () => {
    const r = await t.pool.query(
      `SELECT r.hours, r.meter_change, r.meter_generation, r.valid FROM fact_hour_reading r JOIN fact_repair_line f USING (repair_line_key) WHERE f.ro_number = 'R-7'`,
    );
    expect(r.rows).toEqual([{ hours: "15.0", meter_change: true, meter_generation: 1, valid: true }]);
  });

  it("rejects a reading that is lower than one already in the warehouse from an earlier file", async () => {
    const s = await loadFile(t.pool, { path: fixture("hours-backwards.csv"), loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 2, inserted: 1, rejected: 1 });
    const [r] = await rejectsOf(t.pool, s.batchId);
    expect(r).toMatchObject({ row_number: 2, reason_code: "hour_meter_backwards" });
    expect(r.reason).toMatch(/^hour meter 3,900 h is lower than the 4,020 h recorded for this machine on 2024-01-03/);
  });

  it("rejects measurements that are absurd, negative, of an unknown kind or for a repair line not loaded yet", async () => {
    await loadFile(t.pool, { path: fixture("jobs-export-1.csv"), loadedBy: "test", today: TODAY });
    const s = await loadFile(t.pool, { path: fixture("measurements-bad.csv"), loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 6, inserted: 2, rejected: 4 });
    const reasons = (await rejectsOf(t.pool, s.batchId)).map((r) => [r.row_number, r.reason_code, r.reason]);
    expect(reasons).toEqual([
      [3, "absurd_value", "compression 40,000 psi is beyond any plausible value (at most 1,000 psi)"],
      [4, "negative_value", "rail voltage -3 V is negative"],
      [5, "unknown_code", `measurement kind "oil_pressure" is not in this shop's code table or Ironledger's list`],
      [6, "unknown_repair_line", "repair order R-999 line 1 of shop S4 is not in the warehouse; load the jobs export that has it first"],
    ]);
  });
});

describe("hour-meter checks in a warehouse without any meter change", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
  });
  afterAll(async () => dropTestDb(t));

  const header = readFileSync(fixture("jobs-bad-rows.csv"), "utf8").split("\n")[0];
  const line = (ro: string, date: string, hours: number, meterNote = "") =>
    `S4,${ro},1,KDLV-20001,${date},${date},${hours},${meterNote},Noise,Worn,Replaced,HYD-LIN-HOSE,WEAR,,1.0,1.0,40.00,110.00,customer,failure,S4-T1,,,,,,,N,,`;
  const jobsFile = (lines: string[]) => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "etl-hours-")), "jobs.csv");
    writeFileSync(file, [header, ...lines].join("\n") + "\n");
    return file;
  };
  const verdicts = async () =>
    (await t.pool.query(`SELECT f.ro_number, r.valid, r.meter_generation FROM fact_hour_reading r JOIN fact_repair_line f USING (repair_line_key) ORDER BY 1`)).rows;

  it("still rejects a reading below an earlier one and sets aside a rise of more than 24 h a day", async () => {
    const file = jobsFile([line("H-1", "2024-01-03", 4020), line("H-2", "2024-02-01", 3812), line("H-3", "2024-01-04", 4100)]);
    const s = await loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 3, inserted: 2, rejected: 1 });
    const [reject] = await rejectsOf(t.pool, s.batchId);
    expect(reject).toMatchObject({ row_number: 3, reason_code: "hour_meter_backwards" });
    expect(await verdicts()).toEqual([
      { ro_number: "H-1", valid: true, meter_generation: 0 },
      { ro_number: "H-3", valid: false, meter_generation: 0 },
    ]);
  });

  it("stores the verdicts of a file in which no reading goes backwards, and gives a corrected line the usual verdict back", async () => {
    // a rise of 100 h in one day is set aside; a replaced meter starts generation 1 even though it reads lower
    const first = await loadFile(t.pool, {
      path: jobsFile([line("H-4", "2024-03-01", 4200), line("H-5", "2024-03-02", 4300), line("H-6", "2024-04-01", 10, "meter replaced")]),
      loadedBy: "test",
      today: TODAY,
    });
    expect(first).toMatchObject({ read: 3, inserted: 3, rejected: 0 });
    expect(await verdicts()).toEqual([
      { ro_number: "H-1", valid: true, meter_generation: 0 },
      { ro_number: "H-3", valid: false, meter_generation: 0 },
      { ro_number: "H-4", valid: true, meter_generation: 0 },
      { ro_number: "H-5", valid: false, meter_generation: 0 },
      { ro_number: "H-6", valid: true, meter_generation: 1 },
    ]);
    // the next export corrects H-5 to a plausible reading: its line is updated and its reading is valid again
    const second = await loadFile(t.pool, { path: jobsFile([line("H-4", "2024-03-01", 4200), line("H-5", "2024-03-02", 4210)]), loadedBy: "test", today: TODAY });
    expect(second).toMatchObject({ read: 2, inserted: 0, updated: 1, unchanged: 1, rejected: 0 });
    expect((await verdicts()).find((v) => v.ro_number === "H-5")).toEqual({ ro_number: "H-5", valid: true, meter_generation: 0 });
  });
});
