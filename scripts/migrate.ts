import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { rebuildExposureIfCleared } from "../etl/index.js";

const { db } = createDb(loadConfig().databaseUrl);
try {
  const r = await migrateToLatest(db);
  for (const m of r.results ?? []) console.log(`${m.status}: ${m.migrationName}`);
  if (!r.results?.length) console.log("Already up to date.");
  const rebuilt = await rebuildExposureIfCleared(db);
  if (rebuilt) console.log(`exposure aggregate rebuilt after the migration: ${rebuilt.rows} rows in ${rebuilt.seconds.toFixed(1)} s`);
} finally {
  await db.destroy();
}
