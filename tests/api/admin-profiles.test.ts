import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { listProfiles, loadFile } from "../../etl/index.js";
import { apiPaths } from "../../shared/api-paths.js";
import { profileDetailSchema, profileListSchema, type Profile } from "../../shared/schemas/profiles.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { fixture, TODAY } from "../etl/helpers.js";

// Mapping profiles kept in the warehouse and edited by an administrator: seeded from etl/profiles/, versioned
// (a save is a new version, each batch records the version that read it, an edit never changes a loaded batch),
// and tried against a sample as a dry run that stores nothing.

const ORIGIN = "http://127.0.0.1:8080";

let t: TestApp;
let admin: string;
let dir: string;

const get = (p: string) => request(t.app).get(p).set("Cookie", admin);
const put = (id: string, body: unknown) => request(t.app).put(apiPaths.adminProfile(id)).set("Cookie", admin).set("Origin", ORIGIN).send(body as object);
const post = (body: unknown) => request(t.app).post(apiPaths.adminProfiles()).set("Cookie", admin).set("Origin", ORIGIN).send(body as object);
const tryOn = (id: string, profile: Profile, file: string) =>
  request(t.app).post(apiPaths.adminProfileTest(id)).set("Cookie", admin).set("Origin", ORIGIN).field("profile", JSON.stringify(profile)).attach("sample", file);
const detail = async (id: string) => profileDetailSchema.parse((await get(apiPaths.adminProfile(id)).expect(200)).body);

/** Every table a load writes, counted: a dry run or a profile test must leave all of them as they were. */
const footprint = async () =>
  (
    await t.pool.query(`SELECT (SELECT count(*) FROM etl_batch) AS batches, (SELECT count(*) FROM fact_repair_line) AS lines,
      (SELECT count(*) FROM etl_reject) AS rejects, (SELECT count(*) FROM etl_profile_version) AS versions,
      (SELECT count(*) FROM fact_hour_reading) AS readings`)
  ).rows[0];

/** The jobs fixture with every ISO date written day first (DD/MM/YYYY), as a shop system set to a European locale writes them. */
function dayFirstCopy(): string {
  const text = readFileSync(fixture("jobs-export-1.csv"), "utf8").replace(/\b(\d{4})-(\d{2})-(\d{2})\b/g, "$3/$2/$1");
  const file = path.join(dir, "jobs-day-first.csv");
  writeFileSync(file, text);
  return file;
}

beforeAll(async () => {
  t = await testApp();
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin" });
  dir = mkdtempSync(path.join(tmpdir(), "profiles-"));
  await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
}, 120_000);
afterAll(async () => t?.drop());

describe("stored profiles", () => {
  it("are seeded from the files as version 1 by the defaults, one per file", async () => {
    const body = profileListSchema.parse((await get(apiPaths.adminProfiles()).expect(200)).body);
    expect(body.profiles.map((p) => p.id)).toEqual(listProfiles().map((p) => p.id).sort());
    for (const p of body.profiles) expect(p).toMatchObject({ versions: 1, isDefault: true, latest: { version: 1, savedBy: "defaults" } });
    const d = await detail("generic-jobs");
    expect(d.profile).toEqual(listProfiles().find((p) => p.id === "generic-jobs"));
    expect(d.layout.filter((c) => c.required).map((c) => c.column)).toEqual(["shop_code", "ro_number", "line_no", "serial", "opened_date", "component_code"]);
  });

  it("record on each batch the version that read it", async () => {
    const s = await loadFile(t.pool, { path: fixture("jobs-export-1.csv"), loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ profile: "generic-jobs", profileVersion: 1, status: "loaded" });
    const b = await t.pool.query(`SELECT profile, profile_version FROM etl_batch WHERE batch_id = $1`, [s.batchId]);
    expect(b.rows[0]).toEqual({ profile: "generic-jobs", profile_version: 1 });
  });
});

