import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb, fixture, runEtlCli } from "./helpers.js";

describe("npm run etl -- load", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
  });
  afterAll(async () => dropTestDb(t));

  it("prints one JSON object per line with a final summary per file when given --json", async () => {
    const r = await runEtlCli(t.url, ["load", "--json", fixture("machines.csv")]);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split("\n").map((l) => JSON.parse(l));
    const summary = lines.filter((l) => l.event === "summary").at(-1);
    expect(lines.at(-1)).toMatchObject({ event: "exposure_rebuilt" }); // once, after the files that changed something
    expect(summary).toMatchObject({ event: "summary", file: fixture("machines.csv"), kind: "machines", profile: "generic-machines", read: 3, inserted: 3, updated: 0, unchanged: 0, rejected: 0 });
  });

  it("exits non-zero with a one-line message and loads nothing when the profile is unknown", async () => {
    const r = await runEtlCli(t.url, ["load", "--profile", "no-such-profile", fixture("jobs-export-1.csv")]);
    expect(r.code).not.toBe(0);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/unknown profile "no-such-profile"/);
    const n = await t.pool.query(`SELECT count(*)::int AS n FROM fact_repair_line`);
    expect(n.rows[0].n).toBe(0);
  });
});
