import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { apiPaths } from "../../shared/api-paths.js";
import type { Batch, Import } from "../../shared/schemas/imports.js";
import type { Overview } from "../../shared/schemas/overview.js";
import { startAnswerWarmer, warmStateOf, type AnswerWarmer } from "../../server/services/answer-warmer.js";
import { refreshExposure } from "../../etl/index.js";
import { overviewSummary } from "../../server/services/overview-summary.js";
import { appOver, testApp, type TestApp } from "../helpers/test-app.js";

// Upload to dashboard on the real PostgreSQL, with the answer warm-up running as in the product: the
// batch's `dashboards` says "current" only once the Overview answers for data holding the batch, and no
// Overview answer says it holds the batch without showing it. The app listens on a loopback port so the
// warm-up can ask it, as it asks the server.

const ORIGIN = "http://127.0.0.1:8080";
const HEADER =
  "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,meter_note,complaint,cause,correction,component_code,failure_mode,labor_op,standard_hours,labor_hours,parts_cost,labor_cost,pay_type,line_type,tech_id,part_number,part_description,part_qty,supplier_lot,part_ordered_date,part_received_date,back_ordered,fault_codes,ambient_temp";
const WARMED = ["/api/overview", "/api/analytics/clusters"];

let t: TestApp;
let app: ReturnType<typeof appOver>;
let server: Server;
let warmer: AnswerWarmer;
let analyst: string;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const big = (v: string | null | undefined) => BigInt(v ?? 0);
const getOverview = async () => (await request(app).get(apiPaths.overview()).set("Cookie", analyst).expect(200)).body as Overview;
const getBatch = async (id: string) => (await request(app).get(apiPaths.batchRejects(id, "limit=1")).set("Cookie", analyst).expect(200)).body.batch as Batch;
const lists = (o: Overview, file: string) => o.loads.some((l) => l.files.some((f) => f.fileName === file));

async function settle(id: string): Promise<Import> {
  for (let i = 0; i < 600; i++) {
    const r = await request(app).get(apiPaths.importItem(id)).set("Cookie", analyst).expect(200);
    if (!["checking", "queued", "loading"].includes(r.body.status)) return r.body as Import;
    await sleep(100);
  }
  throw new Error(`upload ${id} never settled`);
}

async function warmedOnce(): Promise<void> {
  for (let i = 0; i < 2400 && !warmStateOf(t.db)?.warmedFor; i++) await sleep(100);
  expect(warmStateOf(t.db)?.warmedFor).toBeTruthy();
}

beforeAll(async () => {
  t = await testApp({ demo: true });
  app = appOver(t, { imports: { spoolDir: mkdtempSync(path.join(os.tmpdir(), "dashboards-test-")), maxUploadBytes: 8 * 1024 * 1024, databaseUrl: t.url } });
  analyst = await t.signInAs({ roles: ["analyst"], sub: "analyst-dash", name: "Ana Lyst" });
  server = app.listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  warmer = startAnswerWarmer({ db: t.db, origin, cookie: () => t.signInAs({ roles: ["analyst"], sub: "warm-up" }), requests: WARMED, intervalMs: 200 });
  await warmedOnce();
}, 420_000);
afterAll(async () => {
  warmer?.stop();
  await new Promise((r) => server?.close(r));
  await t?.drop();
});

