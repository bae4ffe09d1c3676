import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { EtlFatalError } from "../../etl/errors.js";
import { loadFile } from "../../etl/load/load-file.js";
import { upsertShops } from "../../etl/shops/upsert-shops.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { count, dropTestDb, fixture, snapshot, TODAY } from "./helpers.js";

describe("a dry run and a cancelled load", () => {
  let t: TestDb;

  beforeAll(async () => {
    t = await freshTestDb();
    await upsertShops(t.pool, [{ code: "S4", name: "Fourth" }, { code: "S5", name: "Fifth" }]);
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
  });
  afterAll(async () => dropTestDb(t));

  it("counts what a load would do, shows rows and rejects, and stores nothing, not even a batch", async () => {
    const before = await snapshot(t.pool);
    const batches = await count(t.pool, "etl_batch");
    const dry = await loadFile(t.pool, { path: fixture("jobs-bad-rows.csv"), loadedBy: "test", today: TODAY, dryRun: true, previewRows: 5 });
    expect(dry.status).toBe("dry_run");
    expect(await snapshot(t.pool)).toEqual(before);
    expect(await count(t.pool, "etl_batch")).toBe(batches);
    // the first rows as they would land (canonical codes and units) and the first rejects with their reasons
    expect(dry.preview!.rows[0]).toMatchObject({ line: 2, shop_code: "S4", component_code: "ENG-CSA-HPLUG" });
    expect(dry.preview!.rejects.length).toBe(5);
    expect(dry.preview!.rejects[0]).toMatchObject({ line: 3, code: "bad_date" });
    expect(dry.preview!.rejects[0].raw.length).toBe(30);

    const real = await loadFile(t.pool, { path: fixture("jobs-bad-rows.csv"), loadedBy: "test", today: TODAY });
    const pick = ({ read, inserted, updated, unchanged, rejected }: typeof real) => ({ read, inserted, updated, unchanged, rejected });
    expect(pick(dry)).toEqual(pick(real));
  });

  it("keeps nothing of a load cancelled part-way, and records no batch", async () => {
    const before = await snapshot(t.pool);
    const batches = await count(t.pool, "etl_batch");
    const ctl = new AbortController();
    const err = await loadFile(t.pool, {
      path: fixture("jobs-export-2.csv"),
      loadedBy: "test",
      today: TODAY,
      blockRows: 1,
      hooks: {},
      onProgress: () => undefined,
      signal: ctl.signal,
      // cancelled as soon as the header report is in, i.e. before the first row is staged
      onHeader: () => ctl.abort(),
    }).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(EtlFatalError);
    expect((err as EtlFatalError).code).toBe("CANCELLED");
    expect(await snapshot(t.pool)).toEqual(before);
    expect(await count(t.pool, "etl_batch")).toBe(batches);
  });
});
