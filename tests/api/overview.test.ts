import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { NEW_CLUSTERS_SHOWN, type Overview } from "../../shared/schemas/overview.js";
import type { ClusterDetail, ClusterList } from "../../shared/schemas/analytics-clusters.js";

let t: TestApp;
let analyst: string;
let managerS5: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"], sub: "analyst-overview" });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"], sub: "manager-s5-overview" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const overview = async (cookie = analyst): Promise<Overview> =>
  (await request(t.app).get("/api/overview").set("Cookie", cookie).expect(200)).body as Overview;

describe("GET /api/overview", () => {
  it("answers 401 without a session", async () => {
    await request(t.app).get("/api/overview").expect(401);
  });

  it("shows the analyst the last load of every shop with its reject counts, and the group-wide files", async () => {
    const o = await overview();
    const shops = o.loads.map((l) => l.shopCode);
    expect(shops).toEqual(["S1", "S2", "S3", "S4", "S5", "S6", "S7", "S8", null]);
    const rejected = (await sql<{ n: string }>`SELECT sum(rows_rejected) AS n FROM etl_batch`.execute(t.db)).rows[0].n;
    expect(o.loads.reduce((s, l) => s + l.rowsRejected, 0)).toBe(Number(rejected));
    const s3 = o.loads.find((l) => l.shopCode === "S3")!;
    expect(s3.files.map((f) => f.kind).sort()).toEqual(["jobs", "measurements", "weather"]);
    expect(s3.files.every((f) => f.fileName.startsWith("S3-"))).toBe(true);
  });

  it("gives this year's and last year's rates with intervals for the headline groups", async () => {
    const o = await overview();
    // the demo's data run to June 2025, but hour readings cover enough machine-days only up to December 2024
    // (tests/api/monthly-chart.test.ts): the headline compares the complete years 2024 and 2023
    expect(o.headlines.thisYear).toEqual({ from: "2024-01", to: "2024-12" });
    expect(o.headlines.lastYear).toEqual({ from: "2023-01", to: "2023-12" });
    const all = o.headlines.rows.find((r) => r.label === "All failures")!;
    const plugs = o.headlines.rows.find((r) => r.label === "Heater-plug set")!;
    expect(all.thisYear.failures).toBeGreaterThan(plugs.thisYear.failures);
    expect(all.thisYear.rate!.lower).toBeLessThan(all.thisYear.rate!.rate);
    expect(all.change).toBeCloseTo(all.thisYear.rate!.rate / all.lastYear.rate!.rate, 10);
  });

  it("lists the machines most in need of attention, scored as documented", async () => {
    const o = await overview();
    const m = o.attention.machines;
    expect(m.length).toBe(10);
    for (const x of m) expect(x.score).toBe(x.failures + 2 * x.comebacks + 3 * x.repeatComponents.length);
    expect(m.map((x) => x.score)).toEqual([...m.map((x) => x.score)].sort((a, b) => b - a));
    expect(o.attention.definition).toMatch(/comeback/);
  });

  it("calls every cluster new on a first visit, keeps that through a reload, and later shows only clusters not seen before", async () => {
    const sub = "analyst-visits";
    const cookie = await t.signInAs({ roles: ["analyst"], sub });
    const first = await overview(cookie);
    expect(first.clusters.firstVisit).toBe(true);
    expect(first.clusters.total).toBeGreaterThan(1);
    expect(first.clusters.newCount).toBe(first.clusters.total);
    expect(first.clusters.newSinceLastVisit).toHaveLength(Math.min(first.clusters.total, NEW_CLUSTERS_SHOWN));
    expect((await overview(cookie)).clusters.firstVisit).toBe(true);

    // the next visit, two hours later, when the previous one had not shown the top cluster
    const top = first.clusters.newSinceLastVisit[0];
    const stored = await sql<{ ids: string[] }>`SELECT current_cluster_ids AS ids FROM app_user_visit WHERE sub = ${sub}`.execute(t.db);
    const ids = stored.rows[0].ids;
    expect(ids).toHaveLength(first.clusters.total);
    await sql`UPDATE app_user_visit SET last_request_at = now() - interval '2 hours',
      current_cluster_ids = ${ids.filter((id) => id !== top.id)}::text[] WHERE sub = ${sub}`.execute(t.db);
    const next = await overview(cookie);
    expect(next.clusters.firstVisit).toBe(false);
    expect(next.clusters.previousVisitAt).not.toBeNull();
    expect(next.clusters.newSinceLastVisit.map((c) => c.id)).toEqual([top.id]);
    expect(next.clusters.newCount).toBe(1);
  });

  it("shows a manager only their own shop's loads", async () => {
    const o = await overview(managerS5);
    expect(o.loads.map((l) => l.shopCode)).toEqual(["S5"]);
  });
});

describe("GET /api/analytics/clusters/:id", () => {
  it("returns the top cluster with its repair lines, machines, timeline and profiles adding up to its count", async () => {
    const list = (await request(t.app).get("/api/analytics/clusters").set("Cookie", analyst).expect(200)).body as ClusterList;
    const top = list.clusters[0];
    const d = (await request(t.app).get(`/api/analytics/clusters/${top.id}`).set("Cookie", analyst).expect(200)).body as ClusterDetail;
    expect(d.cluster.id).toBe(top.id);
    expect(d.lines).toHaveLength(top.observed);
    expect(new Set(d.lines.map((l) => l.id))).toEqual(new Set(top.repairLineIds));
    expect(d.lines.every((l) => l.engineFamily === top.dimensions.engineFamily)).toBe(true);
    expect(d.machines.reduce((s, m) => s + m.failures, 0)).toBe(top.observed);
    expect(d.timeline.reduce((s, m) => s + m.failures, 0)).toBe(top.observed);
    expect(d.temperatureProfile.reduce((s, b) => s + b.inCluster, 0)).toBe(top.observed);
    expect(d.hourProfile.reduce((s, b) => s + b.inCluster, 0)).toBe(top.observed);
    expect(d.temperatureProfile.reduce((s, b) => s + b.elsewhere, 0)).toBeGreaterThan(0);
  });

  it("answers 404 in words for a cluster that is not in the scan", async () => {
    const res = await request(t.app).get("/api/analytics/clusters/0000000000000000").set("Cookie", analyst).expect(404);
    expect(res.body.error.message).toMatch(/not in the current scan/);
    await request(t.app).get("/api/analytics/clusters/0000000000000000").expect(401);
  });
});
