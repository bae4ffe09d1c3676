/**
 * An upload's check or load on a worker thread (see worker-pool.ts): reading and converting a file of a
 * million lines is seconds of JavaScript that must not hold up the requests the server answers meanwhile.
 * The worker opens its own small pool; progress and cancellation travel through the upload's row.
 */
import { createDb } from "../../db/database.js";
import { runCheck, runLoad } from "./import-jobs.js";

export interface EtlTask {
  job: "check" | "load";
  uploadId: string;
  databaseUrl: string;
  spoolDir: string;
}

export default async function run(task: EtlTask): Promise<void> {
  // a load takes two connections (its transaction and the staging COPY), progress one more
  const { db, pool } = createDb(task.databaseUrl, 4);
  try {
    const deps = { db, pool, spoolDir: task.spoolDir };
    await (task.job === "check" ? runCheck(deps, task.uploadId) : runLoad(deps, task.uploadId));
  } finally {
    await db.destroy();
  }
}

/** Does nothing: run by worker-pool.ts's keepWarm, so the thread is up (module graph loaded) before an upload's job. */
export function ping(): true {
  return true;
}
