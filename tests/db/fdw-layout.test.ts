import { mkdtempSync, rmSync } from "node:fs";
import path from "node:path";
import pg from "pg";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../server/app.js";
import { serviceSessionCookie } from "../../server/auth/service-session.js";
import { createDb, type Db } from "../../server/db/database.js";
import { apiPaths } from "../../shared/api-paths.js";
import type { Role } from "../../shared/roles.js";
import type { ClusterDetail, ClusterList } from "../../shared/schemas/analytics-clusters.js";
import type { RepairList } from "../../shared/schemas/repairs.js";
import { buildCoordinator, freeShardPorts, startShards, stopShards, type DistributionReport, type Shard } from "../../scripts/fdw-layout.js";
import { freshDemoDb, type TestDb } from "../helpers/test-db.js";
import { appOver, SESSION_SECRET } from "../helpers/test-app.js";
import { adminUrl } from "../helpers/test-db-names.js";

/**
 * The distributed shape of docs/scaling.md on one machine: the demo world (scale 1, the shared template) in
 * one database as it is, and a copy of it — the coordinator — whose fact_repair_line is list-partitioned by
 * shop_key over two more PostgreSQL clusters through postgres_fdw. The same app, unchanged, runs on each,
 * and every analytics and table route must answer with the same JSON on both.
 */
const root = path.resolve(import.meta.dirname, "../..");

interface Layout {
  db: Db;
  pool: pg.Pool;
  app: ReturnType<typeof createApp>;
  signInAs(roles: Role[], shops?: string[]): Promise<string>;
}

/** createApp over a database, as tests/helpers/test-app.ts makes it over a fresh one. */
function layoutOver({ db, pool }: { db: Db; pool: pg.Pool }): Layout {
  const app = appOver({ db, pool });
  return {
    db,
    pool,
    app,
    // the same user on both layouts (the overview keeps visits per user), signed in as the server signs in itself
    signInAs: (roles, shops = []) =>
      serviceSessionCookie(pool, SESSION_SECRET, { sub: `fdw-${roles.join("-")}-${shops.join("-")}`, name: "Test User", email: null, roles, shops }, 1),
  };
}

let source: TestDb;
let coordinatorName: string;
let dir: string;
let shards: Shard[] = [];
let report: DistributionReport;
let single: Layout;
let distributed: Layout;
const cookies = new Map<Layout, { analyst: string; managerS5: string }>();

beforeAll(async () => {
  source = await freshDemoDb();
  coordinatorName = `${source.name}_coordinator`;
  dir = mkdtempSync(path.join(root, ".data", "fdw-layout-"));
  shards = await startShards(dir, await freeShardPorts(2));
  // nobody is connected to the source yet: it can serve as the coordinator's template
  report = await buildCoordinator({ adminUrl: adminUrl("postgres"), source: source.name, name: coordinatorName, shards });
  single = layoutOver(source);
  distributed = layoutOver(createDb(adminUrl(coordinatorName), 5));
  for (const l of [single, distributed]) cookies.set(l, { analyst: await l.signInAs(["analyst"]), managerS5: await l.signInAs(["manager"], ["S5"]) });
}, 240_000);

afterAll(async () => {
  await distributed?.db.destroy();
  if (coordinatorName) {
    const c = new pg.Client({ connectionString: adminUrl("postgres") });
    await c.connect();
    await c.query(`DROP DATABASE IF EXISTS ${coordinatorName} WITH (FORCE)`);
    await c.end();
  }
  await stopShards(shards);
  if (dir) rmSync(dir, { recursive: true, force: true });
  await source?.drop();
}, 120_000);

const get = async (l: Layout, url: string, who: "analyst" | "managerS5" = "analyst") => {
  const res = await request(l.app).get(url).set("Cookie", cookies.get(l)![who]);
  expect(res.status, `${url}: ${JSON.stringify(res.body)}`).toBe(200);
  return res;
};
/**
 * Where two JSON answers differ, as paths. Keys, strings, booleans, integers, lengths and the order of lists
 * must be identical; two fractional numbers count as the same when they agree to 12 significant digits.
 * A sum of doubles depends on the order of its terms, and some answers sum over rows a query returns without
 * ORDER BY (the MCF's Lawless–Nadeau variance sums over machines in the order they arrive): when the
 * coordinator's plan or its shards deliver them in another order, the last bits move (seen: 2.2733143463333234
 * against 2.273314346333323). Any difference in the data moves far more than that.
 */