describe("an admin's edit", () => {
  it("is refused in words, field by field, when the schema refuses it, and nothing is stored", async () => {
    const before = await footprint();
    const d = await detail("generic-jobs");
    const bad = { ...d.profile, dateFormat: "yyyy", columns: { ...d.profile.columns, serial: " " } };
    const res = await put("generic-jobs", { profile: bad, basedOn: d.version });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/^The profile was not saved: /);
    expect(res.body.error.message).toMatch(/dateFormat/);
    expect(res.body.error.message).toMatch(/columns\.serial: a column's header cannot be blank/);
    // one header feeding two columns
    const twice = await put("generic-jobs", { profile: { ...d.profile, columns: { ...d.profile.columns, complaint: d.profile.columns.cause } }, basedOn: d.version });
    expect(twice.status).toBe(400);
    expect(twice.body.error.message).toMatch(/"cause" is already the header of cause; each header can feed one column/);
    expect(await footprint()).toEqual(before);
  });

  it("is tried against a sample as a dry run: the draft's counts change, and nothing at all is stored", async () => {
    const sample = dayFirstCopy();
    const d = await detail("generic-jobs");
    const before = await footprint();
    const asStored = await tryOn("generic-jobs", d.profile, sample).expect(200);
    const draft = { ...d.profile, dateFormat: "dmy" as const };
    const asDrafted = await tryOn("generic-jobs", draft, sample).expect(200);
    const lines = readFileSync(sample, "utf8").trim().split("\n").length - 1;
    // read ISO, day-first dates are no dates: every row is refused, with its reason in words
    expect(asStored.body.preview.read).toBe(lines);
    expect(asStored.body.preview.rejected).toBe(lines);
    expect(asStored.body.preview.rejects[0].reason).toMatch(/date/i);
    // read day first, the same rows are the rows the fixture already loaded: unchanged, none rejected
    expect(asDrafted.body.preview).toMatchObject({ read: lines, rejected: 0, inserted: 0 });
    expect(asDrafted.body.preview.unchanged).toBe(lines);
    expect(asDrafted.body.preview.rows[0].values.opened_date).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(await footprint()).toEqual(before);
    expect((await detail("generic-jobs")).version).toBe(d.version);
  });

  it("refuses a sample that is not a CSV export, and a draft of another profile", async () => {
    const d = await detail("generic-jobs");
    const bin = path.join(dir, "photo.csv");
    writeFileSync(bin, Buffer.from("89504e470d0a1a0a0000000d49484452000000010000000100000000", "hex").toString("binary").repeat(400), "binary");
    const res = await tryOn("generic-jobs", d.profile, bin);
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/not a CSV export|binary/);
    const other = await tryOn("generic-jobs", { ...d.profile, id: "generic-hours" }, dayFirstCopy());
    expect(other.status).toBe(400);
  });

  it("is saved as the next version; loaded batches keep theirs and their data; the same bytes are read again by the new version", async () => {
    const d = await detail("generic-jobs");
    const loadedBefore = await t.pool.query(`SELECT batch_id, profile_version FROM etl_batch ORDER BY batch_id`);
    const factsBefore = await t.pool.query(`SELECT repair_line_key, opened_date::text, row_hash FROM fact_repair_line ORDER BY 1`);
    const res = await put("generic-jobs", { profile: { ...d.profile, description: "Edited by a test", columns: { ...d.profile.columns, complaint: "complaint" } }, basedOn: d.version, note: "clearer description" });
    expect(res.status).toBe(200);
    const saved = profileDetailSchema.parse(res.body);
    expect(saved.version).toBe(d.version + 1);
    expect(saved.history.map((h) => [h.version, h.savedBy, h.note])).toEqual([
      [d.version + 1, "Test Admin", "clearer description"],
      [d.version, "defaults", "from etl/profiles"],
    ]);
    // the old version is still there, as it was
    expect((await detail("generic-jobs").then(() => get(apiPaths.adminProfile("generic-jobs", d.version)).expect(200))).body.profile).toEqual(d.profile);
    // an edit changes no batch and no fact
    expect((await t.pool.query(`SELECT batch_id, profile_version FROM etl_batch ORDER BY batch_id`)).rows).toEqual(loadedBefore.rows);
    expect((await t.pool.query(`SELECT repair_line_key, opened_date::text, row_hash FROM fact_repair_line ORDER BY 1`)).rows).toEqual(factsBefore.rows);
    // the same file again: read by the new version (not taken as already loaded), nothing in it changes
    const again = await loadFile(t.pool, { path: fixture("jobs-export-1.csv"), loadedBy: "test", today: TODAY });
    expect(again).toMatchObject({ status: "loaded", profileVersion: d.version + 1, inserted: 0, updated: 0 });
    expect(again.unchanged).toBe(again.read);
    // and once more by the same version: already loaded
    const thrice = await loadFile(t.pool, { path: fixture("jobs-export-1.csv"), loadedBy: "test", today: TODAY });
    expect(thrice).toMatchObject({ status: "already_loaded", profileVersion: d.version + 1 });
  });

  it("started from an older version is refused (409) with the newer version named, and stores nothing", async () => {
    const d = await detail("generic-jobs");
    const res = await put("generic-jobs", { profile: d.profile, basedOn: d.version - 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(new RegExp(`saved as version ${d.version} after you opened version ${d.version - 1}`));
    expect((await detail("generic-jobs")).version).toBe(d.version);
  });

  it("cannot change a profile's name or kind", async () => {
    const d = await detail("generic-jobs");
    expect((await put("generic-jobs", { profile: { ...d.profile, id: "renamed-jobs" }, basedOn: d.version })).status).toBe(400);
    const kind = await put("generic-jobs", { profile: { ...d.profile, kind: "hours" }, basedOn: d.version });
    expect(kind.status).toBe(422);
    expect(kind.body.error.message).toMatch(/kind cannot change/);
    expect((await detail("generic-jobs")).version).toBe(d.version);
  });
});

describe("a new profile", () => {
  it("is saved as version 1 and reads files from then on; a taken name is refused", async () => {
    const base = (await detail("generic-jobs")).profile;
    const copy = { ...base, id: "day-first-jobs", description: "Generic jobs layout, dates day first", dateFormat: "dmy" as const };
    const res = await post({ profile: copy, basedOn: null, note: "for the day-first export" });
    expect(res.status).toBe(201);
    expect(profileDetailSchema.parse(res.body)).toMatchObject({ version: 1, history: [{ version: 1, savedBy: "Test Admin" }] });
    const s = await loadFile(t.pool, { path: dayFirstCopy(), profile: "day-first-jobs", loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ profile: "day-first-jobs", profileVersion: 1, rejected: 0 });
    const taken = await post({ profile: copy, basedOn: null });
    expect(taken.status).toBe(409);
    expect(taken.body.error.message).toMatch(/already exists/);
  });
});
