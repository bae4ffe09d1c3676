import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { KeyCache, whKey } from "../../etl/load/keys.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb } from "./helpers.js";

// The loader's keys must be the very keys the warehouse's SQL function wh_key(text) gives (PostgreSQL's
// md5, first 16 hex digits as a signed 64-bit integer), or rows staged by the loader would not meet
// the rows merged in SQL.
describe("whKey", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
  });
  afterAll(async () => dropTestDb(t));

  const naturalKeys = ["repair_line|S1|R-100|1", "machine|KDLV0012", "part|HP26104|BT-2109", "shop|S5", "technician|S5|S5-T2", "hour|ro|S1|R-1|2", "part|Ölfilter|", ""];

  it("equals wh_key(text) in PostgreSQL, sign and non-ASCII text included", async () => {
    const r = await t.pool.query<{ k: string }>(`SELECT wh_key(k)::text AS k FROM unnest($1::text[]) WITH ORDINALITY AS x(k, i) ORDER BY i`, [naturalKeys]);
    expect(naturalKeys.map(whKey)).toEqual(r.rows.map((x) => x.k));
    expect(r.rows.some((x) => x.k.startsWith("-"))).toBe(true);
  });

  it("gives the same key through the cache, for one- and two-part keys", () => {
    const cache = new KeyCache();
    expect(cache.of("machine", "KDLV0012")).toBe(whKey("machine|KDLV0012"));
    expect(cache.of("machine", "KDLV0012")).toBe(whKey("machine|KDLV0012"));
    expect(cache.of("part", "HP26104", "BT-2109")).toBe(whKey("part|HP26104|BT-2109"));
    expect(cache.of("part", "HP26104", "")).toBe(whKey("part|HP26104|"));
  });
});
