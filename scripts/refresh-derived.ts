import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { refreshExposure } from "../etl/index.js";

const { db } = createDb(loadConfig().databaseUrl);
try {
  const r = await refreshExposure(db);
  console.log(`exposure aggregate: ${r.rows} rows in ${r.seconds.toFixed(1)} s`);
} finally {
  await db.destroy();
}