function differences(a: unknown, b: unknown, at = "$"): string[] {
  if (typeof a === "number" && typeof b === "number") {
    if (a === b) return [];
    const close = !Number.isInteger(a) && !Number.isInteger(b) && Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));
    return close ? [] : [`${at}: ${a} ≠ ${b}`];
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return [`${at}: ${a.length} items ≠ ${b.length} items`];
    return a.flatMap((x, i) => differences(x, b[i], `${at}[${i}]`));
  }
  if (a && b && typeof a === "object" && typeof b === "object" && !Array.isArray(a) && !Array.isArray(b)) {
    // when an answer was computed is a moment of the server that computed it, not data
    const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].filter((k) => k !== "computedAt").sort();
    return keys.flatMap((k) => differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${at}.${k}`));
  }
  return Object.is(a, b) ? [] : [`${at}: ${JSON.stringify(a)} ≠ ${JSON.stringify(b)}`];
}

/** The answer of both layouts; the caller compares them. */
const both = async (url: string, who: "analyst" | "managerS5" = "analyst") => {
  const [a, b] = [await get(single, url, who), await get(distributed, url, who)];
  return { single: a, distributed: b };
};

const onShard = async <T,>(s: Shard, text: string): Promise<T[]> => {
  const c = new pg.Client({ connectionString: s.url });
  await c.connect();
  try {
    return (await c.query(text)).rows as T[];
  } finally {
    await c.end();
  }
};

describe("distributeRepairLines on the demo world", () => {
  it("makes fact_repair_line a table partitioned by shop_key whose partitions are foreign tables on the two shards", async () => {
    const parent = await distributed.pool.query<{ strategy: string; key: string }>(
      "SELECT p.partstrat AS strategy, pg_get_partkeydef(p.partrelid) AS key FROM pg_partitioned_table p WHERE p.partrelid = 'fact_repair_line'::regclass",
    );
    expect(parent.rows).toEqual([{ strategy: "l", key: "LIST (shop_key)" }]);
    const parts = await distributed.pool.query<{ name: string; kind: string; server: string }>(
      `SELECT c.relname AS name, c.relkind AS kind, s.srvname AS server FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid
         JOIN pg_foreign_table f ON f.ftrelid = c.oid JOIN pg_foreign_server s ON s.oid = f.ftserver
        WHERE i.inhparent = 'fact_repair_line'::regclass ORDER BY 1`,
    );
    expect(parts.rows).toEqual(shards.map((s) => ({ name: `fact_repair_line_${s.name}`, kind: "f", server: s.name })));
    // the single layout still has one plain table
    expect((await single.pool.query("SELECT relkind FROM pg_class WHERE oid = 'fact_repair_line'::regclass")).rows).toEqual([{ relkind: "r" }]);
  });

  it("puts each shop's lines on exactly one shard, every line once", async () => {
    const perShop = async (q: (text: string) => Promise<{ shop_code: string; n: string }[]>) =>
      Object.fromEntries((await q("SELECT s.shop_code, count(*) AS n FROM fact_repair_line f JOIN dim_shop s USING (shop_key) GROUP BY 1")).map((r) => [r.shop_code, Number(r.n)]));
    const expected = await perShop(async (t) => (await single.pool.query(t)).rows);
    expect(Object.keys(expected).length).toBe(8);
    const codes = new Map((await single.pool.query<{ shop_key: string; shop_code: string }>("SELECT shop_key::text, shop_code FROM dim_shop")).rows.map((r) => [r.shop_key, r.shop_code]));
    const seen: Record<string, number> = {};
    for (const [i, s] of shards.entries()) {
      const rows = await onShard<{ shop_key: string; n: string }>(s, "SELECT shop_key::text, count(*) AS n FROM fact_repair_line GROUP BY 1");
      const here = rows.map((r) => codes.get(r.shop_key)!).sort();
      expect(here).toEqual([...report.shards[i].shopCodes].sort());
      expect(here.length).toBe(4);
      for (const r of rows) seen[codes.get(r.shop_key)!] = (seen[codes.get(r.shop_key)!] ?? 0) + Number(r.n);
    }
    expect(seen).toEqual(expected);
    expect(report.shards.map((s) => s.rows)).toEqual(report.shards.map((s) => s.shopCodes.reduce((n, code) => n + expected[code], 0)));
    expect(await perShop(async (t) => (await distributed.pool.query(t)).rows)).toEqual(expected);
  });

  it("keeps the keys on the shards with shop_key in them, and no key or index on the coordinator's table", async () => {
    expect(report.keys).toEqual([
      { name: "fact_repair_line_pkey", single: "PRIMARY KEY (repair_line_key)", onShards: "PRIMARY KEY (shop_key, repair_line_key)" },
      { name: "fact_repair_line_shop_key_ro_number_line_no_key", single: "UNIQUE (shop_key, ro_number, line_no)", onShards: "UNIQUE (shop_key, ro_number, line_no)" },
    ]);
    for (const s of shards) {
      const keys = await onShard<{ def: string }>(s, "SELECT pg_get_constraintdef(oid) AS def FROM pg_constraint WHERE conrelid = 'fact_repair_line'::regclass AND contype IN ('p', 'u') ORDER BY contype");
      expect(keys.map((k) => k.def)).toEqual(["PRIMARY KEY (shop_key, repair_line_key)", "UNIQUE (shop_key, ro_number, line_no)"]);
      const indexes = await onShard<{ n: string }>(s, "SELECT count(*) AS n FROM pg_index WHERE indrelid = 'fact_repair_line'::regclass");
      expect(Number(indexes[0].n)).toBe(report.shardIndexes.length + 2);
    }
    const local = await distributed.pool.query("SELECT 1 FROM pg_index WHERE indrelid = 'fact_repair_line'::regclass");
    expect(local.rowCount).toBe(0);
    expect(report.droppedForeignKeys.map((f) => `${f.table}.${f.name}`)).toEqual([
      "fact_fault_code.fact_fault_code_repair_line_key_fkey",
      "fact_repair_line_history.fact_repair_line_history_repair_line_key_fkey",
    ]);
  });

  it("reads the same rows through the views over fact_repair_line", async () => {
    expect(report.recreatedViews).toEqual(["fact_hour_reading", "v_engine_hours"]);
    const summary = `SELECT (SELECT count(*) FROM fact_hour_reading WHERE source = 'ro') AS ro_readings,
      (SELECT sum(hours) FROM fact_hour_reading) AS hours, (SELECT count(*) FROM v_engine_hours) AS engine_hour_rows,
      (SELECT sum(engine_hours)::numeric(20, 3) FROM v_engine_hours) AS engine_hours`;
    const a = (await single.pool.query(summary)).rows[0];
    expect(Number(a.ro_readings)).toBeGreaterThan(10_000);
    expect((await distributed.pool.query(summary)).rows[0]).toEqual(a);
  });
});

describe("the API on the distributed layout", () => {
  const analystRoutes = [
    apiPaths.overview(),
    apiPaths.rates("components"),
    apiPaths.rates("hour-bands", "components=ENG-CSA-HPLUG"),
    apiPaths.rates("temperature-bands", "components=ENG-CSA-HPLUG&engineFamilies=K18-3G,K26-4R"),
    apiPaths.rates("monthly", "components=ENG-CSA-HPLUG"),
    apiPaths.life("weibull", "component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109"),
    apiPaths.life("kaplan-meier", "component=ENG-CSA-HPLUG&engineFamilies=K26-4R&lots=BT-2109&compareBy=climate&compareValue=cold&compareOther=mild"),
    apiPaths.life("mcf", "component=HYD-LIN-HOSE"),
    apiPaths.clusters(),
    apiPaths.benchmarks("shops"),
    apiPaths.benchmarks("funnel", { period: "all" }),
    apiPaths.benchmarks("trend"),
    apiPaths.benchmarks("comebacks", { shop: "S5" }),
    apiPaths.repairs("sort=hours&dir=desc&pageSize=50"),
    apiPaths.repairs("shops=S1,S2&components=ENG-CSA-HPLUG&sort=opened&dir=asc&pageSize=100"),
    apiPaths.repairsCsv("shops=S2,S5&components=ENG-CSA-HPLUG"),
  ];

  it("compares answers exactly but for the last bits of fractions", () => {
    const answer = { rows: [{ band: "0-20F", failures: 12, rate: 2.2733143463333234 }], next: null };
    expect(differences(answer, { rows: [{ band: "0-20F", failures: 12, rate: 2.273314346333323 }], next: null })).toEqual([]);
    expect(differences(answer, { rows: [{ band: "0-20F", failures: 13, rate: 2.2733143463333234 }], next: null })).toEqual(["$.rows[0].failures: 12 ≠ 13"]);
    expect(differences(answer, { rows: [{ band: "0-20F", failures: 12, rate: 2.27331434633 }], next: null })).toHaveLength(1);
    expect(differences(answer, { rows: [], next: null })).toEqual(["$.rows: 1 items ≠ 0 items"]);
    expect(differences(answer, { rows: answer.rows, next: "x" })).toEqual(['$.next: null ≠ "x"']);
  });

  it.each(analystRoutes)("answers GET %s to an analyst as on one table", async (url) => {
    const r = await both(url);
    expect(differences(r.single.body, r.distributed.body)).toEqual([]);
    if (url.includes(".csv")) expect(r.distributed.text).toBe(r.single.text);
  });

  it("answers the top cluster's detail as on one table", async () => {
    const list = (await get(single, apiPaths.clusters())).body as ClusterList;
    expect(list.clusters.length).toBeGreaterThan(0);
    const r = await both(apiPaths.cluster(list.clusters[0].id));
    expect((r.single.body as ClusterDetail).lines.length).toBe(list.clusters[0].observed);
    expect(differences(r.single.body, r.distributed.body)).toEqual([]);
  });

  it("pages the repairs list with the same rows and cursors, page 1 and page 2 through nextCursor", async () => {
    const first = await both(apiPaths.repairs("sort=opened&dir=desc&pageSize=25"));
    expect(differences(first.single.body, first.distributed.body)).toEqual([]);
    const page1 = first.single.body as RepairList;
    expect(page1.rows.length).toBe(25);
    expect(page1.nextCursor).toBeTruthy();
    const second = await both(apiPaths.repairs(`sort=opened&dir=desc&pageSize=25&cursor=${encodeURIComponent(page1.nextCursor!)}`));
    expect(differences(second.single.body, second.distributed.body)).toEqual([]);
    expect((second.single.body as RepairList).rows[0]).not.toEqual(page1.rows[0]);
  });

  it("answers a manager of S5 (one shop, one shard) as on one table", async () => {
    for (const url of [apiPaths.repairs("sort=shop&dir=asc&pageSize=50"), apiPaths.benchmarks("shops"), apiPaths.rates("components")]) {
      const r = await both(url, "managerS5");
      expect(differences(r.single.body, r.distributed.body), url).toEqual([]);
    }
  });
});

describe("the history trigger on the coordinator", () => {
  it("keeps a line's prior version when the line changes through the coordinator", async () => {
    expect(report.triggers).toEqual([expect.stringMatching(/^CREATE TRIGGER fact_repair_line_keep_history BEFORE UPDATE ON public\.fact_repair_line FOR EACH ROW/)]);
    const line = (await distributed.pool.query<{ key: string; shop_key: string; batch_id: string }>(
      "SELECT repair_line_key::text AS key, shop_key::text, batch_id::text FROM fact_repair_line ORDER BY repair_line_key LIMIT 1",
    )).rows[0];
    const before = Number((await distributed.pool.query("SELECT count(*) AS n FROM fact_repair_line_history")).rows[0].n);
    await distributed.pool.query("UPDATE fact_repair_line SET row_hash = 'changed', labor_hours = 9.5 WHERE repair_line_key = $1", [line.key]);
    const history = await distributed.pool.query<{ prior_batch_id: string; hash: string }>(
      "SELECT prior_batch_id::text, prior_row->>'row_hash' AS hash FROM fact_repair_line_history WHERE repair_line_key = $1",
      [line.key],
    );
    expect(Number((await distributed.pool.query("SELECT count(*) AS n FROM fact_repair_line_history")).rows[0].n)).toBe(before + 1);
    expect(history.rows.at(-1)!.prior_batch_id).toBe(line.batch_id);
    expect(history.rows.at(-1)!.hash).not.toBe("changed");
    const onShards = await Promise.all(shards.map((s) => onShard<{ labor_hours: string }>(s, `SELECT labor_hours::text FROM fact_repair_line WHERE repair_line_key = ${line.key}`)));
    expect(onShards.flat()).toEqual([{ labor_hours: "9.50" }]);
  });
});
