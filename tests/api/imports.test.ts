import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import type { Import, RejectPage } from "../../shared/schemas/imports.js";
import { appOver, testApp, type TestApp } from "../helpers/test-app.js";

// Exports fed from the browser: upload → check (a dry run: preview, nothing stored) → load (a job) → batch
// with its rejects; a manager limited to their shops; files that cannot be loaded refused in words.
// The API test app has no job queue, so the jobs run on the server's own process, as they are written to.

const ORIGIN = "http://127.0.0.1:8080";
const HEADER =
  "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,meter_note,complaint,cause,correction,component_code,failure_mode,labor_op,standard_hours,labor_hours,parts_cost,labor_cost,pay_type,line_type,tech_id,part_number,part_description,part_qty,supplier_lot,part_ordered_date,part_received_date,back_ordered,fault_codes,ambient_temp";

let t: TestApp;
let app: ReturnType<typeof appOver>;
let analyst: string;
let managerS1: string;
/** a machine of shop S1 and one of S8, with a reading date and hours after any stored one */
let s1: { serial: string };
let s8: { serial: string };

const jobLine = (shop: string, ro: string, serial: string, over: Partial<Record<"opened" | "hours" | "component", string>> = {}) =>
  `${shop},${ro},1,${serial},${over.opened ?? "2024-06-03"},${over.opened ?? "2024-06-03"},${over.hours ?? ""},,Hard start,Plug open,Replaced plug,${over.component ?? "ENG-CSA-HPLUG"},OPEN,,1.0,1.0,10.00,20.00,customer,failure,,,,,,,,N,,`;

function upload(cookie: string, name: string, body: string | Buffer) {
  return request(app).post(apiPaths.imports()).set("Cookie", cookie).set("Origin", ORIGIN).attach("files", Buffer.from(body), name);
}

/** Polls an upload until it leaves the given states (the jobs run on this process). */
async function settle(cookie: string, id: string, busy: string[] = ["checking", "queued", "loading"]): Promise<Import> {
  for (let i = 0; i < 300; i++) {
    const r = await request(app).get(apiPaths.importItem(id)).set("Cookie", cookie).expect(200);
    if (!busy.includes(r.body.status)) return r.body as Import;
    await new Promise((res) => setTimeout(res, 100));
  }
  throw new Error(`upload ${id} never settled`);
}

const factCount = async () => Number((await t.pool.query<{ n: string }>(`SELECT count(*) AS n FROM fact_repair_line`)).rows[0].n);
const batchCount = async () => Number((await t.pool.query<{ n: string }>(`SELECT count(*) AS n FROM etl_batch`)).rows[0].n);

beforeAll(async () => {
  t = await testApp({ demo: true });
  // the checks and loads run on a worker thread with their own connections, as on the server
  app = appOver(t, { imports: { spoolDir: mkdtempSync(path.join(os.tmpdir(), "imports-test-")), maxUploadBytes: 64 * 1024, databaseUrl: t.url } });
  analyst = await t.signInAs({ roles: ["analyst"], sub: "analyst-1", name: "Ana Lyst" });
  managerS1 = await t.signInAs({ roles: ["manager"], shops: ["S1"], sub: "manager-1", name: "Man Ager" });
  const pick = async (shop: string) =>
    (await t.pool.query<{ serial: string }>(
      `SELECT m.serial FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key WHERE s.shop_code = $1 ORDER BY m.serial LIMIT 1`,
      [shop],
    )).rows[0];
  s1 = await pick("S1");
  s8 = await pick("S8");
}, 300_000);
afterAll(async () => t?.drop());

