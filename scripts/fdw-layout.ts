/**
 * The distributed layout of docs/scaling.md, built on one machine with PostgreSQL's own means:
 * `fact_repair_line` becomes a table list-partitioned by `shop_key` in a "coordinator" database, and each
 * partition is a FOREIGN TABLE (postgres_fdw) living in another PostgreSQL cluster on loopback (a "shard").
 * Dimensions, the other facts and the derived agg_* tables stay in the coordinator, where they stand for the
 * replicated (reference) tables of a distributed PostgreSQL.
 *
 * Used by tests/db/fdw-layout.test.ts. By hand, against DATABASE_URL's cluster:
 *   node --import tsx scripts/fdw-layout.ts --source <database> --name <coordinator> --dir .data/fdw [--ports 54381,54382]
 * builds the coordinator from a copy of <database> and leaves the shards running (stop them with
 * `bash scripts/pg.sh stop <dir>/shard_a <port>`).
 *
 * Everything is read from the catalog of the source table (columns, generated columns, checks, keys, indexes,
 * triggers, the views that read it), so the layout follows the migrations without a second copy of the DDL.
 */
import { execFile } from "node:child_process";
import { createServer } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { pipeline } from "node:stream/promises";
import { promisify } from "node:util";
import pg from "pg";
import * as copyStreams from "pg-copy-streams";

const exec = promisify(execFile);
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

/** The fact that is distributed, and the column it is distributed on. */
export const DISTRIBUTED_TABLE = "fact_repair_line";
export const DISTRIBUTION_COLUMN = "shop_key";
/** The database each shard cluster holds its part of the fact in. */
const SHARD_DATABASE = "shard";

export interface Shard {
  /** the foreign server's name in the coordinator, also the folder of its cluster */
  name: string;
  dir: string;
  port: number;
  /** the shard database's URL */
  url: string;
}

export interface DistributionReport {
  /** which shops each shard holds and how many repair lines arrived there */
  shards: { server: string; partition: string; shopCodes: string[]; rows: number }[];
  /** primary and unique keys of the single table and what they became on the shards */
  keys: { name: string; single: string; onShards: string }[];
  /** foreign keys that pointed at (or from) the table: a partitioned table with foreign partitions has no unique key to point at */
  droppedForeignKeys: { table: string; name: string; definition: string }[];
  /** views that read the table, dropped and created again over the partitioned table, in dependency order */
  recreatedViews: string[];
  /** row triggers carried over to the partitioned table (PostgreSQL clones them onto the foreign partitions) */
  triggers: string[];
  /** indexes built on every shard (the coordinator holds none for this table) */
  shardIndexes: string[];
}

const ident = (name: string) => `"${name.replace(/"/g, '""')}"`;
const literal = (v: string) => `'${v.replace(/'/g, "''")}'`;

function withDatabase(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}

