import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { findingStateListSchema, findingWorkSchema } from "../../shared/schemas/findings.js";
import { recordFindings } from "../../server/db/queries/findings.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// Findings worked from new to closed on the demo world: the group-wide scan's findings are tracked by key,
// analysts change their status (a dismissal needs its reason), owner and notes with a history of who did what;
// a later load's figures say whether it strengthened or weakened a finding, and a dismissed one that grows is
// shown again. The grouping itself is tested in tests/unit/analytics/findings.test.ts.

const ORIGIN = "http://127.0.0.1:8080";
let t: TestApp;
let analyst: string;
let clerk: string;
let manager: string;
let list: ClusterList;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"], name: "Test Analyst" });
  clerk = await t.signInAs({ roles: ["clerk"] });
  manager = await t.signInAs({ roles: ["manager"], shops: ["S1"] });
  list = (await request(t.app).get(apiPaths.clusters("")).set("Cookie", analyst).expect(200)).body as ClusterList;
}, 600_000);
afterAll(async () => t?.drop());

const states = async (cookie = analyst) => findingStateListSchema.parse((await request(t.app).get(apiPaths.findings()).set("Cookie", cookie).expect(200)).body);
const work = async (key: string) => findingWorkSchema.parse((await request(t.app).get(apiPaths.finding(key)).set("Cookie", analyst).expect(200)).body);
const change = (key: string, body: object, cookie = analyst) => request(t.app).post(apiPaths.finding(key)).set("Cookie", cookie).set("Origin", ORIGIN).send(body);

describe("findings' words", () => {
  it("follow the caller's temperature unit: °C by default, °F when asked, the lead finding under the same key", async () => {
    const f = (await request(t.app).get(apiPaths.clusters("unit=F")).set("Cookie", analyst).expect(200)).body as ClusterList;
    const words = (l: ClusterList) => [...l.findings.flatMap((x) => [x.sentence, ...x.facets.map((y) => y.words)]), ...l.clusters.map((c) => c.description)].join("\n");
    expect(words(list)).toMatch(/°C/);
    expect(words(list)).not.toMatch(/°F/);
    expect(words(f)).toMatch(/°F/);
    expect(words(f)).not.toMatch(/°C/);
    // the scan cuts by the unit's bands, so its expected counts differ a little; the lot finding and its failures do not
    expect([f.findings[0].key, f.findings[0].lead.observed]).toEqual([list.findings[0].key, list.findings[0].lead.observed]);
  });
});

describe("findings' states", () => {
  it("are tracked for every finding of the group-wide scan, as new, found by the scan", async () => {
    expect(list.findings.length).toBeGreaterThan(0);
    const s = await states();
    expect(s.canWork).toBe(true);
    expect(new Set(s.states.map((x) => x.key))).toEqual(new Set(list.findings.map((f) => f.key)));
    for (const x of s.states) expect(x).toMatchObject({ status: "new", trend: "new", owner: null });
    const w = await work(list.findings[0].key);
    expect(w.events.map((e) => e.kind)).toEqual(["found"]);
  });

  it("take a status with a note and an owner, each change in the history with who made it", async () => {
    const key = list.findings[0].key;
    const res = await change(key, { status: "investigating", owner: "Test Analyst", note: "pulling the lot's plugs from two shops" });
    expect(res.status).toBe(200);
    const w = findingWorkSchema.parse(res.body);
    expect(w.state).toMatchObject({ status: "investigating", owner: "Test Analyst" });
    expect(w.events.slice(0, 2).map((e) => [e.kind, e.actor, e.from, e.to, e.note])).toEqual([
      ["owner", "Test Analyst", null, "Test Analyst", null],
      ["status", "Test Analyst", "new", "investigating", "pulling the lot's plugs from two shops"],
    ]);
  });

  it("refuse a dismissal without its reason, and a change from a role that does not work findings", async () => {
    const key = list.findings.at(-1)!.key;
    const bad = await change(key, { status: "dismissed" });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/say why the finding is dismissed/);
    expect((await change(key, { status: "confirmed" }, clerk)).status).toBe(403);
    expect((await change(key, { status: "confirmed" }, manager)).status).toBe(403);
    expect((await work(key)).state.status).toBe("new");
    // a clerk reads them, and is told it cannot work them; a manager (one shop) reads none
    expect((await states(clerk)).canWork).toBe(false);
    expect((await request(t.app).get(apiPaths.findings()).set("Cookie", manager)).status).toBe(403);
  });

  it("say a later load strengthened a finding, and bring back a dismissed one that grew", async () => {
    const [first, last] = [list.findings[0], list.findings.at(-1)!];
    expect((await change(last.key, { status: "dismissed", reason: "a data-entry habit of one shop, not a part problem" })).status).toBe(200);
    // the figures a later load would give: more failures on both, the interval's lower limit higher
    const version = "a-later-load";
    await recordFindings(t.db, version, [first, last].map((f) => ({ key: f.key, description: f.sentence, observed: f.lead.observed + 6, expected: f.lead.expected, lower: f.lead.lower * 1.2 })));
    const s = new Map((await states()).states.map((x) => [x.key, x]));
    expect(s.get(first.key)).toMatchObject({ status: "investigating", trend: "stronger", observed: first.lead.observed + 6, previousObserved: first.lead.observed });
    expect(s.get(last.key)).toMatchObject({ status: "dismissed", grewSinceDismissed: true, dismissedReason: "a data-entry habit of one shop, not a part problem" });
    const w = await work(first.key);
    expect(w.events[0]).toMatchObject({ kind: "figures", actor: "Ironledger" });
    expect(w.events[0].to).toMatch(new RegExp(`^${first.lead.observed + 6} failures`));
    // the same version again changes nothing
    await recordFindings(t.db, version, [{ key: first.key, description: first.sentence, observed: first.lead.observed + 6, expected: first.lead.expected, lower: first.lead.lower * 1.2 }]);
    expect((await work(first.key)).events.length).toBe(w.events.length);
  });
});
