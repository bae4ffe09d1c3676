import { Command, InvalidArgumentError } from "commander";
import cliProgress from "cli-progress";
import os from "node:os";
import pg from "pg";
import { EtlFatalError } from "./errors.js";
import { loadFile, type BatchSummary, type LoadProgress } from "./load/load-file.js";
import { Kysely, PostgresDialect } from "kysely";
import { refreshExposure } from "./derived/refresh-exposure.js";
import { etlPoolConfig } from "./load/timed-client.js";
import { exportKindSchema, type ExportKind } from "./profiles/profile-schema.js";
import { readShopRegister } from "./shops/read-register.js";
import { upsertShops } from "./shops/upsert-shops.js";

// A thin shell over etl/load/load-file.ts: parse arguments, load each file, print progress and a summary.

const defaultUrl = () => process.env.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${process.env.PGPORT ?? "54329"}/ironledger`;

function parseKind(v: string): ExportKind {
  const r = exportKindSchema.safeParse(v);
  if (!r.success) throw new InvalidArgumentError(`kind must be one of ${exportKindSchema.options.join(", ")}`);
  return r.data;
}

function summaryLine(s: BatchSummary): string {
  const note = s.status === "already_loaded" ? " (file already loaded: nothing changed)" : "";
  return `${s.file}: ${s.kind} via ${s.profile}: read ${s.read}, inserted ${s.inserted}, updated ${s.updated}, unchanged ${s.unchanged}, rejected ${s.rejected}${note}`;
}

/** The header's report in sentences: columns ignored (and why), optional columns absent (stored values kept). */
export function headerLines(h: BatchSummary["header"]): string[] {
  const out = h.ignored.map((c) => `column ${c.position} "${c.column}" is ignored: ${c.reason}`);
  if (h.encoding) out.push(h.encoding);
  if (h.absent.length) out.push(`not in this file: ${h.absent.map((c) => c.replace(/_/g, " ")).join(", ")}; values already stored for them are left as they are`);
  return out;
}

async function load(files: string[], o: { kind?: ExportKind; profile?: string; shop?: string; json?: boolean }): Promise<number> {
  const pool = new pg.Pool(etlPoolConfig(defaultUrl(), 2));
  const tty = !o.json && process.stderr.isTTY;
  const loadedBy = `cli:${os.userInfo().username}`;
  let changed = false;
  try {
    for (const file of files) {
      const bar = tty ? new cliProgress.SingleBar({ format: `${file} [{bar}] {percentage}% | {rows} rows | {rate} rows/s | {phase}`, stream: process.stderr }, cliProgress.Presets.shades_classic) : null;
      const t0 = Date.now();
      let lastJson = 0;
      const onProgress = (p: LoadProgress) => {
        const rate = Math.round(p.rowsRead / Math.max((Date.now() - t0) / 1000, 0.001));
        if (bar) {
          if (p.phase === "reading" && !bar.isActive) bar.start(p.totalBytes, 0, { rows: 0, rate: 0, phase: "reading" });
          bar.update(p.phase === "reading" ? p.bytesRead : p.totalBytes, { rows: p.rowsRead, rate, phase: p.phase });
        } else if (o.json && (p.phase !== "reading" || Date.now() - lastJson > 1000)) {
          lastJson = Date.now();
          process.stdout.write(JSON.stringify({ event: "progress", file, ...p, rowsPerSecond: rate }) + "\n");
        }
      };
      try {
        // what the header means is said before the load starts, so a column read wrongly can be stopped (Ctrl-C loads nothing)
        const onHeader = (h: BatchSummary["header"], p: { id: string }) => {
          if (o.json) process.stdout.write(JSON.stringify({ event: "header", file, profile: p.id, ...h }) + "\n");
          else for (const line of headerLines(h)) process.stderr.write(`${file}: ${line}\n`);
        };
        const s = await loadFile(pool, { path: file, kind: o.kind, profile: o.profile, shop: o.shop, loadedBy, onProgress, onHeader });
        bar?.stop();
        if (s.inserted + s.updated > 0) changed = true;
        if (o.json) {
          const { file: _f, kind, profile, read, inserted, updated, unchanged, rejected, ...rest } = s;
          process.stdout.write(JSON.stringify({ event: "summary", file, kind, profile, read, inserted, updated, unchanged, rejected, ...rest }) + "\n");
        } else {
          process.stdout.write(summaryLine(s) + "\n");
          for (const m of s.mergedLines) {
            process.stdout.write(`${s.file}: lines ${m.first}–${m.last} ran together behind a quote left open; each was read on its own (see the rejects)\n`);
          }
        }
      } catch (e) {
        bar?.stop();
        const message = e instanceof EtlFatalError ? e.message : `load failed, nothing of this file was kept: ${(e as Error).message}`;
        if (o.json) process.stdout.write(JSON.stringify({ event: "error", file, message }) + "\n");
        process.stderr.write(`${file}: ${message}\n`);
        return 1;
      }
    }
    return 0;
  } finally {
    // The analytics read exposure from a derived table: fold in what the files changed, once after them.
    // Kysely<any>: the ETL writes raw SQL and does not import the server's schema types.
    const db = new Kysely<any>({ dialect: new PostgresDialect({ pool }) });
    if (changed) {
      const r = await refreshExposure(db);
      if (o.json) {
        process.stdout.write(JSON.stringify({ event: "exposure_rebuilt", mode: r.mode, machines: r.machines, rows: r.rows, seconds: r.seconds }) + "\n");
      } else {
        process.stderr.write(`Exposure ${r.mode === "full" ? "rebuilt" : `brought up to date (${r.machines} machines)`}: ${r.rows} rows in ${r.seconds.toFixed(1)} s\n`);
      }
    }
    await db.destroy();
  }
}

const program = new Command("etl").description("Load shop exports into the Ironledger warehouse");
program
  .command("load")
  .argument("<file...>", "CSV exports, loaded in the order given (machines before jobs before measurements)")
  .option("--kind <kind>", "export kind: machines, jobs, measurements, weather or hours", parseKind)
  .option("--profile <id>", "mapping profile (etl/profiles/<id>.json); detected from the header when omitted")
  .option("--shop <code>", "shop code for exports that have no shop column")
  .option("--json", "print one JSON object per line instead of a progress bar")
  .action(async (files: string[], o) => {
    process.exitCode = await load(files, o);
  });

/** Registers the shops of a register file; nothing is written when any row is wrong. */
async function registerShops(file: string, o: { json?: boolean }): Promise<number> {
  let read;
  try {
    read = await readShopRegister(file);
  } catch (e) {
    process.stderr.write(`${file}: ${(e as Error).message}\n`);
    return 1;
  }
  if (read.errors.length) {
    if (o.json) process.stdout.write(JSON.stringify({ event: "error", file, errors: read.errors }) + "\n");
    process.stderr.write(`${file}: nothing was registered; fix these and run it again:\n${read.errors.map((e) => `  ${e}`).join("\n")}\n`);
    return 1;
  }
  const pool = new pg.Pool({ connectionString: defaultUrl(), max: 1 });
  try {
    await upsertShops(pool, read.shops);
  } catch (e) {
    process.stderr.write(`${file}: nothing was registered: ${(e as Error).message}\n`);
    return 1;
  } finally {
    await pool.end();
  }
  if (o.json) process.stdout.write(JSON.stringify({ event: "shops_registered", file, shops: read.shops.map((s) => s.code) }) + "\n");
  else process.stdout.write(`${file}: ${read.shops.length} shop${read.shops.length === 1 ? "" : "s"} registered (${read.shops.map((s) => s.code).join(", ")})\n`);
  return 0;
}

async function listRegisteredShops(o: { json?: boolean }): Promise<number> {
  const pool = new pg.Pool({ connectionString: defaultUrl(), max: 1 });
  try {
    const r = await pool.query<Record<string, string | number | null>>(
      `SELECT shop_code AS code, name, region, town, lat, lon, climate_zone, time_zone, weather_station, export_profile FROM dim_shop ORDER BY shop_code`,
    );
    if (o.json) for (const row of r.rows) process.stdout.write(JSON.stringify(row) + "\n");
    else for (const row of r.rows) process.stdout.write(`${row.code}\t${row.name}\t${row.climate_zone ?? "(no climate zone)"}\t${row.time_zone ?? "(no time zone)"}\n`);
    return 0;
  } catch (e) {
    process.stderr.write(`cannot list the shops: ${(e as Error).message}\n`);
    return 1;
  } finally {
    await pool.end();
  }
}

const shops = program.command("shops").description("The shop register: names, places, climate zones and time zones of the shops");
shops
  .command("register")
  .argument("<file>", "register CSV (columns in docs/exports.md, \"shops\"); registers new shops and updates known ones")
  .option("--json", "print JSON objects instead of text")
  .action(async (file: string, o) => {
    process.exitCode = await registerShops(file, o);
  });
shops
  .command("list")
  .option("--json", "one JSON object per shop")
  .action(async (o) => {
    process.exitCode = await listRegisteredShops(o);
  });

await program.parseAsync(process.argv);