async function withClient<T>(url: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

async function portIsFree(port: number): Promise<boolean> {
  return await new Promise((resolve) => {
    const s = createServer();
    s.once("error", () => resolve(false));
    s.listen(port, "127.0.0.1", () => s.close(() => resolve(true)));
  });
}

/** The first `count` loopback ports in 54380–54389 that nothing listens on. */
export async function freeShardPorts(count: number, from = 54380, to = 54389): Promise<number[]> {
  const free: number[] = [];
  for (let p = from; p <= to && free.length < count; p++) if (await portIsFree(p)) free.push(p);
  if (free.length < count) throw new Error(`only ${free.length} free ports in ${from}–${to}, ${count} needed`);
  return free;
}

/**
 * Starts one PostgreSQL cluster per port under `baseDir` (scripts/pg.sh: loopback only, trust for local
 * users) and gives each an empty database "shard". Shards are named shard_a, shard_b, … in port order.
 */
export async function startShards(baseDir: string, ports: number[]): Promise<Shard[]> {
  const shards: Shard[] = ports.map((port, i) => {
    const name = `shard_${String.fromCharCode(97 + i)}`;
    return { name, dir: path.join(baseDir, name), port, url: `postgres://postgres@127.0.0.1:${port}/${SHARD_DATABASE}` };
  });
  await Promise.all(
    shards.map(async (s) => {
      await exec("bash", [path.join(root, "scripts/pg.sh"), "start", s.dir, String(s.port)], { cwd: root });
      await withClient(withDatabase(s.url, "postgres"), async (c) => {
        await c.query(`DROP DATABASE IF EXISTS ${SHARD_DATABASE} WITH (FORCE)`);
        await c.query(`CREATE DATABASE ${SHARD_DATABASE}`);
      });
    }),
  );
  return shards;
}

/** Stops the shard clusters (fast shutdown); their folders are left for the caller to remove. */
export async function stopShards(shards: Shard[]): Promise<void> {
  await Promise.all(shards.map((s) => exec("bash", [path.join(root, "scripts/pg.sh"), "stop", s.dir, String(s.port)], { cwd: root })));
}

/**
 * Creates database `name` as a copy of `source` (CREATE DATABASE … TEMPLATE: nobody may be connected to
 * `source` meanwhile) in the cluster of `adminUrl`, then distributes its repair lines over `shards`.
 */
export async function buildCoordinator(o: { adminUrl: string; source: string; name: string; shards: Shard[] }): Promise<DistributionReport> {
  await withClient(withDatabase(o.adminUrl, "postgres"), async (c) => {
    await c.query(`DROP DATABASE IF EXISTS ${ident(o.name)} WITH (FORCE)`);
    await c.query(`CREATE DATABASE ${ident(o.name)} TEMPLATE ${ident(o.source)}`);
  });
  return await distributeRepairLines(withDatabase(o.adminUrl, o.name), o.shards);
}

interface Column { name: string; type: string; notNull: boolean; generated: boolean; expr: string | null }

/** The table as the catalog describes it: what is needed to create it elsewhere. */
async function describeTable(c: pg.Client, table: string) {
  const columns = (
    await c.query<Column>(
      `SELECT a.attname AS name, format_type(a.atttypid, a.atttypmod) AS type, a.attnotnull AS "notNull",
              a.attgenerated = 's' AS generated, pg_get_expr(d.adbin, d.adrelid) AS expr
         FROM pg_attribute a LEFT JOIN pg_attrdef d ON d.adrelid = a.attrelid AND d.adnum = a.attnum
        WHERE a.attrelid = $1::regclass AND a.attnum > 0 AND NOT a.attisdropped ORDER BY a.attnum`,
      [table],
    )
  ).rows;
  const constraints = (
    await c.query<{ name: string; type: "c" | "p" | "u"; def: string; columns: string[] }>(
      `SELECT conname AS name, contype AS type, pg_get_constraintdef(oid) AS def,
              ARRAY(SELECT attname FROM unnest(conkey) WITH ORDINALITY k(n, i) JOIN pg_attribute ON attrelid = conrelid AND attnum = k.n ORDER BY k.i)::text[] AS columns
         FROM pg_constraint WHERE conrelid = $1::regclass AND contype IN ('c', 'p', 'u') ORDER BY contype, conname`,
      [table],
    )
  ).rows;
  const indexes = (
    await c.query<{ def: string }>(
      `SELECT pg_get_indexdef(i.indexrelid) AS def FROM pg_index i
        WHERE i.indrelid = $1::regclass AND NOT EXISTS (SELECT 1 FROM pg_constraint k WHERE k.conindid = i.indexrelid)
        ORDER BY i.indexrelid::regclass::text`,
      [table],
    )
  ).rows.map((r) => r.def);
  const foreignKeys = (
    await c.query<{ table: string; name: string; definition: string }>(
      `SELECT conrelid::regclass::text AS table, conname AS name, pg_get_constraintdef(oid) AS definition
         FROM pg_constraint WHERE contype = 'f' AND (confrelid = $1::regclass OR conrelid = $1::regclass) ORDER BY 1, 2`,
      [table],
    )
  ).rows;
  const triggers = (
    await c.query<{ def: string }>(`SELECT pg_get_triggerdef(oid) AS def FROM pg_trigger WHERE tgrelid = $1::regclass AND NOT tgisinternal ORDER BY tgname`, [table])
  ).rows.map((r) => r.def);
  // views (and materialized views) over the table, and views over those, deepest last
  const views = (
    await c.query<{ name: string; kind: string; options: string[] | null; def: string }>(
      `WITH RECURSIVE dep(oid, depth) AS (
         SELECT $1::regclass::oid, 0
         UNION ALL
         SELECT r.ev_class, dep.depth + 1 FROM dep
           JOIN pg_depend d ON d.refobjid = dep.oid AND d.classid = 'pg_rewrite'::regclass
           JOIN pg_rewrite r ON r.oid = d.objid
          WHERE r.ev_class <> dep.oid)
       SELECT c.oid::regclass::text AS name, c.relkind AS kind, c.reloptions AS options, pg_get_viewdef(c.oid) AS def
         FROM dep JOIN pg_class c ON c.oid = dep.oid WHERE dep.depth > 0
        GROUP BY c.oid, c.relkind, c.reloptions ORDER BY max(dep.depth), 1`,
      [table],
    )
  ).rows;
  return { columns, constraints, indexes, foreignKeys, triggers, views };
}

const columnDef = (col: Column) =>
  `${ident(col.name)} ${col.type}` +
  (col.generated ? ` GENERATED ALWAYS AS (${col.expr}) STORED` : col.expr ? ` DEFAULT ${col.expr}` : "") +
  (col.notNull ? " NOT NULL" : "");

/** A key made to contain the distribution column: it leads, the key's own columns follow. */
const withDistributionColumn = (columns: string[]) =>
  columns.includes(DISTRIBUTION_COLUMN) ? columns : [DISTRIBUTION_COLUMN, ...columns];

/**
 * Turns `fact_repair_line` of the database at `coordinatorUrl` into a table partitioned by LIST (shop_key)
 * whose partitions are foreign tables on `shards` (shops in shop-code order, dealt round-robin), copies each
 * shop's rows to its shard, and carries over what the single table had:
 * - on each shard: the columns (generated ones included), checks, every index, and the primary and unique
 *   keys with shop_key added where they lacked it (each shard can only vouch for its own rows, and a key
 *   holding the distribution column is unique across shards because a shop lives on one shard);
 * - in the coordinator: the same columns and checks on the partitioned table, no index and no key (a
 *   partitioned table with foreign partitions may have neither a unique index nor a local index on them),
 *   the row triggers (cloned onto the foreign partitions: they fire in the coordinator), and the views
 *   over the table, created again. Foreign keys to the table are dropped: there is no unique key left to
 *   point at.
 * The coordinator's part runs in one transaction (on failure its table stays as it was); the shards' tables
 * are created anew on every run.
 */
export async function distributeRepairLines(coordinatorUrl: string, shards: Shard[]): Promise<DistributionReport> {
  if (shards.length < 2) throw new Error("a distributed layout needs at least two shards");
  const table = DISTRIBUTED_TABLE;
  const single = `${table}_single`;
  return await withClient(coordinatorUrl, async (c) => {
    const t = await describeTable(c, table);
    const kind = (await c.query<{ relkind: string }>("SELECT relkind FROM pg_class WHERE oid = $1::regclass", [table])).rows[0].relkind;
    if (kind !== "r") throw new Error(`${table} is not a plain table (relkind ${kind}): already distributed?`);

    const keys = t.constraints
      .filter((k) => k.type !== "c")
      .map((k) => {
        const cols = withDistributionColumn(k.columns);
        return { name: k.name, single: k.def, onShards: `${k.type === "p" ? "PRIMARY KEY" : "UNIQUE"} (${cols.join(", ")})` };
      });
    const checks = t.constraints.filter((k) => k.type === "c");

    // 1. the shards' tables: same columns and checks, keys that hold shop_key; other indexes once the rows are in
    const shardDdl = `CREATE TABLE ${ident(table)} (\n  ${[
      ...t.columns.map(columnDef),
      ...checks.map((k) => `CONSTRAINT ${ident(k.name)} ${k.def}`),
      ...keys.map((k) => `CONSTRAINT ${ident(k.name)} ${k.onShards}`),
    ].join(",\n  ")}\n)`;
    for (const s of shards) {
      await withClient(s.url, async (sc) => {
        await sc.query(`DROP TABLE IF EXISTS ${ident(table)}`);
        await sc.query(shardDdl);
      });
    }

    // 2. which shops go where, and their rows there (COPY, shard by shard at once; generated columns are
    // computed again by the shard)
    const shops = (await c.query<{ key: string; code: string }>("SELECT shop_key::text AS key, shop_code AS code FROM dim_shop ORDER BY shop_code")).rows;
    const placement = shards.map((s, i) => ({ shard: s, shops: shops.filter((_, j) => j % shards.length === i) }));
    if (placement.some((p) => p.shops.length === 0)) throw new Error(`${shops.length} shops are too few for ${shards.length} shards`);
    const written = t.columns.filter((col) => !col.generated).map((col) => ident(col.name)).join(", ");
    await Promise.all(
      placement.map((p) =>
        withClient(coordinatorUrl, (from) =>
          withClient(p.shard.url, async (to) => {
            await pipeline(
              from.query(copyStreams.to(`COPY (SELECT ${written} FROM ${ident(table)} WHERE ${ident(DISTRIBUTION_COLUMN)} IN (${p.shops.map((s) => s.key).join(", ")})) TO STDOUT`)),
              to.query(copyStreams.from(`COPY ${ident(table)} (${written}) FROM STDIN`)),
            );
          }),
        ),
      ),
    );

    // 3. the coordinator, in one transaction
    await c.query("BEGIN");
    try {
      await c.query("CREATE EXTENSION IF NOT EXISTS postgres_fdw");
      for (const s of shards) {
        // async_capable: the coordinator starts every shard's scan before reading any (parallel Append);
        // fetch_size: rows per round trip (the default, 100, costs a round trip per hundred lines);
        // batch_size: rows per remote INSERT when lines are written through the coordinator.
        await c.query(`DROP SERVER IF EXISTS ${ident(s.name)} CASCADE`);
        await c.query(
          `CREATE SERVER ${ident(s.name)} FOREIGN DATA WRAPPER postgres_fdw OPTIONS (host '127.0.0.1', port ${literal(String(s.port))}, dbname ${literal(SHARD_DATABASE)}, async_capable 'true', fetch_size '10000', batch_size '1000')`,
        );
        await c.query(`CREATE USER MAPPING FOR PUBLIC SERVER ${ident(s.name)} OPTIONS (user 'postgres')`);
      }
      for (const v of [...t.views].reverse()) await c.query(`DROP ${v.kind === "m" ? "MATERIALIZED VIEW" : "VIEW"} ${v.name}`);
      for (const fk of t.foreignKeys) await c.query(`ALTER TABLE ${fk.table} DROP CONSTRAINT ${ident(fk.name)}`);
      await c.query(`ALTER TABLE ${ident(table)} RENAME TO ${ident(single)}`);
      await c.query(
        `CREATE TABLE ${ident(table)} (LIKE ${ident(single)} INCLUDING DEFAULTS INCLUDING GENERATED INCLUDING CONSTRAINTS) PARTITION BY LIST (${ident(DISTRIBUTION_COLUMN)})`,
      );
      for (const p of placement) {
        await c.query(
          `CREATE FOREIGN TABLE ${ident(`${table}_${p.shard.name}`)} PARTITION OF ${ident(table)} FOR VALUES IN (${p.shops.map((s) => s.key).join(", ")})
             SERVER ${ident(p.shard.name)} OPTIONS (schema_name 'public', table_name ${literal(table)})`,
        );
      }
      for (const def of t.triggers) await c.query(def);
      // every line arrived, once: a shop missing from dim_shop would have been left behind
      const count = async (rel: string) => Number((await c.query<{ n: string }>(`SELECT count(*) AS n FROM ${ident(rel)}`)).rows[0].n);
      const [had, moved] = [await count(single), await count(table)];
      if (moved !== had) throw new Error(`${had} lines in the single table, ${moved} on the shards`);
      await c.query(`DROP TABLE ${ident(single)}`);
      for (const v of t.views) {
        const options = v.options?.length ? ` WITH (${v.options.join(", ")})` : "";
        await c.query(`CREATE ${v.kind === "m" ? "MATERIALIZED VIEW" : "VIEW"} ${v.name}${options} AS ${v.def}`);
      }
      await c.query("COMMIT");
    } catch (err) {
      await c.query("ROLLBACK");
      throw err;
    }

    // 4. the shards' indexes and statistics, then the coordinator's statistics (sampled through the shards)
    const rows = await Promise.all(
      shards.map((s) =>
        withClient(s.url, async (sc) => {
          for (const def of t.indexes) await sc.query(def);
          await sc.query(`ANALYZE ${ident(table)}`);
          return Number((await sc.query<{ n: string }>(`SELECT count(*) AS n FROM ${ident(table)}`)).rows[0].n);
        }),
      ),
    );
    await c.query(`ANALYZE ${ident(table)}`);

    return {
      shards: placement.map((p, i) => ({ server: p.shard.name, partition: `${table}_${p.shard.name}`, shopCodes: p.shops.map((s) => s.code), rows: rows[i] })),
      keys,
      droppedForeignKeys: t.foreignKeys,
      recreatedViews: t.views.map((v) => v.name),
      triggers: t.triggers,
      shardIndexes: t.indexes,
    };
  });
}

async function main(): Promise<void> {
  const arg = (name: string) => {
    const i = process.argv.indexOf(`--${name}`);
    return i > 0 ? process.argv[i + 1] : undefined;
  };
  const base = process.env.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${process.env.PGPORT ?? 54329}/postgres`;
  const source = arg("source");
  const name = arg("name");
  const dir = path.resolve(arg("dir") ?? ".data/fdw");
  if (!source || !name) throw new Error("usage: scripts/fdw-layout.ts --source <database> --name <coordinator> [--dir DIR] [--ports P,Q]");
  const ports = arg("ports")?.split(",").map(Number) ?? (await freeShardPorts(2));
  const shards = await startShards(dir, ports);
  const report = await buildCoordinator({ adminUrl: base, source, name, shards });
  process.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((err: unknown) => {
    process.stderr.write(`${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  });
}
