import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile, upsertShops } from "../../etl/index.js";
import { benchLineId, benchSheetPaths, type BenchSheet } from "../../shared/schemas/bench-sheet.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// The bench sheet saves through the ETL's loader. Unit factors: NIST Special Publication 811 (2008), Appendix
// B.8 (psi → Pa 6.894 757 E+03, printed to 7 significant figures; t/°C = (t/°F − 32)/1.8 exactly) and the SI
// prefix k = 10³ (NIST SP 811 §4.3). Everything else here checks the sheet against the loader itself: the same
// readings loaded from a shop's export must land as the same rows.

const ORIGIN = "http://127.0.0.1:8080";
let t: TestApp;
let tech: string;
let otherTech: string;
let analyst: string;
const dir = mkdtempSync(path.join(tmpdir(), "bench-sheet-test-"));

const file = (name: string, lines: string[]) => {
  const p = path.join(dir, name);
  writeFileSync(p, `${lines.join("\n")}\n`);
  return p;
};

const JOBS_HEAD = "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,complaint,component_code";

async function count(table: string, where = "TRUE"): Promise<number> {
  const r = await t.pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM ${table} WHERE ${where}`);
  return r.rows[0]!.n;
}

const readingCols = `kind, position, attempt, value::text, unit, over_range, raw_value, raw_unit, conversion_rule, measured_date::text, machine_key::text, shop_key::text`;
async function readingsOf(shop: string, ro: string, line: number) {
  const r = await t.pool.query(
    `SELECT ${readingCols} FROM fact_measurement fm
     WHERE fm.repair_line_key = wh_key('repair_line|' || $1 || '|' || $2 || '|' || $3) ORDER BY kind, position, attempt`,
    [shop, ro, line],
  );
  return r.rows;
}

const put = (cookie: string, id: string, body: unknown) => request(t.app).put(benchSheetPaths.sheet(id)).set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);

/** A sheet with every kind of reading, in the units a technician might meet: °F, kΩ, "OL", kPa. */
const fullSheet: BenchSheet = {
  readingDate: "2025-01-16",
  conditions: { ambient: { value: 14, unit: "F" }, engine: "cold", hourMeter: 812.5 },
  railVoltage: 11.8,
  preheatLamp: true,
  plugs: [
    { position: 1, resistance: { unit: "ohm", value: 0.9 }, bench: "heats" },
    { position: 2, resistance: { unit: "kohm", value: 42 }, bench: "no_heat" },
    { position: 3, resistance: { unit: "OL" }, bench: "not_tested" },
    { position: 4, resistance: null, bench: "heats" },
  ],
  compression: { unit: "kPa", cylinders: [{ position: 1, attempts: [2900, 2930] }, { position: 2, attempts: [2860] }] },
};

beforeAll(async () => {
  t = await testApp();
  await upsertShops(t.pool, [{ code: "S1", name: "North test shop" }, { code: "S2", name: "East test shop" }, { code: "S3", name: "West test shop" }]);
  const machines = file("machines.csv", [
    "serial,model_code,engine_serial,build_date,delivery_date,delivery_hours,home_shop",
    "KDLV-20001,DLV,E26-70001,2022-09-01,2022-10-03,1.0,S1",
    "KSKL-20002,SKL,E26-70002,2022-09-05,2022-10-10,1.5,S2",
    "KTRN-20003,TRN,E38-70003,2022-09-09,2022-10-17,2.0,S3",
  ]);
  await loadFile(t.pool, { path: machines, profile: "generic-machines", loadedBy: "test" });
  const jobs = file("jobs.csv", [
    JOBS_HEAD,
    "S1,T-1,1,KDLV-20001,2025-01-15,,810,Hard start when cold,ENG-CSA-HPLUG",
    "S1,T-2,1,KDLV-20001,2025-01-15,,810,Hard start when cold,ENG-CSA-HPLUG",
    "S1,T-3,1,KDLV-20001,2024-03-01,2024-03-02,400,Hydraulic hose weeping,HYD-LIN-HOSE",
    "S3,W-1,1,KTRN-20003,2025-01-10,,950,Slow to crank,ENG-CSA-GRID",
  ]);
  const s = await loadFile(t.pool, { path: jobs, profile: "generic-jobs", loadedBy: "test" });
  if (s.rejected) throw new Error(`the test's jobs were refused: ${s.rejected}`);
  tech = await t.signInAs({ roles: ["technician"], shops: ["S1", "S2"], name: "Ansel Moorcroft" });
  otherTech = await t.signInAs({ roles: ["technician"], shops: ["S3"], name: "Brenna Thackett" });
  analyst = await t.signInAs({ roles: ["analyst"], name: "Teodor Quill" });
}, 120_000);

afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe("GET /api/bench-sheet/lines?q=", () => {
  it("finds an open line of the caller's shops by RO number in any case", async () => {
    const r = await request(t.app).get(benchSheetPaths.search("t-1")).set("Cookie", tech).expect(200);
    expect(r.body.lines.map((l: { id: string }) => l.id)).toEqual([benchLineId("S1", "T-1", 1)]);
    expect(r.body.lines[0]).toMatchObject({ serial: "KDLV20001", engineFamily: "K26-4R", cylinders: 4, createdOnSheet: false });
  });
  it("finds open lines by serial written with dashes and spaces, and leaves out a line closed long ago", async () => {
    const r = await request(t.app).get(benchSheetPaths.search("kdlv 20001")).set("Cookie", tech).expect(200);
    expect(r.body.lines.map((l: { roNumber: string }) => l.roNumber).sort()).toEqual(["T-1", "T-2"]);
  });
  it("does not list another shop's line to a technician", async () => {
    const r = await request(t.app).get(benchSheetPaths.search("W-1")).set("Cookie", tech).expect(200);
    expect(r.body.lines).toEqual([]);
    const own = await request(t.app).get(benchSheetPaths.search("W-1")).set("Cookie", otherTech).expect(200);
    expect(own.body.lines).toHaveLength(1);
  });
});