describe("dashboards current after an upload's load", () => {
  it("says current only once the Overview holds the batch, and no Overview answer claims the batch before it shows it", async () => {
    // a failure line on each of the ten machines of S1 read most recently, a day after its last reading
    const machines = (
      await t.pool.query<{ serial: string; d: string; h: number }>(
        `SELECT m.serial, max(r.reading_date)::text AS d, max(r.hours)::float8 AS h
         FROM fact_hour_reading r JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = m.home_shop_key
         WHERE r.valid AND s.shop_code = 'S1' GROUP BY m.serial HAVING max(r.meter_generation) = 0 ORDER BY max(r.reading_date) DESC, m.serial LIMIT 10`,
      )
    ).rows;
    expect(machines).toHaveLength(10);
    const lines = machines.map((m, i) => {
      const day = new Date(`${m.d}T00:00:00Z`);
      day.setUTCDate(day.getUTCDate() + 1);
      const d = day.toISOString().slice(0, 10);
      return `S1,DASH-${i},1,${m.serial},${d},${d},${(m.h + 10).toFixed(1)},,Hard start,Plug open,Replaced plug,ENG-CSA-HPLUG,OPEN,,1.0,1.0,10.00,20.00,customer,failure,,,,,,,,N,,`;
    });
    const file = "s1-dashboards.csv";
    const before = await getOverview();
    expect(lists(before, file)).toBe(false);

    const up = await request(app).post(apiPaths.imports()).set("Cookie", analyst).set("Origin", ORIGIN).attach("files", Buffer.from([HEADER, ...lines].join("\n") + "\n"), file).expect(201);
    const checked = await settle(up.body.imports[0].id);
    expect(checked.status).toBe("ready");
    await request(app).post(apiPaths.importLoad(checked.id)).set("Cookie", analyst).set("Origin", ORIGIN).expect(202);
    const loaded = await settle(checked.id);
    expect(loaded.status).toBe("loaded");
    const id = loaded.batchId!;

    // poll as the Imports page and the Overview page do
    const seen: ("updating" | "current")[] = [];
    let current: Batch | null = null;
    for (let i = 0; i < 1200 && !current; i++) {
      const o = await getOverview();
      // an answer labelled as holding the batch shows it (its summary and its clusters alike)
      if (big(o.asOf?.batchId) >= big(id)) expect(lists(o, file)).toBe(true);
      const b = await getBatch(id);
      expect(b.dashboards).toBeTruthy();
      seen.push(b.dashboards!.state);
      if (b.dashboards!.state === "current") current = b;
      else await sleep(50);
    }
    expect(current, `states seen: ${seen.join(",")}`).not.toBeNull();
    expect(Date.parse(current!.dashboards!.asOf!)).toBeGreaterThan(Date.parse(loaded.uploadedAt));

    // once the page says current, the Overview as anyone gets it (no fresh header) holds the load
    const o = await getOverview();
    expect(o.asOf).toMatchObject({ current: true });
    expect(big(o.asOf!.batchId)).toBeGreaterThanOrEqual(big(id));
    expect(o.clusters.asOf).toMatchObject({ current: true });
    expect(big(o.clusters.asOf!.batchId)).toBeGreaterThanOrEqual(big(id));
    expect(lists(o, file)).toBe(true);
    const s1 = o.loads.find((l) => l.shopCode === "S1")!;
    expect(s1.files.find((f) => f.fileName === file)).toMatchObject({ batchId: id, rowsRead: 10, rowsInserted: 10 });
    // and its figures are those the warehouse gives now, computed afresh
    const now = JSON.parse(JSON.stringify(await overviewSummary(t.db, { kind: "all" })));
    expect(o.headlines).toEqual(now.headlines);
    expect(o.attention.machines).toEqual(now.attention.rows);
  }, 240_000);

  it("stays 'updating' for a batch that changed rows until the exposure refresh has folded it in", async () => {
    await warmedOnce();
    // a batch as a load commits it, before its refresh: lines in, exposure not yet refreshed
    const { rows } = await sql<{ batch_id: string }>`
      INSERT INTO etl_batch (file_name, sha256, profile, kind, shop_code, loaded_by, status, finished_at, rows_read, rows_inserted)
      VALUES ('pending-refresh.csv', ${"c".repeat(64)}, 'generic-jobs', 'jobs', 'S1', 'test', 'loaded', now(), 1, 1)
      RETURNING batch_id::text
    `.execute(t.db);
    const id = rows[0].batch_id;
    // several warm-up ticks: it waits for the refresh rather than warming new lines against old engine hours
    await sleep(1500);
    expect((await getBatch(id)).dashboards).toEqual({ state: "updating", asOf: null });
    expect(big(warmStateOf(t.db)!.warmedFor!.batch)).toBeLessThan(big(id));
    await refreshExposure(t.db);
    let b = await getBatch(id);
    for (let i = 0; i < 1200 && b.dashboards?.state !== "current"; i++) {
      await sleep(100);
      b = await getBatch(id);
    }
    expect(b.dashboards?.state).toBe("current");
    const o = await getOverview();
    expect(o.asOf?.current).toBe(true);
    expect(big(o.asOf!.batchId)).toBeGreaterThanOrEqual(big(id));
    expect(lists(o, "pending-refresh.csv")).toBe(true);
  }, 240_000);
});