describe("an upload checked, previewed, loaded and its rejects worked", () => {
  let first: Import;
  let batch: string;

  it("checks the whole file without storing anything and shows what would load", async () => {
    const [facts, batches] = [await factCount(), await batchCount()];
    const csv = [HEADER, jobLine("S1", "UP-1", s1.serial), jobLine("S1", "UP-2", s1.serial), jobLine("S1", "UP-3", s1.serial, { opened: "2024-13-40" })].join("\n") + "\n";
    const r = await upload(analyst, "s1-june.csv", csv).expect(201);
    expect(r.body.imports).toHaveLength(1);
    first = await settle(analyst, r.body.imports[0].id);
    expect(first).toMatchObject({ status: "ready", kind: "jobs", profile: "generic-jobs", shop: "S1" });
    expect(first.preview).toMatchObject({ read: 3, inserted: 2, rejected: 1, shops: [{ code: "S1", rows: 2 }] });
    expect(first.preview!.rejects[0]).toMatchObject({ line: 4, code: "bad_date" });
    expect(first.preview!.rows[0]).toMatchObject({ line: 2, values: { shop_code: "S1", ro_number: "UP-1", component_code: "ENG-CSA-HPLUG" } });
    expect([await factCount(), await batchCount()]).toEqual([facts, batches]);
  });

  it("loads it as a job and records a batch whose counts add up", async () => {
    const facts = await factCount();
    const q = await request(app).post(apiPaths.importLoad(first.id)).set("Cookie", analyst).set("Origin", ORIGIN).expect(202);
    expect(["queued", "loading", "loaded"]).toContain(q.body.status);
    const done = await settle(analyst, first.id);
    expect(done.status).toBe("loaded");
    expect(done.progress).toMatchObject({ percent: 100, phase: "done", rowsRead: 3 });
    batch = done.batchId!;
    const b = await request(app).get(apiPaths.batches()).set("Cookie", analyst).expect(200);
    const row = b.body.batches.find((x: { id: string }) => x.id === batch);
    expect(row).toMatchObject({ fileName: "s1-june.csv", shop: "S1", read: 3, inserted: 2, rejected: 1, importId: first.id, loadedBy: "Ana Lyst" });
    expect(row.inserted + row.updated + row.unchanged + row.rejected).toBe(row.read);
    expect(await factCount()).toBe(facts + 2);
  });

  it("lists the batch's rejects with reasons, filters them and downloads them with the reason in front", async () => {
    const r = await request(app).get(apiPaths.batchRejects(batch, "reason=bad_date")).set("Cookie", analyst).expect(200);
    const page = r.body as RejectPage;
    expect(page.total).toBe(1);
    expect(page.reasons).toEqual([{ code: "bad_date", count: 1 }]);
    expect(page.columns[0]).toBe("shop_code");
    expect(page.rows[0]).toMatchObject({ line: 4, code: "bad_date", raw: { ro_number: "UP-3", opened_date: "2024-13-40" }, fixedBy: null });
    const none = await request(app).get(apiPaths.batchRejects(batch, "reason=unknown_machine")).set("Cookie", analyst).expect(200);
    expect(none.body.rows).toEqual([]);
    const csv = await request(app).get(apiPaths.batchRejectsCsv(batch)).set("Cookie", analyst).expect(200);
    expect(csv.headers["content-type"]).toMatch(/text\/csv/);
    const rows = parse(csv.text) as string[][];
    expect(rows[0].slice(0, 4)).toEqual(["line", "reason_code", "reason", "shop_code"]);
    expect(rows[1].slice(0, 2)).toEqual(["4", "bad_date"]);
  });

  it("loads the downloaded rejects once fixed, as they are, and shows the reject as fixed by the later batch", async () => {
    const csv = await request(app).get(apiPaths.batchRejectsCsv(batch)).set("Cookie", analyst).expect(200);
    const fixed = csv.text.replaceAll("2024-13-40", "2024-06-04");
    const r = await upload(analyst, "s1-june-fixed.csv", fixed).expect(201);
    const checked = await settle(analyst, r.body.imports[0].id);
    expect(checked.status).toBe("ready");
    expect(checked.preview).toMatchObject({ read: 1, inserted: 1, rejected: 0 });
    // the three columns in front are reported as ignored, not loaded
    expect(checked.preview!.header.ignored.map((c) => c.column)).toEqual(["line", "reason_code", "reason"]);
    await request(app).post(apiPaths.importLoad(checked.id)).set("Cookie", analyst).set("Origin", ORIGIN).expect(202);
    const loaded = await settle(analyst, checked.id);
    expect(loaded.status).toBe("loaded");
    const page = (await request(app).get(apiPaths.batchRejects(batch)).set("Cookie", analyst).expect(200)).body as RejectPage;
    expect(page.rows[0].fixedBy).toBe(loaded.batchId);
  });

  it("lists the uploads: all of them for a group-wide role, their own for a manager", async () => {
    const all = await request(app).get(apiPaths.imports()).set("Cookie", analyst).expect(200);
    expect(all.body.imports.map((u: Import) => u.fileName)).toEqual(expect.arrayContaining(["s1-june.csv", "s1-june-fixed.csv"]));
    const mine = await request(app).get(apiPaths.imports()).set("Cookie", managerS1).expect(200);
    expect(mine.body.imports).toEqual([]);
  });

  it("serves the original bytes of an upload", async () => {
    const r = await request(app).get(apiPaths.importFile(first.id)).set("Cookie", analyst).expect(200);
    expect(r.text.startsWith("shop_code,ro_number")).toBe(true);
  });
});

