import { Router } from "express";
import { sql } from "kysely";
import type { Db } from "../db/database.js";
import type { Storage } from "../services/storage.js";
import type { Mailer } from "../services/mailer.js";

export type DependencyState = "ok" | "unavailable" | "not_configured";

/** How long one probe may take before its dependency counts as unavailable. */
const PROBE_TIMEOUT_MS = 3000;

async function probe(check: () => Promise<boolean>): Promise<DependencyState> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<boolean>((resolve) => {
    timer = setTimeout(() => resolve(false), PROBE_TIMEOUT_MS);
  });
  try {
    return (await Promise.race([check().catch(() => false), late])) ? "ok" : "unavailable";
  } finally {
    clearTimeout(timer);
  }
}

/**
 * GET /api/health: each dependency as "ok" or "unavailable" ("not_configured" for storage or mail on a server
 * that has none), 200 when every configured one answers, 503 otherwise. No sign-in needed; mounted before the
 * session middleware so it answers while the session store (the database) does not. States only: no host
 * names, addresses or error text.
 */
export function healthRoutes(d: { db: Db; storage?: Storage; mailer?: Mailer }): Router {
  const router = Router();
  router.get("/", async (_req, res) => {
    const [database, storage, mail] = await Promise.all([
      probe(async () => {
        await sql`select 1`.execute(d.db);
        return true;
      }),
      d.storage ? probe(d.storage.available) : ("not_configured" as const),
      d.mailer ? probe(d.mailer.available) : ("not_configured" as const),
    ]);
    const ok = [database, storage, mail].every((s) => s !== "unavailable");
    res.status(ok ? 200 : 503).json({ status: ok ? "ok" : "unavailable", database, storage, mail });
  });
  return router;
}
