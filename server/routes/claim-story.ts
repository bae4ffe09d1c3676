import { Router, type Request } from "express";
import { requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { Storage } from "../services/storage.js";
import type { Mailer } from "../services/mailer.js";
import { claimDetail } from "../services/warranty/claims-service.js";
import { narrativeSchema, noteBodySchema } from "../../shared/schemas/claim-story.js";
import { claimStory, postNote, removeAttachment, updateNarrative } from "../services/warranty/claim-story.js";

/**
 * A claim's story, mounted inside the claims router (behind its roles and shop scope): the narrative the maker
 * reads, notes between the clerk and the shop, and removing an attachment before the claim is sent.
 */
export function claimStoryRoutes(d: { db: Db; storage?: Storage; mailer?: Mailer }): Router {
  const router = Router();
  const { db } = d;
  const actor = (req: Request) => {
    const u = requireUser(req);
    return { sub: u.sub, name: u.name, role: u.roles.includes("clerk") ? "clerk" : u.roles.includes("manager") ? "shop" : (u.roles[0] ?? "user") };
  };
  const id = (req: Request) => String(req.params.id);

  router.get("/:id/story", async (req, res) => {
    res.json(await claimStory(db, requireScope(req), id(req)));
  });

  router.put("/:id/narrative", async (req, res) => {
    const body = narrativeSchema.parse(req.body);
    await updateNarrative(db, requireScope(req), id(req), body, actor(req));
    res.json(await claimStory(db, requireScope(req), id(req)));
  });

  router.post("/:id/notes", async (req, res) => {
    const body = noteBodySchema.parse(req.body);
    await postNote(db, requireScope(req), id(req), body.text, actor(req));
    res.status(201).json(await claimStory(db, requireScope(req), id(req)));
  });

  // answers the claim as it now stands, like the claim's other changes
  router.delete("/:id/attachments/:attachmentId", async (req, res) => {
    await removeAttachment(d, requireScope(req), id(req), String(req.params.attachmentId), actor(req));
    res.json(await claimDetail({ db, storage: d.storage, canSend: Boolean(d.mailer) }, requireScope(req), id(req)));
  });

  return router;
}