describe("what cannot be loaded", () => {
  it("refuses a manager's file that names another shop, naming the shop, and loads nothing", async () => {
    const [facts, batches] = [await factCount(), await batchCount()];
    const csv = [HEADER, jobLine("S1", "UP-10", s1.serial), jobLine("S8", "UP-11", s8.serial)].join("\n") + "\n";
    const r = await upload(managerS1, "mixed.csv", csv).expect(201);
    const u = await settle(managerS1, r.body.imports[0].id);
    expect(u.status).toBe("refused");
    expect(u.message).toMatch(/rows of shop S8 \(1 row\); you can load files of your own shops only \(S1\)/);
    const l = await request(app).post(apiPaths.importLoad(u.id)).set("Cookie", managerS1).set("Origin", ORIGIN).expect(409);
    expect(l.body.error.message).toMatch(/cannot be loaded/);
    expect([await factCount(), await batchCount()]).toEqual([facts, batches]);
    // and another user's upload is not theirs to see
    await request(app).get(apiPaths.importItem(u.id)).set("Cookie", await t.signInAs({ roles: ["manager"], shops: ["S1"], sub: "manager-2" })).expect(404);
  });

  it("refuses a binary file, a file of no known layout and an oversize file, in words", async () => {
    const bin = await upload(analyst, "book.csv", Buffer.concat([Buffer.from([0x50, 0x4b, 3, 4]), Buffer.alloc(600, 1)])).expect(201);
    expect((await settle(analyst, bin.body.imports[0].id)).message).toMatch(/not CSV text/);
    const odd = await upload(analyst, "odd.csv", "colour,size\nred,4\n").expect(201);
    const o = await settle(analyst, odd.body.imports[0].id);
    expect(o.status).toBe("refused");
    expect(o.message).toMatch(/header does not match any/);
    const big = await upload(analyst, "big.csv", `${HEADER}\n${"x".repeat(70 * 1024)}\n`).expect(413);
    expect(big.body.error.message).toMatch(/larger than/);
  });

  it("cancels a load that has not started, keeping nothing", async () => {
    const csv = [HEADER, jobLine("S1", "UP-20", s1.serial)].join("\n") + "\n";
    const r = await upload(analyst, "later.csv", csv).expect(201);
    const u = await settle(analyst, r.body.imports[0].id);
    const facts = await factCount();
    await request(app).post(apiPaths.importLoad(u.id)).set("Cookie", analyst).set("Origin", ORIGIN).expect(202);
    const c = await request(app).post(apiPaths.importCancel(u.id)).set("Cookie", analyst).set("Origin", ORIGIN);
    // the job may already have finished on this fast path: then there is nothing left to cancel
    if (c.status === 200) {
      const end = await settle(analyst, u.id, ["checking", "queued", "loading"]);
      expect(["cancelled", "loaded"]).toContain(end.status);
      if (end.status === "cancelled") expect(await factCount()).toBe(facts);
    } else {
      expect(c.status).toBe(409);
    }
  });
});
