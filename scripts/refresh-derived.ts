/**
 * node --import tsx scripts/refresh-derived.ts [--incremental]
 * Rebuilds the exposure aggregates from scratch (after a migration, or to check them); with --incremental,
 * folds in only what the batches since the last refresh changed, as the ETL does after a load.
 */
import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { refreshExposure } from "../etl/index.js";

const { db } = createDb(loadConfig().databaseUrl);
try {
  const r = await refreshExposure(db, { full: !process.argv.includes("--incremental") });
  console.log(`exposure aggregate (${r.mode}, ${r.machines} machines): ${r.rows} rows in ${r.seconds.toFixed(1)} s`);
} finally {
  await db.destroy();
}
