import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import type { ClaimDetail } from "../../shared/schemas/claims.js";
import type { ClaimMoney } from "../../shared/schemas/claim-lifecycle.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";

// A claim's money and lifecycle on the invented demo world (../shared/SCENARIO.md): heater plugs are engine
// parts, engine cover 36 months / 3,000 h unless the machine registry says otherwise; claims due 30 days after
// the RO closed. Today's date is read, never assumed: the demo world's deadlines may be past or still open.

let t: TestApp;
let clerk: string;
const work = mkdtempSync(path.join(tmpdir(), "ironledger-lifecycle-"));
const today = () => new Date().toISOString().slice(0, 10);
const daysFromToday = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);

function pdfText(buf: Buffer): string {
  const file = path.join(work, `p-${Date.now()}.pdf`);
  writeFileSync(file, buf);
  return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
}

const detail = async (id: string) => (await request(t.app).get(apiPaths.claim(id)).set("Cookie", clerk).expect(200)).body as ClaimDetail;
const move = (id: string, body: object) => request(t.app).post(apiPaths.claimStatus(id)).set("Cookie", clerk).send(body);

/** A closed, covered heater-plug line no claim holds yet. */
async function freeLine(): Promise<string> {
  const r = await sql<{ key: string }>`
    SELECT fl.repair_line_key::text AS key FROM fact_repair_line fl
    JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter <= 3000 AND m.delivery_date IS NOT NULL
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      AND NOT EXISTS (SELECT 1 FROM warranty_claim_line w WHERE w.repair_line_key = fl.repair_line_key)
    ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db);
  return r.rows[0].key;
}

/** A repair claim whose repair order closed `closedDaysAgo` days ago (the deadline is 30 days after). */
async function repairClaim(closedDaysAgo: number): Promise<ClaimDetail> {
  const c = (await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).send({ kind: "repair", repairLineId: await freeLine() }).expect(201)).body as ClaimDetail;
  await t.db
    .updateTable("warranty_claim")
    .set({ closed_date: daysFromToday(-closedDaysAgo), deadline: daysFromToday(30 - closedDaysAgo) })
    .where("claim_id", "=", c.id)
    .execute();
  return c;
}

beforeAll(async () => {
  t = await testApp({ demo: true });
  clerk = await t.signInAs({ roles: ["clerk"], name: "Lifecycle Clerk", sub: "clerk-life" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("a campaign case with lines not covered", () => {
  let c: ClaimDetail;
  /** the cluster's lines with their cost and whether they are inside engine cover, worked in SQL from the warehouse */
  let truth: { key: string; cost: number; inside: boolean; hours: number | null }[];

  beforeAll(async () => {
    const list = (await request(t.app).get("/api/analytics/clusters").set("Cookie", clerk).expect(200)).body as ClusterList;
    const cluster = list.clusters.find((x) => x.dimensions.supplierLot === "BT-2109")!;
    c = (await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).send({ kind: "campaign", clusterId: cluster.id }).expect(201)).body as ClaimDetail;
    const r = await sql<{ key: string; cost: string; inside: boolean; hours: string | null }>`
      SELECT fl.repair_line_key::text AS key, (coalesce(fl.parts_cost, 0) + coalesce(fl.labor_cost, 0))::text AS cost, fl.hour_meter::text AS hours,
             (fl.hour_meter IS NOT NULL AND m.delivery_date IS NOT NULL
              AND fl.hour_meter <= coalesce(m.warranty_engine_hours, 3000)
              AND fl.opened_date <= (m.delivery_date + make_interval(months => coalesce(m.warranty_engine_months, 36)))::date) AS inside
      FROM fact_repair_line fl JOIN dim_machine m USING (machine_key)
      WHERE fl.repair_line_key IN (SELECT repair_line_key FROM warranty_claim_line WHERE claim_id = ${c.id})`.execute(t.db);
    truth = r.rows.map((x) => ({ key: x.key, cost: Number(x.cost), inside: x.inside, hours: x.hours === null ? null : Number(x.hours) }));
  });

  it("claims the covered lines' parts and labour only, and lists the others apart with why", () => {
    const cents = (xs: typeof truth) => xs.reduce((s, x) => s + Math.round(x.cost * 100), 0) / 100;
    const covered = truth.filter((x) => x.inside);
    const outside = truth.filter((x) => !x.inside);
    console.log(
      `campaign case ${c.claimNumber}: ${truth.length} lines, all lines ${cents(truth).toFixed(2)}; covered ${covered.length} lines ${cents(covered).toFixed(2)}; ` +
        `not covered ${outside.length} lines ${cents(outside).toFixed(2)} (over 3,000 h: ${outside.filter((x) => (x.hours ?? 0) > 3000).length})`,
    );
    expect(outside.length).toBeGreaterThan(0);
    expect(c.amountClaimed).toBe(cents(covered));
    expect(c.split.amountApart).toBe(cents(outside));
    expect(c.split.apart.map((a) => a.lineId).sort()).toEqual(outside.map((x) => x.key).sort());
    for (const a of c.split.apart) expect(a.why).toMatch(/^(Not covered: (the hours limit was|the months limit was|both limits were) passed|Cannot be decided)/);
    const stored = c.amountClaimed;
    expect(c.audit[0].text).toContain(`claiming ${stored!.toLocaleString("en-US", { minimumFractionDigits: 2 })}`);
  });

  it("refuses to include a line without a reason, in words, and changes nothing", async () => {
    const line = c.split.apart[0].lineId;
    const r = await request(t.app).post(apiPaths.claimLineInclusion(c.id, line)).set("Cookie", clerk).send({ include: true }).expect(400);
    expect(r.body.error.message).toMatch(/needs your reason/);
    expect((await detail(c.id)).amountClaimed).toBe(c.amountClaimed);
  });

  it("refuses to include a covered line: it is claimed already", async () => {
    const r = await request(t.app).post(apiPaths.claimLineInclusion(c.id, c.split.included[0].lineId)).set("Cookie", clerk).send({ include: true, reason: "belt and braces" }).expect(409);
    expect(r.body.error.message).toMatch(/is covered: it is in the amount claimed already/);
  });

  it("includes a line deliberately with a reason that lands in the audit trail and the packet", async () => {
    const line = c.split.apart[0];
    const reason = "Same supplier lot and failure mode as the covered lines; the hour meter was replaced at 2,100 h";
    const after = (await request(t.app).post(apiPaths.claimLineInclusion(c.id, line.lineId)).set("Cookie", clerk).send({ include: true, reason }).expect(200)).body as ClaimDetail;
    expect(after.amountClaimed).toBe(Math.round((c.amountClaimed! + (line.amount ?? 0)) * 100) / 100);
    expect(after.split.included.find((x) => x.lineId === line.lineId)).toMatchObject({ basis: "included", reason, includedBy: "Lifecycle Clerk", why: line.why });
    const rows = await t.db.selectFrom("warranty_claim_audit").select(["action", "changes", "actor_name"]).where("claim_id", "=", c.id).orderBy("audit_id").execute();
    expect(rows.at(-1)).toMatchObject({ action: "line included", actor_name: "Lifecycle Clerk", changes: { reason, lineId: line.lineId } });
    expect(after.audit.at(-1)!.text).toContain(`Reason: ${reason}`);
    const stored = await t.db.selectFrom("warranty_claim").select("amount_claimed").where("claim_id", "=", c.id).executeTakeFirstOrThrow();
    expect(Number(stored.amount_claimed)).toBe(after.amountClaimed);
    const pdf = await request(t.app).get(apiPaths.claimPacket(c.id)).set("Cookie", clerk).responseType("blob").expect(200);
    const text = pdfText(pdf.body as Buffer).replace(/\s+/g, " ");
    expect(text).toContain("Claimed although not covered (1)");
    expect(text).toContain("Same supplier lot and failure mode");
    expect(text).toContain(`Not claimed: listed apart (${c.split.apart.length - 1})`);
  });
});

describe("POST /api/claims/:id/status to submitted", () => {
  it("refuses a claim never sent nor recorded as sent, in words, and leaves it a draft", async () => {
    const c = await repairClaim(5);
    const r = await move(c.id, { to: "submitted" }).expect(409);
    expect(r.body.error).toMatchObject({ code: "not_sent" });
    expect(r.body.error.message).toMatch(/has not gone to the maker: send the packet from here, or record how it went out/);
    expect((await detail(c.id)).status).toBe("draft");
  });

  it("refuses a late filing without confirmation, with the days overdue in words; takes it confirmed", async () => {
    const c = await repairClaim(40); // deadline 10 days ago
    const d = await detail(c.id);
    expect(d.submitCheck).toMatchObject({ daysOverdue: 10 });
    const filing = { reference: "PORTAL-20417", filedOn: today() };
    const r = await move(c.id, { to: "submitted", filing }).expect(409);
    expect(r.body.error.code).toBe("late_unconfirmed");
    expect(r.body.error.message).toBe(`Filed on ${today()}, the claim is 10 days past its deadline of ${daysFromToday(-10)}, and the maker may refuse it as late. Confirm the late filing to submit it anyway.`);
    expect((await detail(c.id)).status).toBe("draft");
    const done = (await move(c.id, { to: "submitted", filing, confirmLate: true }).expect(200)).body as ClaimDetail;
    expect(done.status).toBe("submitted");
    expect(done.filing).toEqual({ via: "other", reference: "PORTAL-20417", filedOn: today(), daysLate: 10 });
    expect(done.audit.at(-1)!.text).toContain("It went 10 days after the deadline");
  });

  it("takes a filing in time with its reference, and refuses a filing date in the future", async () => {
    const c = await repairClaim(3);
    const bad = await move(c.id, { to: "submitted", filing: { reference: "P-1", filedOn: daysFromToday(2) } }).expect(400);
    expect(bad.body.error.message).toMatch(/is after today/);
    const junk = await move(c.id, { to: "submitted", filing: { reference: "", filedOn: "yesterday" } }).expect(400);
    expect(junk.body.error.message).toMatch(/reference the portal or carrier gave/);
    const ok = (await move(c.id, { to: "submitted", filing: { reference: "P-1", filedOn: today() } }).expect(200)).body as ClaimDetail;
    expect(ok.filing?.daysLate).toBe(0);
  });
});

describe("the maker's answer and a corrected version", () => {
  let first: ClaimDetail;
  let second: ClaimDetail;

  it("records a rejection with the reason, then keeps the first version readable when corrected", async () => {
    first = await repairClaim(10);
    await move(first.id, { to: "submitted", filing: { reference: "P-9", filedOn: today() } }).expect(200);
    await move(first.id, { to: "rejected" }).expect(409);
    await move(first.id, { to: "rejected", reason: "Failed part not returned within 30 days" }).expect(200);
    second = (await request(t.app).post(apiPaths.claimResubmit(first.id)).set("Cookie", clerk).send({ correction: "Failed part returned; courier receipt attached" }).expect(201)).body as ClaimDetail;
    expect(second).toMatchObject({ claimNumber: first.claimNumber, revision: 2, status: "draft", correction: "Failed part returned; courier receipt attached" });
    expect(second.lines.map((l) => l.id)).toEqual(first.lines.map((l) => l.id));
    expect(second.deadline.deadline).toBe(daysFromToday(30));
    const old = await detail(first.id);
    expect(old).toMatchObject({ status: "rejected", reason: "Failed part not returned within 30 days", supersededBy: second.id, canResubmit: false, revision: 1 });
    expect(old.versions.map((v) => [v.revision, v.id])).toEqual([[1, first.id], [2, second.id]]);
    expect(old.audit.at(-1)!.text).toBe("Corrected after the rejection as version 2. What was corrected: Failed part returned; courier receipt attached");
    await request(t.app).get(apiPaths.claimPacket(first.id)).set("Cookie", clerk).expect(200);
    const again = await request(t.app).post(apiPaths.claimResubmit(first.id)).set("Cookie", clerk).send({ correction: "second try at the same" }).expect(409);
    expect(again.body.error.message).toMatch(/was corrected already as version 2/);
  });

  it("records the corrected version's acceptance with an amount paid below the amount claimed, and counts the claim once in the money", async () => {
    await move(second.id, { to: "submitted", filing: { reference: "P-10", filedOn: today() } }).expect(200);
    const claimed = (await detail(second.id)).amountClaimed!;
    const paid = Math.round(claimed * 0.8 * 100) / 100;
    const half = await move(second.id, { to: "partly_accepted", amount: paid }).expect(409);
    expect(half.body.error.message).toBe("A partial acceptance needs the maker's reason for what it did not pay.");
    const done = (await move(second.id, { to: "partly_accepted", amount: paid, reason: "Labour paid at standard time only" }).expect(200)).body as ClaimDetail;
    expect(done).toMatchObject({ status: "partly_accepted", amountPaid: paid, reason: "Labour paid at standard time only" });
    const money = (await request(t.app).get(apiPaths.claimMoney()).set("Cookie", clerk).expect(200)).body as ClaimMoney;
    const family = money.byEngineFamily.find((r) => r.key === done.engineFamily)!;
    expect(family.paid).toBeGreaterThanOrEqual(paid);
    const month = money.byMonth.find((r) => r.key === today().slice(0, 7))!;
    expect(month.writtenOff).toBeGreaterThanOrEqual(Math.round((claimed - paid) * 100) / 100);
    // every filed claim family once: the rejected first version is not counted again beside its correction
    const families = await sql<{ n: string }>`SELECT count(*)::text AS n FROM warranty_claim WHERE previous_claim_id IS NULL AND (filed_via IS NOT NULL)`.execute(t.db);
    expect(money.total.claims).toBe(Number(families.rows[0].n));
  });
});

describe("GET /api/claims as a queue by urgency", () => {
  it("gives each bucket's count and money at stake, drafts first, nearest deadline first", async () => {
    const q = (await request(t.app).get(apiPaths.claims()).set("Cookie", clerk).expect(200)).body as { claims: ClaimDetail[]; buckets: Record<string, { count: number; amount: number }> };
    for (const b of ["toFile", "waiting", "rejected", "closed"] as const) {
      const mine = q.claims.filter((c) => c.bucket === b);
      expect(q.buckets[b].count).toBe(mine.length);
      expect(q.buckets[b].amount).toBe(mine.reduce((s, c) => s + Math.round((c.amountClaimed ?? 0) * 100), 0) / 100);
    }
    expect(q.buckets.toFile.count).toBeGreaterThan(0);
    expect(q.buckets.waiting.count).toBeGreaterThan(0);
    const order = q.claims.map((c) => c.bucket);
    expect(order).toEqual([...order].sort((a, b) => ["toFile", "waiting", "rejected", "closed"].indexOf(a) - ["toFile", "waiting", "rejected", "closed"].indexOf(b)));
  });
});
