// Runs one upload's LOAD job in a process of its own, as a server's job worker would, so a test can stop
// that process outright (SIGKILL) part-way through: node --import tsx tests/helpers/run-import-load.ts <database url> <upload id> <spool dir>
import { createDb } from "../../server/db/database.js";
import { runLoad } from "../../server/services/imports/import-jobs.js";

const [url, uploadId, spoolDir] = process.argv.slice(2);
const { db, pool } = createDb(url, 4);
await runLoad({ db, pool, spoolDir }, uploadId);
await db.destroy();
