import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { sql } from "kysely";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { testApp, type TestApp } from "../helpers/test-app.js";
import type { ClaimDetail } from "../../shared/schemas/claims.js";
import type { ClaimStory } from "../../shared/schemas/claim-story.js";

// A claim's narrative and the notes between the clerk and the shop, on the demo world. The first draft of the
// narrative is the repair order's own words, so the checks compare it with the warehouse row.

let t: TestApp;
let clerk: string;
let manager: string;
let otherManager: string;
let claim: ClaimDetail;
let line: { key: string; shop: string; serial: string; complaint: string | null; correction: string | null };
const work = mkdtempSync(path.join(tmpdir(), "ironledger-story-"));

const story = async (cookie = clerk) => (await request(t.app).get(`/api/claims/${claim.id}/story`).set("Cookie", cookie).expect(200)).body as ClaimStory;

beforeAll(async () => {
  t = await testApp({ demo: true });
  const r = await sql<typeof line>`
    SELECT fl.repair_line_key::text AS key, s.shop_code AS shop, m.serial, fl.complaint, fl.correction
    FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key JOIN dim_machine m ON m.machine_key = fl.machine_key
    JOIN dim_component c ON c.component_key = fl.component_key
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter <= 3000 AND fl.complaint IS NOT NULL AND fl.correction IS NOT NULL
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
    ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db);
  line = r.rows[0];
  clerk = await t.signInAs({ roles: ["clerk"], name: "Story Clerk" });
  manager = await t.signInAs({ roles: ["manager"], shops: [line.shop], name: "Shop Manager" });
  otherManager = await t.signInAs({ roles: ["manager"], shops: [line.shop === "S1" ? "S2" : "S1"], name: "Other Manager" });
  claim = (await request(t.app).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: line.key }).expect(201)).body as ClaimDetail;
}, 600_000);
afterAll(async () => {
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("a claim's narrative", () => {
  it("starts empty, with a first draft in the repair order's own words", async () => {
    const s = await story();
    expect(s.narrative).toEqual({ found: "", done: "", why: "" });
    expect(s.editable).toBe(true);
    expect(s.suggestion.found).toContain(line.serial);
    expect(s.suggestion.found.toLowerCase()).toContain(line.complaint!.trim().toLowerCase().replace(/[.]$/, ""));
    expect(s.suggestion.done.toLowerCase()).toContain(line.correction!.trim().toLowerCase().replace(/[.]$/, ""));
    expect(s.suggestion.why).toMatch(/within the maker's cover: Covered/);
  });

  it("saves what the clerk writes, audits which parts changed, and prints it in the packet", async () => {
    const n = { found: "Hard start below freezing; plug 3 reads open.", done: "Replaced the heater-plug set.", why: "Open plug at 612 h, well inside engine cover." };
    const s = (await request(t.app).put(`/api/claims/${claim.id}/narrative`).set("Cookie", clerk).send(n).expect(200)).body as ClaimStory;
    expect(s.narrative).toEqual(n);
    // the same text again changes nothing and writes no audit row
    await request(t.app).put(`/api/claims/${claim.id}/narrative`).set("Cookie", clerk).send(n).expect(200);
    const audit = await t.db.selectFrom("warranty_claim_audit").select(["action", "changes"]).where("claim_id", "=", claim.id).where("action", "=", "narrative edited").execute();
    expect(audit).toHaveLength(1);
    expect(audit[0].changes).toEqual({ parts: ["what was found", "what was done", "why it is the maker's"] });
    const pdf = (await request(t.app).get(`/api/claims/${claim.id}/packet.pdf`).set("Cookie", clerk).responseType("blob").expect(200)).body as Buffer;
    const file = path.join(work, "packet.pdf");
    writeFileSync(file, pdf);
    const text = execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
    expect(text).toContain("The claim in words");
    expect(text).toContain("plug 3 reads open");
    expect(text).toContain("Replaced the heater-plug set.");
  });

  it("refuses a narrative too long, in words, and keeps the one stored", async () => {
    const r = await request(t.app).put(`/api/claims/${claim.id}/narrative`).set("Cookie", clerk).send({ found: "x".repeat(4001), done: "", why: "" }).expect(400);
    expect(JSON.stringify(r.body)).toContain("What was found is at most 4,000 characters");
    expect((await story()).narrative.done).toBe("Replaced the heater-plug set.");
  });

  it("keeps notes between the clerk and the shop in order, for the claim's shop only, and out of the packet", async () => {
    await request(t.app).post(`/api/claims/${claim.id}/notes`).set("Cookie", clerk).send({ text: "Please send a photo of the hour meter." }).expect(201);
    const s = (await request(t.app).post(`/api/claims/${claim.id}/notes`).set("Cookie", manager).send({ text: "Photo attached this morning." }).expect(201)).body as ClaimStory;
    expect(s.notes.map((n) => [n.authorName, n.authorRole, n.text])).toEqual([
      ["Story Clerk", "clerk", "Please send a photo of the hour meter."],
      ["Shop Manager", "shop", "Photo attached this morning."],
    ]);
    await request(t.app).get(`/api/claims/${claim.id}/story`).set("Cookie", otherManager).expect(404);
    await request(t.app).post(`/api/claims/${claim.id}/notes`).set("Cookie", otherManager).send({ text: "not mine" }).expect(404);
    const empty = await request(t.app).post(`/api/claims/${claim.id}/notes`).set("Cookie", clerk).send({ text: "  " }).expect(400);
    expect(JSON.stringify(empty.body)).toContain("Write the note first.");
    const pdf = (await request(t.app).get(`/api/claims/${claim.id}/packet.pdf`).set("Cookie", clerk).responseType("blob").expect(200)).body as Buffer;
    const file = path.join(work, "packet2.pdf");
    writeFileSync(file, pdf);
    expect(execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" })).not.toContain("Photo attached this morning");
  });

  it("cannot change once the claim has gone to the maker: refused in words, the stored narrative kept", async () => {
    const today = new Date().toISOString().slice(0, 10);
    await request(t.app).post(`/api/claims/${claim.id}/status`).set("Cookie", clerk).send({ to: "submitted", filing: { reference: "PORTAL-1", filedOn: today }, confirmLate: true }).expect(200);
    const r = await request(t.app).put(`/api/claims/${claim.id}/narrative`).set("Cookie", clerk).send({ found: "changed", done: "", why: "" }).expect(409);
    expect(r.body.error.message).toMatch(/has gone to the maker .* so its narrative can no longer change/);
    const s = await story();
    expect(s.editable).toBe(false);
    expect(s.narrative.found).toBe("Hard start below freezing; plug 3 reads open.");
    // notes go on after filing
    await request(t.app).post(`/api/claims/${claim.id}/notes`).set("Cookie", clerk).send({ text: "Filed on the portal." }).expect(201);
  });
});
