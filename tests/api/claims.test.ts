import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import type { ClaimDetail, ClaimPreview } from "../../shared/schemas/claims.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";

// Claims on the invented demo world. Warranty terms of the demo machines (../shared/SCENARIO.md): engine
// cover 36 months / 3,000 h, heater plugs count as engine; claims due 30 days after the RO closed.

let t: TestApp;
let clerk: string;
let managerS5: string;
/** the first claim's line: a heater-plug line with compression readings */
let first: LinePick;
let firstClaimId: string;
const work = mkdtempSync(path.join(tmpdir(), "ironledger-claims-"));

interface LinePick {
  key: string;
  shop: string;
  serial: string;
  hour_meter: string;
}

/** A closed, unclaimed heater-plug line inside engine cover (opened ≤ delivery + 36 months, ≤ 3,000 h), optionally with compression readings. */
async function pickLine(o: { shop?: string; notShop?: string; withCompression?: boolean } = {}): Promise<LinePick> {
  const res = await sql<LinePick>`
    SELECT fl.repair_line_key::text AS key, s.shop_code AS shop, m.serial, fl.hour_meter::text AS hour_meter
    FROM fact_repair_line fl
    JOIN dim_shop s ON s.shop_key = fl.shop_key
    JOIN dim_machine m ON m.machine_key = fl.machine_key
    JOIN dim_component c ON c.component_key = fl.component_key
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter IS NOT NULL
      AND fl.hour_meter <= 3000 AND m.delivery_date IS NOT NULL
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      AND (${o.shop ?? null}::text IS NULL OR s.shop_code = ${o.shop ?? null})
      AND (${o.notShop ?? null}::text IS NULL OR s.shop_code <> ${o.notShop ?? null})
      AND (${o.withCompression ?? false} = false OR EXISTS (SELECT 1 FROM fact_measurement x WHERE x.repair_line_key = fl.repair_line_key AND x.kind = 'compression'))
      AND NOT EXISTS (SELECT 1 FROM warranty_claim_line w WHERE w.repair_line_key = fl.repair_line_key)
    ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db);
  if (!res.rows[0]) throw new Error("the demo world has no such line");
  return res.rows[0];
}

const createRepairClaim = async (key: string, cookie = clerk) =>
  (await request(t.app).post("/api/claims").set("Cookie", cookie).send({ kind: "repair", repairLineId: key }).expect(201)).body as ClaimDetail;

const move = (id: string, body: object, cookie = clerk) => request(t.app).post(`/api/claims/${id}/status`).set("Cookie", cookie).send(body);

function pdfText(buf: Buffer): string {
  const file = path.join(work, `p-${Date.now()}.pdf`);
  writeFileSync(file, buf);
  return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
}

beforeAll(async () => {
  t = await testApp({ demo: true });
  clerk = await t.signInAs({ roles: ["clerk"], name: "Test Clerk", sub: "clerk-1" });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"], name: "Test Manager" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("POST /api/claims from a repair line", () => {
  it("makes a draft claim with eligibility worked out and an audit row", async () => {
    const line = (first = await pickLine({ withCompression: true }));
    const c = await createRepairClaim(line.key);
    firstClaimId = c.id;
    expect(c.status).toBe("draft");
    expect(c.kind).toBe("repair");
    expect(c.claimNumber).toMatch(/^IL-\d{2}R\d{5}$/);
    expect(c.lines).toHaveLength(1);
    const l = c.lines[0];
    expect(l.machine.serial).toBe(line.serial);
    expect(l.eligibility.verdict).toBe("covered");
    expect(l.eligibility.monthsCheck.text).toContain(`Delivered ${l.machine.deliveryDate} + 36 months`);
    // RO close + 30 days (the policy's claim days for every demo engine family)
    const closed = new Date(`${l.closedDate}T00:00:00Z`);
    closed.setUTCDate(closed.getUTCDate() + 30);
    expect(c.deadline.deadline).toBe(closed.toISOString().slice(0, 10));
    expect(c.warrantyEmail).toMatch(/@warranty\.ironledger\.invalid$/);
    const audit = await t.db.selectFrom("warranty_claim_audit").selectAll().where("claim_id", "=", c.id).execute();
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ action: "created", actor_sub: "clerk-1", actor_name: "Test Clerk" });
    expect(audit[0].changes).toMatchObject({ status: "draft", lines: 1, claimNumber: c.claimNumber });
  });

  it("states the packet's temperatures in the unit of the clerk who made the claim", async () => {
    const line = await pickLine();
    const c = (await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: line.key, unit: "F" }).expect(201)).body as ClaimDetail;
    expect(c.temperatureUnit).toBe("F");
    expect(c.cautions[0]).toContain("about 1,400–1,500 °F");
    const text = pdfText((await request(t.app).get(`/api/claims/${c.id}/packet.pdf`).set("Cookie", clerk).responseType("blob").expect(200)).body as Buffer);
    expect(text).toContain("about 1,400–1,500 °F");
    expect(text).not.toContain("°C");
    const p = (await request(t.app).get(`/api/claims/preview?repairLine=${(await pickLine()).key}&unit=F`).set("Cookie", clerk).expect(200)).body as ClaimPreview;
    expect(p.cautions[0]).toContain("°F");
    const bad = await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: line.key, unit: "K" }).expect(400);
    expect(JSON.stringify(bad.body)).toContain("unit must be C or F");
  });

  it("refuses a second claim on the same repair line and names the first", async () => {
    const res = await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: first.key }).expect(409);
    expect(res.body.error.message).toMatch(/already has claim IL-\d{2}R\d{5}/);
  });

  it("refuses a line outside warranty with the arithmetic in words and writes nothing", async () => {
    const res = await sql<{ key: string }>`
      SELECT fl.repair_line_key::text AS key FROM fact_repair_line fl JOIN dim_machine m USING (machine_key)
      JOIN dim_component c USING (component_key)
      WHERE c.system = 'Engine' AND fl.closed_date IS NOT NULL AND fl.hour_meter > 3500 ORDER BY 1 LIMIT 1`.execute(t.db);
    const before = await t.db.selectFrom("warranty_claim").select(t.db.fn.countAll().as("n")).executeTakeFirstOrThrow();
    const r = await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: res.rows[0].key }).expect(422);
    expect(r.body.error.message).toMatch(/Not covered: (the hours limit was|both limits were) passed/);
    const after = await t.db.selectFrom("warranty_claim").select(t.db.fn.countAll().as("n")).executeTakeFirstOrThrow();
    expect(after.n).toBe(before.n);
  });

  it("answers 400 in words for a malformed body", async () => {
    const r = await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: "abc" }).expect(400);
    expect(r.body.error.message).toMatch(/repairLineId: must be a repair line id/);
  });

  it("answers 401 without a session and 403 for an analyst", async () => {
    await request(t.app).get("/api/claims").expect(401);
    const analyst = await t.signInAs({ roles: ["analyst"] });
    await request(t.app).get("/api/claims").set("Cookie", analyst).expect(403);
  });
});

describe("GET /api/claims/preview?repairLine=…", () => {
  it("marks the hours at risk when the hour-meter cleaning set the RO's reading aside", async () => {
    const line = await pickLine({ shop: "S2" });
    const res = await t.db
      .updateTable("fact_repair_line")
      .set({ hour_valid: false, hour_invalid_reason: "rise over 24 h a day" })
      .where("repair_line_key", "=", line.key)
      .executeTakeFirst();
    expect(Number(res.numUpdatedRows)).toBeGreaterThan(0);
    const p = (await request(t.app).get(`/api/claims/preview?repairLine=${line.key}`).set("Cookie", clerk).expect(200)).body as ClaimPreview;
    expect(p.lines[0].hoursAtRisk).toMatch(/set this repair order's reading aside \(rise over 24 h a day\)/);
    expect(p.lines[0].hourTrail!.find((r) => r.thisRepair)).toMatchObject({ valid: false });
  });

  it("answers 400 when neither or both of repairLine and cluster are given", async () => {
    const r = await request(t.app).get("/api/claims/preview").set("Cookie", clerk).expect(400);
    expect(r.body.error.message).toMatch(/Give either repairLine or cluster/);
  });
});

describe("GET /api/claims/candidates", () => {
  type Page = { total: number; page: number; pageSize: number; rows: { repairLineId: string; shopCode: string; serial: string; roNumber: string; component: string; engineFamily: string; closedDate: string; deadline: { daysLeft: number; deadline: string }; eligibility: string }[]; elsewhere: { repairLineId: string; why: string }[] };
  const page = async (search = "", cookie = clerk) => (await request(t.app).get(`/api/claims/candidates${search ? `?${search}` : ""}`).set("Cookie", cookie).expect(200)).body as Page;

  it("lists covered, closed, unclaimed failure lines a page at a time, nearest deadline first, and drops one once it is claimed", async () => {
    const list = await page();
    expect(list.pageSize).toBe(25);
    expect(list.rows).toHaveLength(25);
    expect(list.total).toBeGreaterThan(100);
    expect(list.rows.every((c) => c.eligibility.startsWith("Covered"))).toBe(true);
    expect(list.rows.map((c) => c.repairLineId)).not.toContain(first.key);
    // lines that can still be filed first (nearest first), then the overdue ones, least overdue first
    const left = list.rows.map((c) => c.deadline.daysLeft);
    const open = left.filter((d) => d >= 0);
    expect(left.slice(0, open.length)).toEqual([...open].sort((a, b) => a - b));
    const overdue = left.slice(open.length);
    expect(overdue.every((d) => d < 0)).toBe(true);
    expect(overdue).toEqual([...overdue].sort((a, b) => b - a));
    const second = await page("page=2");
    expect(second.rows.map((r) => r.repairLineId).some((id) => list.rows.some((r) => r.repairLineId === id))).toBe(false);
    const top = list.rows[0].repairLineId;
    await createRepairClaim(top);
    const after = await page();
    expect(after.total).toBe(list.total - 1);
    expect(after.rows.map((c) => c.repairLineId)).not.toContain(top);
  });

  it("filters by shop, component, engine family and days left, and sorts on the server", async () => {
    const f = await page("shop=S3&component=ENG-CSA-HPLUG&engineFamily=K26-4R&pageSize=100");
    expect(f.total).toBeGreaterThan(0);
    for (const r of f.rows) expect([r.shopCode, r.component, r.engineFamily]).toEqual(["S3", "Heater-plug set", "K26-4R"]);
    const byClosed = await page("sort=closed&dir=desc&pageSize=50");
    const closes = byClosed.rows.map((r) => r.closedDate);
    expect(closes).toEqual([...closes].sort().reverse());
    const soon = await page("daysLeft=-400&pageSize=100");
    expect(soon.rows.every((r) => r.deadline.daysLeft <= -400)).toBe(true);
    expect(soon.total).toBeLessThanOrEqual((await page()).total);
  });

  it("finds a line by the machine's serial or the RO number, typed in any case, and says where lines outside the queue are", async () => {
    const target = (await page("pageSize=10")).rows[3];
    const bySerial = await page(`q=${encodeURIComponent(target.serial.toLowerCase())}&pageSize=100`);
    expect(bySerial.rows.map((r) => r.repairLineId)).toContain(target.repairLineId);
    expect(bySerial.rows.every((r) => r.serial.startsWith(target.serial) || r.roNumber.toUpperCase().startsWith(target.serial))).toBe(true);
    const byRo = await page(`q=${encodeURIComponent(target.roNumber)}`);
    expect(byRo.rows.map((r) => r.repairLineId)).toContain(target.repairLineId);
    // the line claimed in the first test is named with the claim that holds it
    const claimed = await page(`q=${encodeURIComponent(first.serial)}`);
    expect(claimed.elsewhere.find((x) => x.repairLineId === first.key)?.why).toMatch(/^claim IL-\d{2}R\d{5} already holds it$/);
  });

  it("refuses bad paging or sorting in words", async () => {
    const r = await request(t.app).get("/api/claims/candidates?pageSize=7&sort=colour").set("Cookie", clerk).expect(400);
    const text = JSON.stringify(r.body);
    expect(text).toContain("rows per page must be one of 10, 25, 50, 100");
    expect(text).toContain("sort by one of: deadline, closed, serial, shop, component, amount");
  });

  it("shows a manager only their own shop's lines", async () => {
    const list = await page("pageSize=100", managerS5);
    expect(list.rows.length).toBeGreaterThan(0);
    expect(new Set(list.rows.map((c) => c.shopCode))).toEqual(new Set(["S5"]));
    const other = await page("shop=S1", managerS5);
    expect(other.total).toBe(0);
  });
});

describe("POST /api/claims/:id/status", () => {
  let id: string;
  beforeAll(async () => {
    id = (await createRepairClaim((await pickLine()).key)).id;
  });

  it("refuses to credit a draft, in words, and leaves the claim as it was", async () => {
    const r = await move(id, { to: "credited", amount: 120 }).expect(409);
    expect(r.body.error).toMatchObject({ code: "illegal_move", message: 'A claim in state "Draft" cannot become "Credited"; the next step is to submit it.' });
    const c = await t.db.selectFrom("warranty_claim").select("status").where("claim_id", "=", id).executeTakeFirstOrThrow();
    expect(c.status).toBe("draft");
  });

  it("walks draft → submitted → accepted → credited and audits every move with who and what", async () => {
    // it went out through the maker's portal today; the demo world's deadlines may have passed, so the lateness is confirmed
    await move(id, { to: "submitted", filing: { reference: "PORTAL-0001", filedOn: new Date().toISOString().slice(0, 10) }, confirmLate: true }).expect(200);
    await move(id, { to: "accepted" }).expect(200);
    const done = (await move(id, { to: "credited", amount: 318.4 }).expect(200)).body as ClaimDetail;
    expect(done.status).toBe("credited");
    expect(done.amountCredited).toBe(318.4);
    expect(done.allowedMoves).toEqual([]);
    const moves = done.audit.filter((a) => a.action === "status").map((a) => a.changes.status);
    expect(moves).toEqual([{ from: "draft", to: "submitted" }, { from: "submitted", to: "accepted" }, { from: "accepted", to: "credited" }]);
    expect(done.audit.every((a) => a.actorName === "Test Clerk")).toBe(true);
    const rows = await t.db.selectFrom("warranty_claim_audit").select(["action", "changes"]).where("claim_id", "=", id).orderBy("audit_id").execute();
    expect(rows.map((r) => r.action)).toEqual(["created", "status", "status", "status"]);
    expect(rows[3].changes).toMatchObject({ amountCredited: 318.4 });
  });

  it("refuses any move out of a credited claim", async () => {
    const r = await move(id, { to: "rejected", reason: "late" }).expect(409);
    expect(r.body.error.message).toMatch(/is closed/);
  });
});

describe("shop scope on claims", () => {
  it("hides another shop's claim from a manager (404) and lists only their shop's", async () => {
    const line = await pickLine({ notShop: "S5" });
    const c = await createRepairClaim(line.key);
    await request(t.app).get(`/api/claims/${c.id}`).set("Cookie", managerS5).expect(404);
    await request(t.app).get(`/api/claims/${c.id}/packet.pdf`).set("Cookie", managerS5).expect(404);
    await move(c.id, { to: "submitted" }, managerS5).expect(404);
    const list = (await request(t.app).get("/api/claims").set("Cookie", managerS5).expect(200)).body as { claims: { shopCode: string }[] };
    expect(list.claims.every((x) => x.shopCode === "S5")).toBe(true);
    const own = await t.signInAs({ roles: ["manager"], shops: [line.shop] });
    await request(t.app).get(`/api/claims/${c.id}`).set("Cookie", own).expect(200);
  });

  it("does not let a manager open a claim on another shop's repair line", async () => {
    const line = await pickLine({ notShop: "S5" });
    await request(t.app).post("/api/claims").set("Cookie", managerS5).send({ kind: "repair", repairLineId: line.key }).expect(404);
  });

  it("lists a clerk's queue with open drafts first, nearest deadline first", async () => {
    const list = (await request(t.app).get("/api/claims").set("Cookie", clerk).expect(200)).body as { claims: { status: string; deadline: { daysLeft: number } }[] };
    const drafts = list.claims.filter((c) => c.status === "draft");
    expect(list.claims.slice(0, drafts.length).every((c) => c.status === "draft")).toBe(true);
    expect(drafts.length).toBeGreaterThan(0);
  });
});

describe("GET /api/claims/:id/packet.pdf", () => {
  it("holds the serial, the hour meter and the compression figures of the repair line", async () => {
    const line = first;
    const res = await request(t.app).get(`/api/claims/${firstClaimId}/packet.pdf`).set("Cookie", clerk).responseType("blob").expect(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    const text = pdfText(res.body as Buffer);
    expect(text).toContain(line.serial);
    const hours = Number(line.hour_meter).toLocaleString("en-US", { maximumFractionDigits: 1 });
    expect(text).toContain(`${hours} h`);
    // each cylinder's mean of its attempts, and the average of those means, rounded to whole psi
    const ms = await t.db.selectFrom("fact_measurement").select(["position", "value"]).where("repair_line_key", "=", line.key).where("kind", "=", "compression").execute();
    const byCyl = new Map<number, number[]>();
    for (const m of ms) byCyl.set(m.position, [...(byCyl.get(m.position) ?? []), Number(m.value)]);
    const means = [...byCyl.values()].map((a) => a.reduce((s, x) => s + x, 0) / a.length);
    for (const m of means) expect(text).toContain(Math.round(m).toLocaleString("en-US"));
    const average = means.reduce((s, x) => s + x, 0) / means.length;
    expect(text).toContain("AVERAGE");
    expect(text).toContain(`${Math.round(average).toLocaleString("en-US")} psi`);
    expect(text).toContain("LOWEST CYLINDER");
    expect(text).toMatch(/Follow the maker's service manual/);
    // a claim made without a unit states its temperatures in °C: 1,400–1,500 °F is 760–815.6 °C ((°F − 32) × 5/9, NIST SP 811)
    expect(text).toContain("about 760–815 °C");
    expect(text).not.toContain("°F");
    expect(text).toContain("Hour-meter readings around the failure");
    expect(text).toContain("(this RO)");
    expect(text).toContain("Complaint");
  });
});

describe("GET /api/claims/:id/lines.csv", () => {
  it("neutralises a cell that starts like a formula", async () => {
    const line = await pickLine({ shop: "S5" });
    await t.db.updateTable("fact_repair_line").set({ complaint: '=HYPERLINK("http://x.invalid","hard start")' }).where("repair_line_key", "=", line.key).execute();
    const c = await createRepairClaim(line.key, managerS5);
    const res = await request(t.app).get(`/api/claims/${c.id}/lines.csv`).set("Cookie", managerS5).expect(200);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    expect(rows).toHaveLength(1);
    expect(rows[0].complaint).toBe(`'=HYPERLINK("http://x.invalid","hard start")`);
    expect(rows[0].serial).toBe(line.serial);
  });

  it("carries raw numbers with the unit in the header: hours in h, money in the group's currency", async () => {
    const line = await pickLine({ shop: "S5" });
    const c = await createRepairClaim(line.key, managerS5);
    const res = await request(t.app).get(`/api/claims/${c.id}/lines.csv`).set("Cookie", managerS5).expect(200);
    const [row] = parse(res.text, { columns: true }) as Record<string, string>[];
    // no currency set in this database: the fallback, USD (shared/schemas/settings.ts)
    for (const h of ["hour_meter_h", "standard_hours_h", "actual_hours_h", "parts_cost_usd", "labor_cost_usd"]) expect(Object.keys(row)).toContain(h);
    for (const h of ["hour_meter_h", "parts_cost_usd", "labor_cost_usd"]) if (row[h] !== "") expect(row[h]).toMatch(/^-?\d+(\.\d+)?$/);
  });
});

