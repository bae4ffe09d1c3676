import path from "node:path";
import { Command } from "commander";
import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { loadDemo, warehouseIsEmpty } from "../server/demo/load-demo.js";

const opts = new Command()
  .option("--seed <n>", "generator seed", "1")
  .option("--scale <s>", "fleet scale (1 = the scenario's 4,000 machines)", "1")
  .option("--force", "load even when the warehouse already holds machines")
  .parse()
  .opts<{ seed: string; scale: string; force?: boolean }>();

const config = loadConfig();
const { db, pool } = createDb(config.databaseUrl);
try {
  await migrateToLatest(db);
  if (!opts.force && !(await warehouseIsEmpty(db))) {
    console.log("The warehouse already holds machines; nothing loaded (use --force to load anyway).");
  } else {
    const s = await loadDemo(db, pool, {
      dir: path.join(config.dataDir, `demo-s${opts.seed}-x${opts.scale}`),
      seed: Number(opts.seed),
      scale: Number(opts.scale),
      log: (l) => console.log(l),
    });
    console.log(`Demo loaded: ${s.files} files, ${s.read} rows read, ${s.inserted} inserted, ${s.rejected} rejected, in ${s.seconds.toFixed(1)} s (exposure ${s.exposureSeconds.toFixed(1)} s).`);
  }
} finally {
  await db.destroy();
}