describe("PUT /api/bench-sheet/lines/:id/sheet", () => {
  describe("with every kind of reading", () => {
    let saved: request.Response;
    beforeAll(async () => {
      saved = await put(tech, benchLineId("S1", "T-1", 1), fullSheet);
    });

    it("stores the readings through the loader", () => {
      expect(saved.status, saved.text).toBe(200);
      expect(saved.body.stored).toBe(14); // 13 readings and the hour meter
    });

    it("lands row for row as the same readings loaded from a generic measurements export", async () => {
      const exportFile = file("export-measurements.csv", [
        "shop_code,ro_number,line_no,kind,position,attempt,value,unit",
        "S1,T-2,1,ambient_temperature,0,1,14,F",
        "S1,T-2,1,engine_state,0,1,cold,",
        "S1,T-2,1,rail_voltage,0,1,11.8,V",
        "S1,T-2,1,preheat_lamp,0,1,lit,",
        "S1,T-2,1,plug_resistance,1,1,0.9,ohm",
        "S1,T-2,1,bench_test,1,1,heats,",
        "S1,T-2,1,plug_resistance,2,1,42,kohm",
        "S1,T-2,1,bench_test,2,1,no heat,",
        "S1,T-2,1,plug_resistance,3,1,OL,",
        "S1,T-2,1,bench_test,4,1,heats,",
        "S1,T-2,1,compression,1,1,2900,kPa",
        "S1,T-2,1,compression,1,2,2930,kPa",
        "S1,T-2,1,compression,2,1,2860,kPa",
      ]);
      const s = await loadFile(t.pool, { path: exportFile, profile: "generic-measurements", loadedBy: "test" });
      expect(s.rejected).toBe(0);
      const fromSheet = await readingsOf("S1", "T-1", 1);
      const fromExport = await readingsOf("S1", "T-2", 1);
      expect(fromSheet).toHaveLength(13);
      expect(fromSheet).toEqual(fromExport);
    });

    it("converts each reading as NIST SP 811 gives (kPa → psi, °F → °C, kΩ → Ω)", async () => {
      const rows = await readingsOf("S1", "T-1", 1);
      const value = (kind: string, position: number, attempt = 1) => Number(rows.find((r) => r.kind === kind && r.position === position && r.attempt === attempt)!.value);
      // 2,900 kPa = 2,900,000 Pa ÷ 6,894.757 Pa/psi
      expect(value("compression", 1)).toBeCloseTo(2_900_000 / 6894.757, 3);
      expect(value("compression", 2)).toBeCloseTo(2_860_000 / 6894.757, 3);
      expect(value("ambient_temperature", 0)).toBe(-10); // (14 − 32) / 1.8
      expect(value("plug_resistance", 2)).toBe(42_000);
      expect(rows.find((r) => r.kind === "plug_resistance" && r.position === 3)).toMatchObject({ value: null, over_range: true, raw_value: "OL" });
    });

    it("records that the readings came from the sheet, by whom and when", async () => {
      const r = await request(t.app).get(benchSheetPaths.line(benchLineId("S1", "T-1", 1))).set("Cookie", analyst).expect(200);
      expect(r.body.readings).toHaveLength(13);
      for (const x of r.body.readings) expect(x).toMatchObject({ source: "sheet", loadedBy: "Ansel Moorcroft" });
      expect(Date.now() - Date.parse(r.body.readings[0].loadedAt)).toBeLessThan(10 * 60_000);
      expect(r.body.hourMeter).toEqual({ hours: 812.5, readingDate: "2025-01-16", loadedBy: "Ansel Moorcroft" });
      expect(r.body.line.sheetReadings).toBe(13);
      const b = await t.pool.query(`SELECT file_name, source, kind FROM etl_batch WHERE source = 'sheet' ORDER BY batch_id`);
      expect(b.rows.map((x) => x.kind)).toEqual(["measurements", "hours"]);
      for (const x of b.rows) expect(x.file_name).toMatch(/^bench sheet T-1\/1 \d{4}-\d{2}-\d{2} \d{2}-\d{2}-\d{2} (measurements|hours)\.csv$/);
    });

    it("shows on the repair detail who entered each reading on the bench sheet", async () => {
      const key = (await t.pool.query(`SELECT wh_key('repair_line|S1|T-1|1')::text AS k`)).rows[0].k;
      const r = await request(t.app).get(`/api/repairs/${key}`).set("Cookie", analyst).expect(200);
      const reading = r.body.measurements.find((m: { kind: string }) => m.kind === "rail_voltage");
      expect(reading.sheet).toMatchObject({ by: "Ansel Moorcroft" });
    });

    it("leaves the derived exposure refreshed up to the sheet's last batch, as after an upload", async () => {
      // the export loaded by the test above came after the save and was not followed by a refresh
      const r = await t.pool.query(`SELECT last_batch::text AS b, (SELECT max(batch_id)::text FROM etl_batch WHERE source = 'sheet') AS latest FROM agg_refresh WHERE name = 'exposure'`);
      expect(r.rows[0]).toBeDefined();
      expect(r.rows[0].b).toBe(r.rows[0].latest);
    });
  });

  describe("with impossible values", () => {
    it("refuses every one in words, names its field, and stores nothing", async () => {
      const before = { readings: await count("fact_measurement"), hours: await count("fact_meter_reading"), batches: await count("etl_batch") };
      const r = await put(tech, benchLineId("S1", "T-1", 1), {
        ...fullSheet,
        readingDate: "2099-01-01",
        plugs: [{ position: 1, resistance: { unit: "ohm", value: -1 }, bench: "heats" }],
        compression: { unit: "psi", cylinders: [{ position: 1, attempts: [420, 9000] }] },
      });
      expect(r.status).toBe(422);
      expect(r.body.error.code).toBe("sheet_refused");
      expect(r.body.error.message).toMatch(/^Nothing was saved: 3 values were refused\./);
      const refused = r.body.error.details.refused as { field: string; label: string; value: string; reason: string }[];
      expect(refused.map((x) => x.field).sort()).toEqual(["compression.cylinders.0.attempts.1", "plugs.0.resistance", "readingDate"]);
      expect(refused.find((x) => x.field === "plugs.0.resistance")).toEqual({ field: "plugs.0.resistance", label: "Plug 1 resistance", value: "-1 Ω", reason: "resistance -1 Ω is negative" });
      expect(refused.find((x) => x.field === "compression.cylinders.0.attempts.1")?.reason).toMatch(/compression 9,000 psi is beyond any plausible value/);
      expect(refused.find((x) => x.field === "readingDate")?.reason).toMatch(/2099-01-01 is in the future/);
      expect(JSON.stringify(r.body)).not.toMatch(/violates|constraint|SQL|stg/i);
      expect({ readings: await count("fact_measurement"), hours: await count("fact_meter_reading"), batches: await count("etl_batch") }).toEqual(before);
    });

    it("refuses two rows for the same plug before anything is loaded", async () => {
      const r = await put(tech, benchLineId("S1", "T-1", 1), { ...fullSheet, plugs: [fullSheet.plugs[0], fullSheet.plugs[0]] });
      expect(r.status).toBe(400);
      expect(r.body.error.message).toBe("Plug 1 is on the sheet twice; enter each once.");
    });

    it("refuses a sheet that is not a sheet with the field named in words (400)", async () => {
      const r = await put(tech, benchLineId("S1", "T-1", 1), { ...fullSheet, railVoltage: "twelve" });
      expect(r.status).toBe(400);
      expect(r.body.error.message).toMatch(/railVoltage/);
    });
  });
});

