import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import { benchLineId, benchSheetPaths, type BenchLineDetail } from "../../shared/schemas/bench-sheet.js";
import { engineSpecPaths, type EngineSpecDetail, type EngineSpecList } from "../../shared/schemas/engine-specs.js";
import type { ClaimDetail } from "../../shared/schemas/claims.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// An engine family's own figures, entered by an administrator, on the invented demo world (../shared/SCENARIO.md).
// Conversions: NIST Special Publication 811 (2008), Appendix B.8: 1 psi = 6.894 757 kPa, 1 bar = 100 kPa. The
// figures typed here are test inputs, not any engine's values; the generic bands they replace (400–500 psi
// target, 290 psi allowable minimum) are DOMAIN.md §3's, common practice, no source.

const ORIGIN = "http://127.0.0.1:8080";
const KPA_PER_PSI = 6.894757; // NIST SP 811 B.8, printed to 7 significant figures
let t: TestApp;
let admin: string;
let analyst: string;
let clerk: string;
let tech: string;
const work = mkdtempSync(path.join(tmpdir(), "ironledger-engine-specs-"));

const good = { unit: "kPa", targetMin: 3000, targetMax: 3400, allowableMin: 2800, plugHealthyMaxOhms: 1.5, source: "engine section, compression table" };
const put = (cookie: string, family: string, body: unknown) => request(t.app).put(engineSpecPaths.admin(family)).set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);

/** A closed, unclaimed heater-plug line inside engine cover with compression readings, of one engine family. */
async function claimableLine(family: string): Promise<string> {
  const r = await t.pool.query<{ key: string }>(
    `SELECT fl.repair_line_key::text AS key FROM fact_repair_line fl JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
     WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter IS NOT NULL AND fl.hour_meter <= 3000
       AND m.delivery_date IS NOT NULL AND fl.opened_date <= (m.delivery_date + interval '36 months')::date AND m.engine_family = $1
       AND EXISTS (SELECT 1 FROM fact_measurement x WHERE x.repair_line_key = fl.repair_line_key AND x.kind = 'compression')
       AND NOT EXISTS (SELECT 1 FROM warranty_claim_line w WHERE w.repair_line_key = fl.repair_line_key)
     ORDER BY fl.repair_line_key LIMIT 1`,
    [family],
  );
  if (!r.rows[0]) throw new Error(`the demo world has no such ${family} line`);
  return r.rows[0].key;
}