describe("claims without object storage or mail", () => {
  it("says in words that attachments and sending are unavailable", async () => {
    const list = (await request(t.app).get("/api/claims").set("Cookie", clerk).expect(200)).body.claims;
    const id = list[0].id;
    const up = await request(t.app).post(`/api/claims/${id}/attachments`).set("Cookie", clerk).attach("file", Buffer.from("%PDF-1.4\n"), "x.pdf").expect(503);
    expect(up.body.error.message).toMatch(/Object storage is not configured/);
    const send = await request(t.app).post(`/api/claims/${id}/send`).set("Cookie", clerk).expect(503);
    expect(send.body.error.message).toMatch(/Download it instead/);
  });
});

describe("campaign cases from a cluster", () => {
  let cluster: ClusterList["clusters"][number];
  beforeAll(async () => {
    const list = (await request(t.app).get("/api/analytics/clusters").set("Cookie", clerk).expect(200)).body as ClusterList;
    cluster = list.clusters.find((c) => c.dimensions.supplierLot === "BT-2109")!;
  });

  it("previews the planted lot's cluster with its repair lines and eligibility counts", async () => {
    const p = (await request(t.app).get(`/api/claims/preview?cluster=${cluster.id}`).set("Cookie", clerk).expect(200)).body as ClaimPreview;
    expect(p.kind).toBe("campaign");
    expect(p.cluster?.cluster.id).toBe(cluster.id);
    expect(p.lines).toHaveLength(cluster.repairLineIds.length);
    const c = p.eligibilityCounts;
    expect(c.covered + c.notCovered + c.unknown).toBe(cluster.repairLineIds.length);
  });

  it("stores the cluster's statistics and all its repair lines in the case, and prints them in the packet", async () => {
    const c = (await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "campaign", clusterId: cluster.id }).expect(201)).body as ClaimDetail;
    expect(c.kind).toBe("campaign");
    expect(c.claimNumber).toMatch(/^IL-\d{2}C\d{5}$/);
    expect(c.lineCount).toBe(cluster.repairLineIds.length);
    const stored = await t.db.selectFrom("warranty_claim").select(["cluster_id", "cluster_snapshot"]).where("claim_id", "=", c.id).executeTakeFirstOrThrow();
    expect(stored.cluster_id).toBe(cluster.id);
    expect((stored.cluster_snapshot as { cluster: { observed: number; expected: number } }).cluster).toMatchObject({ observed: cluster.observed, expected: cluster.expected });
    const lines = await t.db.selectFrom("warranty_claim_line").select("repair_line_key").where("claim_id", "=", c.id).execute();
    expect(lines.map((l) => String(l.repair_line_key)).sort()).toEqual([...cluster.repairLineIds].sort());
    const pdf = await request(t.app).get(`/api/claims/${c.id}/packet.pdf`).set("Cookie", clerk).responseType("blob").expect(200);
    const text = pdfText(pdf.body as Buffer);
    expect(text).toContain("Cluster statistics");
    expect(text).toContain("BT-2109");
    expect(text).toContain(`Repair lines in the case (${cluster.repairLineIds.length})`);
  });

  it("refuses a campaign case from a manager and answers 404 for an unknown cluster id", async () => {
    await request(t.app).post("/api/claims").set("Cookie", managerS5).send({ kind: "campaign", clusterId: cluster.id }).expect(403);
    const r = await request(t.app).get("/api/claims/preview?cluster=0123456789abcdef").set("Cookie", clerk).expect(404);
    expect(r.body.error.message).toMatch(/Pick the cluster again/);
  });
});
