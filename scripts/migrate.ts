import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";

const { db } = createDb(loadConfig().databaseUrl);
try {
  const r = await migrateToLatest(db);
  for (const m of r.results ?? []) console.log(`${m.status}: ${m.migrationName}`);
  if (!r.results?.length) console.log("Already up to date.");
} finally {
  await db.destroy();
}