beforeAll(async () => {
  t = await testApp({ demo: true });
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin", sub: "admin-1" });
  analyst = await t.signInAs({ roles: ["analyst"], name: "Test Analyst" });
  clerk = await t.signInAs({ roles: ["clerk"], name: "Test Clerk" });
  tech = await t.signInAs({ roles: ["technician"], shops: ["S1", "S2", "S3", "S4", "S5", "S6", "S7", "S8"], name: "Test Technician" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("GET /api/admin/engine-specs", () => {
  it("lists every engine family with no figures of its own yet", async () => {
    const list = (await request(t.app).get(engineSpecPaths.adminList()).set("Cookie", admin).expect(200)).body as EngineSpecList;
    expect(list.families.map((f) => f.engineFamily)).toEqual(["K18-3G", "K26-4R", "K38-4H"]);
    expect(list.families.every((f) => f.current === null && f.versions === 0)).toBe(true);
  });

  it("is for administrators only", async () => {
    await request(t.app).get(engineSpecPaths.adminList()).set("Cookie", analyst).expect(403);
    await request(t.app).get(engineSpecPaths.admin("K26-4R")).set("Cookie", tech).expect(403);
  });
});

describe("PUT /api/admin/engine-specs/:family", () => {
  describe("with figures in kPa from a first entry", () => {
    let saved: request.Response;
    beforeAll(async () => {
      saved = await put(admin, "K26-4R", { spec: good, basedOn: null, note: "Figures from the manual's engine section." });
    });

    it("stores them as version 1 in psi, with the unit they were typed in, who saved them and why", () => {
      expect(saved.status, saved.text).toBe(200);
      const d = saved.body as EngineSpecDetail;
      expect(d.current).toMatchObject({ engineFamily: "K26-4R", version: 1, enteredUnit: "kPa", plugHealthyMaxOhms: 1.5, source: good.source, savedBy: "Test Admin", note: "Figures from the manual's engine section." });
      expect(d.current!.targetMinPsi).toBeCloseTo(3000 / KPA_PER_PSI, 9);
      expect(d.current!.targetMaxPsi).toBeCloseTo(3400 / KPA_PER_PSI, 9);
      expect(d.current!.allowableMinPsi).toBeCloseTo(2800 / KPA_PER_PSI, 9);
      expect(d.history.map((h) => h.version)).toEqual([1]);
    });

    it("keeps the old version when the next is saved in bar, newest first", async () => {
      const r = await put(admin, "K26-4R", { spec: { ...good, unit: "bar", targetMin: 30, targetMax: 34, allowableMin: 29 }, basedOn: 1, note: "Minimum raised in the revised manual." });
      expect(r.status, r.text).toBe(200);
      const d = r.body as EngineSpecDetail;
      expect(d.history.map((h) => h.version)).toEqual([2, 1]);
      // 29 bar = 2,900 kPa = 420.61 psi
      expect(d.current!.allowableMinPsi).toBeCloseTo(2900 / KPA_PER_PSI, 9);
      expect(d.history[1]!.allowableMinPsi).toBeCloseTo(2800 / KPA_PER_PSI, 9);
    });
  });

  it("refuses a minimum above the target and a negative figure in words, and saves nothing", async () => {
    const above = await put(admin, "K18-3G", { spec: { ...good, allowableMin: 3100 }, basedOn: null, note: "access check" });
    expect(above.status).toBe(400);
    expect(above.body.error.code).toBe("validation_failed");
    expect(above.body.error.message).toBe(
      "The figures were not saved: spec.allowableMin: the allowable minimum (3100 kPa) is above the target's low end (3000 kPa); the minimum must be at or below the target.",
    );
    const negative = await put(admin, "K18-3G", { spec: { ...good, allowableMin: -10 }, basedOn: null, note: "access check" });
    expect(negative.status).toBe(400);
    expect(negative.body.error.message).toContain("spec.allowableMin: The allowable minimum must be above zero");
    const plug = await put(admin, "K18-3G", { spec: { ...good, plugHealthyMaxOhms: 40 }, basedOn: null, note: "access check" });
    expect(plug.body.error.message).toContain("at most 10 Ω");
    const d = (await request(t.app).get(engineSpecPaths.admin("K18-3G")).set("Cookie", admin).expect(200)).body as EngineSpecDetail;
    expect(d.history).toEqual([]);
  });

  it("refuses an edit started from an older version (409) and an unknown family (404), in words", async () => {
    const stale = await put(admin, "K26-4R", { spec: good, basedOn: 1, note: "late edit" });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toBe("The figures for K26-4R are at version 2 now; you opened them at version 1. Open them again and redo your change. Nothing was saved.");
    const unknown = await put(admin, "NOPE-1", { spec: good, basedOn: null, note: "access check" });
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.message).toBe('Engine family "NOPE-1" was not found.');
  });

  it("refuses anyone but an administrator (403)", async () => {
    for (const who of [analyst, clerk, tech]) {
      const r = await put(who, "K38-4H", { spec: good, basedOn: null, note: "not mine to set" });
      expect(r.status).toBe(403);
    }
    const d = (await request(t.app).get(engineSpecPaths.admin("K38-4H")).set("Cookie", admin).expect(200)).body as EngineSpecDetail;
    expect(d.history).toEqual([]);
  });
});

describe("the family's figures where readings are judged", () => {
  it("GET /api/engine-specs/:family gives any signed-in role the current figures, or null", async () => {
    const r = await request(t.app).get(engineSpecPaths.current("K26-4R")).set("Cookie", tech).expect(200);
    expect(r.body.current).toMatchObject({ version: 2, enteredUnit: "bar" });
    const none = await request(t.app).get(engineSpecPaths.current("K38-4H")).set("Cookie", clerk).expect(200);
    expect(none.body).toEqual({ engineFamily: "K38-4H", current: null });
  });

  it("the bench sheet's line carries its family's figures", async () => {
    const l = (await t.pool.query<{ shop_code: string; ro_number: string; line_no: number; engine_family: string }>(
      `SELECT s.shop_code, fl.ro_number, fl.line_no, m.engine_family FROM fact_repair_line fl JOIN dim_machine m USING (machine_key) JOIN dim_shop s USING (shop_key)
       WHERE m.engine_family IN ('K26-4R', 'K38-4H') ORDER BY m.engine_family, fl.opened_date DESC`,
    )).rows;
    const k26 = l.find((x) => x.engine_family === "K26-4R")!;
    const k38 = l.find((x) => x.engine_family === "K38-4H")!;
    const d = (await request(t.app).get(benchSheetPaths.line(benchLineId(k26.shop_code, k26.ro_number, k26.line_no))).set("Cookie", tech).expect(200)).body as BenchLineDetail;
    expect(d.familySpec).toMatchObject({ engineFamily: "K26-4R", version: 2 });
    const none = (await request(t.app).get(benchSheetPaths.line(benchLineId(k38.shop_code, k38.ro_number, k38.line_no))).set("Cookie", tech).expect(200)).body as BenchLineDetail;
    expect(none.familySpec).toBeNull();
  });

  it("a claim's verdicts name the maker's manual for a family with figures, general service practice for one without", async () => {
    const words = "the maker's service manual, engine section, compression table (K26-4R figures, version 2, entered by Test Admin)";
    const k26 = (await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).set("Origin", ORIGIN).send({ kind: "repair", repairLineId: await claimableLine("K26-4R") }).expect(201)).body as ClaimDetail;
    const comp = k26.lines[0]!.interpretation.compression!;
    expect(comp.cylinders.every((c) => c.source === words)).toBe(true);
    expect(comp.lowest.source).toBe(words);
    // a cylinder under the family's 29 bar (420.6 psi) minimum is a fault, whatever the generic bands say
    for (const c of comp.cylinders) expect(c.verdict).toBe(c.mean >= 3000 / KPA_PER_PSI ? "good" : c.mean >= 2900 / KPA_PER_PSI ? "watch" : "fault");
    const k18 = (await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).set("Origin", ORIGIN).send({ kind: "repair", repairLineId: await claimableLine("K18-3G") }).expect(201)).body as ClaimDetail;
    expect(k18.lines[0]!.interpretation.compression!.cylinders.every((c) => c.source === "general service practice")).toBe(true);

    const pdf = await request(t.app).get(apiPaths.claimPacket(k26.id)).set("Cookie", clerk).responseType("blob").expect(200);
    const file = path.join(work, "packet.pdf");
    writeFileSync(file, pdf.body as Buffer);
    const text = execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" }).replace(/\s+/g, " ");
    expect(text).toContain("K26-4R figures, version 2, entered by Test Admin");
    expect(text).toContain("Follow the maker's service manual for the engine family, local codes and licensed practice");
  });
});