describe("POST /api/bench-sheet/lines", () => {
  const newLine = { shopCode: "S2", roNumber: "N-7", lineNo: 1, serial: "KSKL-20002", openedDate: "2025-01-20", complaint: "No start below freezing" };
  const id = benchLineId("S2", "N-7", 1);

  it("adds a line the shop has not exported yet, marked as created on the sheet", async () => {
    const r = await request(t.app).post(benchSheetPaths.lines()).set("Cookie", tech).set("Origin", ORIGIN).send(newLine);
    expect(r.status, r.text).toBe(201);
    expect(r.body.line).toMatchObject({ id, createdOnSheet: true, complaint: "No start below freezing", closedDate: null });
    const again = await request(t.app).post(benchSheetPaths.lines()).set("Cookie", tech).set("Origin", ORIGIN).send(newLine);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toBe("Repair order N-7 line 1 of shop S2 is already in Ironledger; search for it and open it.");
  });

  it("merges the shop's later export of the same shop + RO + line into it: one line, the export's fields, the sheet's readings kept", async () => {
    const saved = await put(tech, id, { ...fullSheet, readingDate: "2025-01-20", conditions: { ...fullSheet.conditions, hourMeter: null } });
    expect(saved.status, saved.text).toBe(200);
    const readingsBefore = await readingsOf("S2", "N-7", 1);
    expect(readingsBefore).toHaveLength(13);
    const exportFile = file("export-jobs.csv", [
      `${JOBS_HEAD},cause,pay_type`,
      "S2,N-7,1,KSKL-20002,2025-01-20,2025-01-22,655,Hard start in the cold (customer),ENG-CSA-HPLUG,Plug 2 open circuit,warranty",
    ]);
    const s = await loadFile(t.pool, { path: exportFile, profile: "generic-jobs", loadedBy: "test" });
    expect(s).toMatchObject({ rejected: 0, inserted: 0, updated: 1 });
    expect(await count("fact_repair_line", "ro_number = 'N-7'")).toBe(1);
    const line = await t.pool.query(`SELECT complaint, cause, closed_date::text, pay_type, hour_meter::text FROM fact_repair_line WHERE ro_number = 'N-7'`);
    expect(line.rows[0]).toEqual({ complaint: "Hard start in the cold (customer)", cause: "Plug 2 open circuit", closed_date: "2025-01-22", pay_type: "warranty", hour_meter: "655.0" });
    expect(await readingsOf("S2", "N-7", 1)).toEqual(readingsBefore);
    const r = await request(t.app).get(benchSheetPaths.line(id)).set("Cookie", tech).expect(200);
    expect(r.body.line).toMatchObject({ createdOnSheet: true, complaint: "Hard start in the cold (customer)", sheetReadings: 13 });
  });

  it("refuses a line opened in the future or on a machine Ironledger does not know, in words, and adds nothing", async () => {
    const lines = await count("fact_repair_line");
    const future = await request(t.app).post(benchSheetPaths.lines()).set("Cookie", tech).set("Origin", ORIGIN)
      .send({ ...newLine, roNumber: "N-8", openedDate: "2099-02-01" });
    expect(future.status).toBe(422);
    expect(future.body.error.details.refused).toEqual([
      { field: "openedDate", label: "Opened date", value: "S2 N-8/1", reason: "opened date 2099-02-01 is in the future" },
    ]);
    const unknown = await request(t.app).post(benchSheetPaths.lines()).set("Cookie", tech).set("Origin", ORIGIN)
      .send({ ...newLine, roNumber: "N-9", serial: "KZZZ-99999" });
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.details.refused[0]).toMatchObject({ field: "serial", label: "Serial" });
    expect(await count("fact_repair_line")).toBe(lines);
  });
});

