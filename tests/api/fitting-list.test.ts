import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { parse } from "csv-parse/sync";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { coldShopCodes } from "../../server/db/queries/shops.js";
import { fittingListSchema, type FittingList } from "../../shared/schemas/fitting-list.js";

// The list's rules (cold shop, order) are the product's own and are stated in the response; these tests check
// that the API follows them on the demo world, against the warehouse read directly, and keeps a manager to their shops.

let t: TestApp;
let analyst: string;
let managerS1: string;
let managerS5: string;
let list: FittingList;
const work = mkdtempSync(path.join(tmpdir(), "fitting-"));

function pdfText(buf: Buffer): string {
  const file = path.join(work, `f-${Date.now()}.pdf`);
  writeFileSync(file, buf);
  return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
}

const getList = async (cookie: string) => fittingListSchema.parse((await request(t.app).get("/api/winter/fitting").set("Cookie", cookie).expect(200)).body);

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  managerS1 = await t.signInAs({ roles: ["manager"], shops: ["S1"] });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
  list = await getList(analyst);
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("GET /api/winter/fitting", () => {
  it("lists every machine in service at a cold shop without a block heater, and no other", async () => {
    const cold = [...(await coldShopCodes(t.db))].sort();
    expect(list.coldShops.map((s) => s.code)).toEqual(cold);
    const expected = await sql<{ serial: string }>`
      SELECT m.serial FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key
      WHERE s.shop_code IN (${sql.join(cold.map((c) => sql`${c}`))}) AND m.delivery_date <= ${list.asOf}::date AND NOT m.block_heater_fitted
        AND NOT EXISTS (SELECT 1 FROM fact_repair_line l JOIN dim_component c USING (component_key) WHERE l.machine_key = m.machine_key AND c.component_code = 'ENG-COO-BLKHTR')
    `.execute(t.db);
    expect(list.rows.map((r) => r.serial).sort()).toEqual(expected.rows.map((r) => r.serial).sort());
    expect(list.rows.length).toBeGreaterThan(100);
    expect(new Set(list.rows.map((r) => r.shopCode)).size).toBe(cold.length);
  });

  it("puts the recent deliveries first, newest first, then the rest by hours on their cold-start parts, most first", () => {
    const firstOld = list.rows.findIndex((r) => r.priority === "old-cold-start-parts");
    expect(firstOld).toBeGreaterThan(0);
    const recent = list.rows.slice(0, firstOld);
    const old = list.rows.slice(firstOld);
    expect(recent.every((r) => r.priority === "clean-socket" && r.ageMonths <= list.cleanSocketMonths)).toBe(true);
    expect(old.every((r) => r.priority === "old-cold-start-parts" && r.ageMonths > list.cleanSocketMonths)).toBe(true);
    for (let i = 1; i < recent.length; i++) expect(recent[i - 1].deliveryDate >= recent[i].deliveryDate).toBe(true);
    for (let i = 1; i < old.length; i++) expect((old[i - 1].coldStartPartHours ?? -1) >= (old[i].coldStartPartHours ?? -1)).toBe(true);
    expect(list.orderRule).toMatch(/newest delivery first/);
    expect(list.coldRule).toMatch(/20 °F/);
  });

  it("counts the cold-start part's hours from delivery unless it was replaced", async () => {
    const machines = await t.db.selectFrom("dim_machine").select(["serial", "delivery_hours"]).execute();
    const deliveryHours = new Map(machines.map((m) => [m.serial, m.delivery_hours === null ? null : Number(m.delivery_hours)]));
    const original = list.rows.filter((r) => r.coldStartPartFitted === r.deliveryDate && r.hourMeter !== null && deliveryHours.get(r.serial) !== null);
    expect(original.length).toBeGreaterThan(50);
    for (const r of original.slice(0, 200)) expect(r.coldStartPartHours).toBeCloseTo(Math.max(0, r.hourMeter! - deliveryHours.get(r.serial)!), 6);
    const replaced = list.rows.filter((r) => r.coldStartPartFitted > r.deliveryDate);
    expect(replaced.length).toBeGreaterThan(0);
    for (const r of replaced) expect(r.coldStartPartHours!).toBeLessThanOrEqual(r.hourMeter!);
  });

  it("carries the block-heater cautions and the deference to the maker's manual and local codes", () => {
    const all = list.cautions.join(" ");
    for (const words of ["grounded plug", "outdoor-rated heavy-gauge cord", "GFCI", "corrosion", "arcing", "licensed electrician", "hot coolant", "service manual", "local codes"]) {
      expect(all).toContain(words);
    }
  });

  it("gives a manager only their own shop", async () => {
    const mine = await getList(managerS1);
    expect(mine.coldShops.map((s) => s.code)).toEqual(["S1"]);
    expect(mine.rows.length).toBeGreaterThan(0);
    expect(mine.rows.every((r) => r.shopCode === "S1")).toBe(true);
    expect(mine.rows.map((r) => r.serial)).toEqual(list.rows.filter((r) => r.shopCode === "S1").map((r) => r.serial));
  });

  it("gives a manager of a mild shop an empty list that says the shop is not cold", async () => {
    const mild = await getList(managerS5);
    expect(mild.rows).toEqual([]);
    expect(mild.coldShops).toEqual([]);
    expect(mild.otherShops).toEqual(["S5"]);
  });

  it("refuses a warranty clerk (403) and a visitor without a session (401)", async () => {
    const clerk = await t.signInAs({ roles: ["clerk"] });
    await request(t.app).get("/api/winter/fitting").set("Cookie", clerk).expect(403);
    await request(t.app).get("/api/winter/fitting/list.csv").expect(401);
  });
});

describe("GET /api/winter/fitting/list.csv", () => {
  it("writes the list in its order with the units in the headers", async () => {
    const res = await request(t.app).get("/api/winter/fitting/list.csv").set("Cookie", managerS1).expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/attachment; filename="?block-heater-fitting-\d{4}-\d{2}-\d{2}\.csv"?/);
    const [header, ...rows] = parse(res.text) as string[][];
    expect(header).toEqual([
      "shop", "shop_name", "serial", "model_line", "engine_family", "delivery_date", "age_months", "hour_meter_h",
      "cold_start_part", "cold_start_part_fitted", "cold_start_part_age_h", "priority", "why_listed",
    ]);
    const mine = list.rows.filter((r) => r.shopCode === "S1");
    expect(rows.map((r) => r[2])).toEqual(mine.map((r) => r.serial));
    expect(Number(rows[0][6])).toBe(mine[0].ageMonths);
    expect(Number(rows[0][7])).toBe(Math.round(mine[0].hourMeter!));
  });
});

describe("GET /api/winter/fitting/list.pdf", () => {
  it("prints the list with the block-heater cautions", async () => {
    const res = await request(t.app).get("/api/winter/fitting/list.pdf").set("Cookie", managerS1).responseType("blob").expect(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    const text = pdfText(res.body as Buffer).replace(/\s+/g, " ");
    expect(text).toContain("Block-heater fitting list");
    for (const words of ["grounded plug", "GFCI outlet", "arcing", "licensed electrician", "hot coolant", "service manual", "local codes"]) {
      expect(text).toContain(words);
    }
    const mine = list.rows.filter((r) => r.shopCode === "S1");
    expect(text).toContain(mine[0].serial);
    expect(text).toContain(mine[mine.length - 1].serial);
    expect(text).not.toMatch(/\bS2\b/);
  });
});
