import { Router } from "express";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { changeSetting, listSettingEvents, readSettings } from "../db/queries/settings.js";
import { settingsEditSchema, type AdminSettings } from "../../shared/schemas/settings.js";

/**
 * The group's settings for administrators: GET /api/admin/settings gives them with the history of changes;
 * PUT sets them (the currency as an ISO 4217 code), each change kept as a sentence with who made it.
 */
export function adminSettingsRoutes(db: Db): Router {
  const router = Router();
  router.use(allow("admin"));

  const answer = async (): Promise<AdminSettings> => ({
    settings: await readSettings(db),
    history: (await listSettingEvents(db, "currency")).map((e) => ({ at: e.at.toISOString(), actorName: e.actor_name, sentence: e.sentence })),
  });

  router.get("/", async (_req, res) => {
    res.json(await answer());
  });

  router.put("/", async (req, res) => {
    const me = requireUser(req);
    const edit = settingsEditSchema.parse(req.body);
    await changeSetting(db, "currency", edit.currency, me, (old) =>
      old === null ? `${me.name} set the group's currency to ${edit.currency}.` : `${me.name} changed the group's currency from ${old} to ${edit.currency}.`,
    );
    res.json(await answer());
  });
  return router;
}
