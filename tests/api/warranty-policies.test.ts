import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import type { ClaimCandidatePage, ClaimDetail } from "../../shared/schemas/claims.js";
import type { PolicyDetail, PolicyList, PolicyTerms } from "../../shared/schemas/warranty-policies.js";

// Versioned warranty policies on the invented demo world (../shared/SCENARIO.md). Version 1 of every policy is
// the policy as it stood before versions were kept: claims due 30 days after the RO closed, parts kept 60 days
// (migrations/0020_create_warranty.ts; common practice, no source), base machine 24 months / 2,000 h and engine
// 36 months / 3,000 h (common practice, no source). Deadlines are checked with the platform's own calendar
// arithmetic (Date.UTC), not with the code under test.

let t: TestApp;
let admin: string;
let clerk: string;
let analyst: string;
const work = mkdtempSync(path.join(tmpdir(), "ironledger-policies-"));

interface LinePick {
  key: string;
  family: string;
}

/** RO close + n calendar days, by the platform's calendar. */
const plusDays = (iso: string, n: number) => new Date(Date.UTC(+iso.slice(0, 4), +iso.slice(5, 7) - 1, +iso.slice(8, 10) + n)).toISOString().slice(0, 10);

/** A closed, unclaimed heater-plug line inside engine cover with compression readings, of one engine family (or any). */
async function pickLine(family?: string, notKey?: string): Promise<LinePick> {
  const res = await sql<LinePick>`
    SELECT fl.repair_line_key::text AS key, m.engine_family AS family
    FROM fact_repair_line fl
    JOIN dim_machine m ON m.machine_key = fl.machine_key
    JOIN dim_component c ON c.component_key = fl.component_key
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter IS NOT NULL
      AND fl.hour_meter <= 3000 AND m.delivery_date IS NOT NULL
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      AND EXISTS (SELECT 1 FROM fact_measurement x WHERE x.repair_line_key = fl.repair_line_key AND x.kind = 'compression')
      AND (${family ?? null}::text IS NULL OR m.engine_family = ${family ?? null})
      AND (${notKey ?? null}::text IS NULL OR fl.repair_line_key::text <> ${notKey ?? null})
      AND NOT EXISTS (SELECT 1 FROM warranty_claim_line w WHERE w.repair_line_key = fl.repair_line_key)
    ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db);
  if (!res.rows[0]) throw new Error("the demo world has no such line");
  return res.rows[0];
}

const createClaim = async (key: string) =>
  (await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).send({ kind: "repair", repairLineId: key }).expect(201)).body as ClaimDetail;
const claim = async (id: string) => (await request(t.app).get(apiPaths.claim(id)).set("Cookie", clerk).expect(200)).body as ClaimDetail;

function packetText(id: string): Promise<string> {
  return request(t.app)
    .get(apiPaths.claimPacket(id))
    .set("Cookie", clerk)
    .responseType("blob")
    .expect(200)
    .then((res) => {
      const file = path.join(work, `p-${id}-${Date.now()}.pdf`);
      writeFileSync(file, res.body as Buffer);
      return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
    });
}

const seeded: PolicyTerms = {
  coverage: { base: { months: 24, hours: 2000 }, engine: { months: 36, hours: 3000 } },
  claimDays: 30,
  partRetentionDays: 60,
  warrantyEmail: "claims@warranty.ironledger.invalid",
};

beforeAll(async () => {
  t = await testApp({ demo: true });
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin", sub: "admin-1" });
  clerk = await t.signInAs({ roles: ["clerk"], name: "Test Clerk", sub: "clerk-1" });
  analyst = await t.signInAs({ roles: ["analyst"], name: "Test Analyst" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("GET /api/admin/warranty-policies", () => {
  it("lists the group default and each family at version 1, holding the policy as it stood before versions", async () => {
    const list = (await request(t.app).get(apiPaths.adminWarrantyPolicies()).set("Cookie", admin).expect(200)).body as PolicyList;
    expect(list.policies[0]).toMatchObject({ engineFamily: "*", familyWords: "the group default", versions: 1, current: seeded });
    expect(list.policies.map((p) => p.engineFamily)).toEqual(["*", "K18-3G", "K26-4R", "K38-4H"]);
    for (const p of list.policies) {
      expect(p.latest).toMatchObject({ version: 1, savedBy: "defaults" });
      expect(p.current).toMatchObject({ coverage: seeded.coverage, claimDays: 30, partRetentionDays: 60 });
    }
  });

  it("refuses a signed-in user who is not an administrator (403), reading and saving alike", async () => {
    for (const cookie of [clerk, analyst]) {
      expect((await request(t.app).get(apiPaths.adminWarrantyPolicies()).set("Cookie", cookie)).status).toBe(403);
      const put = await request(t.app).put(apiPaths.adminWarrantyPolicy("*")).set("Cookie", cookie).send({ policy: seeded, basedOn: 1, note: "not mine to change" });
      expect(put.status).toBe(403);
    }
    const versions = await t.db.selectFrom("warranty_policy_version").select((eb) => eb.fn.countAll<string>().as("n")).where("engine_family", "=", "*").executeTakeFirstOrThrow();
    expect(Number(versions.n)).toBe(1);
  });
});

describe("PUT /api/admin/warranty-policies/:family", () => {
  const put = (family: string, body: object) => request(t.app).put(apiPaths.adminWarrantyPolicy(family)).set("Cookie", admin).send(body);

  it("refuses bad terms in words that name each field, and saves nothing", async () => {
    const cases: [object, string, string][] = [
      [{ policy: { ...seeded, warrantyEmail: "claims desk" }, basedOn: 1, note: "new desk" }, "policy.warrantyEmail", "packets go to an e-mail address"],
      [{ policy: { ...seeded, coverage: { ...seeded.coverage, engine: { months: 0, hours: 3000 } } }, basedOn: 1, note: "shorter" }, "policy.coverage.engine.months", "Engine cover (months) must be a whole number from 1 to 240"],
      [{ policy: { ...seeded, coverage: { ...seeded.coverage, base: { months: 24, hours: -5 } } }, basedOn: 1, note: "fewer hours" }, "policy.coverage.base.hours", "Base machine cover (hours) must be a whole number from 1 to 100,000"],
      [{ policy: { ...seeded, claimDays: 30.5 }, basedOn: 1, note: "half a day" }, "policy.claimDays", "The filing window (days) must be a whole number from 1 to 365"],
      [{ policy: seeded, basedOn: 1, note: "" }, "note", "say why the policy changes"],
    ];
    for (const [body, field, words] of cases) {
      const res = await put("K18-3G", body).expect(400);
      expect(res.body.error.code).toBe("validation_failed");
      expect(res.body.error.message).toContain(`${field}: ${words}`);
      expect(res.body.error.message).not.toMatch(/violates|constraint|relation|syntax/i);
    }
    const stored = await t.db.selectFrom("warranty_policy_version").select("version").where("engine_family", "=", "K18-3G").execute();
    expect(stored.map((r) => r.version)).toEqual([1]);
  });

  it("answers 404 in words for a family with no policy of its own", async () => {
    const res = await put("NO-SUCH", { policy: seeded, basedOn: 1, note: "no such family" }).expect(404);
    expect(res.body.error.message).toMatch(/NO-SUCH/);
  });
});

describe("a policy change and the claims judged before and after it", () => {
  let family: string;
  let before: ClaimDetail;
  let firstKey: string;

  it("a claim made under version 1 records it, with the 30-day filing window", async () => {
    const line = await pickLine();
    family = line.family;
    firstKey = line.key;
    before = await createClaim(line.key);
    expect(before.policy).toEqual({ engineFamily: family, version: 1, text: `judged under policy version 1 of ${family}` });
    expect(before.claimDays).toBe(30);
    expect(before.deadline.deadline).toBe(plusDays(before.closedDate, 30));
    expect(before.lines[0].eligibility.termsSource).toMatch(new RegExp(`policy version 1 of ${family}|machine registry`));
  });

  it("an admin saves version 2 with a longer filing window; the history shows both, with who, when and why", async () => {
    const body = { policy: { ...seeded, claimDays: 45, warrantyEmail: "claims-new@warranty.ironledger.invalid" }, basedOn: 1, note: "The maker allows 45 days from this year." };
    const res = await request(t.app).put(apiPaths.adminWarrantyPolicy(family)).set("Cookie", admin).send(body).expect(200);
    const d = res.body as PolicyDetail;
    expect(d).toMatchObject({ engineFamily: family, version: 2, latestVersion: 2 });
    expect(d.policy.claimDays).toBe(45);
    expect(d.history.map((h) => h.version)).toEqual([2, 1]);
    expect(d.history[0]).toMatchObject({ savedBy: "Test Admin", note: "The maker allows 45 days from this year.", claims: 0 });
    expect(Date.now() - Date.parse(d.history[0].savedAt)).toBeLessThan(60_000);
    expect(d.history[1]).toMatchObject({ savedBy: "defaults", claims: 1 });
    expect(d.history[1].policy.claimDays).toBe(30);

    // the old version stays readable as it was
    const old = (await request(t.app).get(apiPaths.adminWarrantyPolicy(family, 1)).set("Cookie", admin).expect(200)).body as PolicyDetail;
    expect(old).toMatchObject({ version: 1, latestVersion: 2 });
    expect(old.policy.claimDays).toBe(30);
  });

  it("refuses an edit started from the old version (409 in words) and saves nothing", async () => {
    const res = await request(t.app)
      .put(apiPaths.adminWarrantyPolicy(family))
      .set("Cookie", admin)
      .send({ policy: { ...seeded, claimDays: 10 }, basedOn: 1, note: "from an old screen" })
      .expect(409);
    expect(res.body.error.message).toContain("was saved as version 2 after you opened version 1");
    const d = (await request(t.app).get(apiPaths.adminWarrantyPolicy(family)).set("Cookie", admin).expect(200)).body as PolicyDetail;
    expect(d.latestVersion).toBe(2);
  });

  it("the claim made before keeps version 1 and its deadline, in the claim and in its packet", async () => {
    const again = await claim(before.id);
    expect(again.policy.version).toBe(1);
    expect(again.claimDays).toBe(30);
    expect(again.deadline.deadline).toBe(plusDays(before.closedDate, 30));
    expect(again.lines[0].deadline?.deadline).toBe(plusDays(before.closedDate, 30));
    const text = await packetText(before.id);
    expect(text).toContain(`Judged under policy version 1 of ${family}`);
  });

  it("a corrected version of the claim made before keeps version 1 (recorded by the database when not given)", async () => {
    const row = await t.db
      .insertInto("warranty_claim")
      .values({
        claim_number: before.claimNumber, kind: "repair", title: before.title, shop_code: before.shopCode, engine_family: family,
        closed_date: before.closedDate, claim_days: 30, deadline: before.deadline.deadline, amount_claimed: null, note: null,
        cluster_id: null, cluster_snapshot: null, created_by: "clerk-1", created_by_name: "Test Clerk", revision: 2,
        previous_claim_id: before.id, correction: "hour-meter photo added", resubmit_from: before.closedDate,
      })
      .returning(["claim_id", "policy_version_id"])
      .executeTakeFirstOrThrow();
    const v1 = await t.db.selectFrom("warranty_policy_version").select("policy_version_id").where("engine_family", "=", family).where("version", "=", 1).executeTakeFirstOrThrow();
    expect(String(row.policy_version_id)).toBe(String(v1.policy_version_id));
    await t.db.deleteFrom("warranty_claim").where("claim_id", "=", row.claim_id).execute();
  });

  it("a claim made after uses version 2: the 45-day window, in the claim and its packet", async () => {
    const line = await pickLine(family, firstKey);
    const after = await createClaim(line.key);
    expect(after.policy).toEqual({ engineFamily: family, version: 2, text: `judged under policy version 2 of ${family}` });
    expect(after.claimDays).toBe(45);
    expect(after.deadline.deadline).toBe(plusDays(after.closedDate, 45));
    expect(after.warrantyEmail).toBe("claims-new@warranty.ironledger.invalid");
    const text = await packetText(after.id);
    expect(text).toContain(`Judged under policy version 2 of ${family}`);
    expect(text).toContain("claims-new@warranty.ironledger.invalid");
  });

  it("the clerk's queue counts the family's deadlines with the current filing window", async () => {
    const page = (await request(t.app).get(apiPaths.claimCandidates(`engineFamily=${family}&pageSize=25`)).set("Cookie", clerk).expect(200)).body as ClaimCandidatePage;
    expect(page.rows.length).toBeGreaterThan(0);
    for (const r of page.rows) expect(r.deadline.deadline).toBe(plusDays(r.closedDate, 45));
  });
});

describe("the packet's wording of the readings", () => {
  it("says where each threshold comes from in words for the maker, never Ironledger's internal tags, and keeps the cautions", async () => {
    const line = await pickLine();
    const c = await createClaim(line.key);
    const comp = c.lines[0].interpretation.compression!;
    expect(comp.cylinders.every((y) => y.source === "general service practice")).toBe(true);
    expect(comp.spreadSource).toBe("general service practice");
    const text = await packetText(c.id);
    expect(text).toContain("Threshold from");
    expect(text).toContain("general service practice");
    expect(text).not.toMatch(/common practice|no source|from memory|common-practice/i);
    // the cautions run the full width of the page: their wrapped lines join into the sentences as written
    const flowing = text.replace(/\s+/g, " ");
    expect(flowing).toContain("Never use ether or starting spray on engines with glow plugs or an intake grid heater");
    expect(flowing).toContain("Follow the maker's service manual for the engine family, local codes and licensed practice");
  });
});
