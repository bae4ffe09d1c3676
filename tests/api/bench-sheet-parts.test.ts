import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { quantile } from "d3-array";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile } from "../../etl/index.js";
import { layouts } from "../../etl/layouts.js";
import { plugParts } from "../../server/db/queries/bench-sheet.js";
import { benchLineId, benchSheetPaths, type BenchLineDetail } from "../../shared/schemas/bench-sheet.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// The heater plug's availability on the bench sheet, on the invented demo world (../shared/SCENARIO.md). The
// wait figures are checked against d3-array's quantile over the raw waits read straight from the warehouse:
// d3's quantile is the R-7 definition of Hyndman & Fan (1996), "Sample quantiles in statistical packages", the
// same linear interpolation as PostgreSQL's percentile_cont, so the two must agree to the last digit.

let t: TestApp;
let tech: string;
let otherTech: string;
const dir = mkdtempSync(path.join(tmpdir(), "bench-parts-test-"));

interface Pick {
  shop_code: string;
  ro_number: string;
  line_no: number;
  serial: string;
  part_number: string;
}
let line: Pick;
let otherShop: string;

/** The part number the family's heater-plug lines use most, read straight from the warehouse. */
async function familyPart(family: string): Promise<string> {
  const r = await t.pool.query<{ part_number: string }>(
    `SELECT fl.part_number FROM fact_repair_line fl JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
     WHERE c.component_code = 'ENG-CSA-HPLUG' AND m.engine_family = $1 AND fl.part_number IS NOT NULL
     GROUP BY 1 ORDER BY count(*) DESC, 1 LIMIT 1`,
    [family],
  );
  return r.rows[0]!.part_number;
}

/** The received waits (days) of a part's lines ordered in the 12 months up to `through`. */
async function waits(part: string, through: string): Promise<number[]> {
  const r = await t.pool.query<{ d: number }>(
    `SELECT part_received_date - part_ordered_date AS d FROM fact_repair_line
     WHERE part_number = $1 AND part_received_date IS NOT NULL AND part_received_date >= part_ordered_date
       AND part_ordered_date > ($2::date - interval '12 months')::date AND part_ordered_date <= $2::date`,
    [part, through],
  );
  return r.rows.map((x) => Number(x.d)).sort((a, b) => a - b);
}

const detail = async (cookie: string, l: Pick): Promise<BenchLineDetail> =>
  (await request(t.app).get(benchSheetPaths.line(benchLineId(l.shop_code, l.ro_number, l.line_no))).set("Cookie", cookie).expect(200)).body as BenchLineDetail;

beforeAll(async () => {
  t = await testApp({ demo: true });
  const r = await t.pool.query<Pick>(
    `SELECT s.shop_code, fl.ro_number, fl.line_no, m.serial, fl.part_number
     FROM fact_repair_line fl JOIN dim_machine m USING (machine_key) JOIN dim_shop s USING (shop_key) JOIN dim_component c USING (component_key)
     WHERE c.component_code = 'ENG-CSA-HPLUG' AND m.engine_family = 'K26-4R' AND fl.part_number IS NOT NULL
     ORDER BY fl.opened_date DESC, s.shop_code, fl.ro_number LIMIT 1`,
  );
  line = r.rows[0]!;
  otherShop = (await t.pool.query<{ shop_code: string }>(`SELECT shop_code FROM dim_shop WHERE shop_code <> $1 ORDER BY 1 LIMIT 1`, [line.shop_code])).rows[0]!.shop_code;
  tech = await t.signInAs({ roles: ["technician"], shops: [line.shop_code], name: "Ansel Moorcroft" });
  otherTech = await t.signInAs({ roles: ["technician"], shops: [otherShop], name: "Brenna Thackett" });
}, 600_000);

afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe("GET /api/bench-sheet/lines/:id plugParts", () => {
  it("names the family's heater-plug part and its median and 90th-percentile wait over the last 12 months of data", async () => {
    const d = await detail(tech, line);
    const part = await familyPart("K26-4R");
    const through = (await t.pool.query<{ d: string }>(`SELECT max(part_ordered_date)::text AS d FROM fact_repair_line`)).rows[0]!.d;
    const w = await waits(part, through);
    expect(w.length).toBeGreaterThanOrEqual(5);
    expect(d.plugParts).toEqual({ partNumber: part, typicalWaitDays: quantile(w, 0.5), p90WaitDays: quantile(w, 0.9), backOrderedNow: false, lines: w.length });
  });

  it("reads the back-order winter 2022–23 as a long wait when the window ends in it", async () => {
    const part = await familyPart("K26-4R");
    const winter = await waits(part, "2023-02-28");
    const p = (await plugParts(t.db, "K26-4R", line.shop_code, "2023-02-28"))!;
    expect(p.typicalWaitDays).toBe(quantile(winter, 0.5));
    expect(p.p90WaitDays).toBe(quantile(winter, 0.9));
    const now = (await plugParts(t.db, "K26-4R", line.shop_code))!;
    expect(p.typicalWaitDays!).toBeGreaterThan(now.typicalWaitDays!);
    expect(p.p90WaitDays!).toBeGreaterThan(now.p90WaitDays!);
  });

  it("is null for a family whose lines carry no heater-plug part, and gives no typical wait under 5 lines", async () => {
    expect(await plugParts(t.db, "NO-SUCH-FAMILY", line.shop_code)).toBeNull();
    const few = await plugParts(t.db, "K26-4R", line.shop_code, "1999-12-31");
    expect(few).toMatchObject({ typicalWaitDays: null, p90WaitDays: null, lines: 0 });
  });

  it("says back-ordered now at the line's shop once a line of the part there waits unreceived, and not at another shop", async () => {
    const csv = path.join(dir, "jobs.csv");
    const row: Record<string, string> = {
      shop_code: line.shop_code, ro_number: "BO-1", line_no: "1", serial: line.serial, opened_date: "2025-06-20", complaint: "Hard start when cold",
      component_code: "ENG-CSA-HPLUG", part_number: line.part_number, part_qty: "4", part_ordered_date: "2025-06-20", back_ordered: "yes",
    };
    writeFileSync(csv, `${layouts.jobs.join(",")}\n${layouts.jobs.map((c) => row[c] ?? "").join(",")}\n`);
    const s = await loadFile(t.pool, { path: csv, profile: "generic-jobs", loadedBy: "test" });
    expect(s.rejected).toBe(0);
    expect((await detail(tech, line)).plugParts?.backOrderedNow).toBe(true);
    const theirs = (await t.pool.query<Pick>(
      `SELECT s.shop_code, fl.ro_number, fl.line_no, m.serial, fl.part_number FROM fact_repair_line fl JOIN dim_machine m USING (machine_key) JOIN dim_shop s USING (shop_key)
       WHERE s.shop_code = $1 AND m.engine_family = 'K26-4R' ORDER BY fl.opened_date DESC LIMIT 1`,
      [otherShop],
    )).rows[0]!;
    const d = await detail(otherTech, theirs);
    expect(d.plugParts).toMatchObject({ partNumber: line.part_number, backOrderedNow: false });
  });
});