describe("a technician and another shop's lines", () => {
  const west = benchLineId("S3", "W-1", 1);

  it("cannot read another shop's line (404 in words)", async () => {
    const r = await request(t.app).get(benchSheetPaths.line(west)).set("Cookie", tech).expect(404);
    expect(r.body.error.message).toBe("Repair order W-1 line 1 is not among your shops' lines.");
    expect(r.text).not.toContain("S3");
  });

  it("cannot save a sheet on it, and nothing is stored", async () => {
    const before = await count("fact_measurement");
    const r = await put(tech, west, fullSheet);
    expect(r.status).toBe(404);
    expect(await count("fact_measurement")).toBe(before);
  });

  it("cannot add a line to another shop (403 in words)", async () => {
    const r = await request(t.app).post(benchSheetPaths.lines()).set("Cookie", tech).set("Origin", ORIGIN)
      .send({ shopCode: "S3", roNumber: "W-2", lineNo: 1, serial: "KTRN-20003", openedDate: "2025-01-20", complaint: "Slow to crank" });
    expect(r.status).toBe(403);
    expect(r.body.error.message).toBe("That shop is not one of yours; you can add lines only to your own shops.");
  });

  it("is refused the analytics (rates, life, clusters, benchmarks, claims, imports, admin)", async () => {
    for (const p of ["/api/analytics/rates/hour-bands", "/api/analytics/life/weibull", "/api/analytics/clusters", "/api/benchmarks/shops", "/api/claims", "/api/imports", "/api/admin/users", "/api/repairs", "/api/overview"]) {
      const r = await request(t.app).get(p).set("Cookie", tech);
      expect(`${p} ${r.status}`).toBe(`${p} 403`);
    }
  });

  it("leaves an analyst reading but not writing", async () => {
    await request(t.app).get(benchSheetPaths.line(west)).set("Cookie", analyst).expect(200);
    const r = await put(analyst, west, fullSheet);
    expect(r.status).toBe(403);
  });
});
