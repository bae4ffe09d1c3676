import { Router } from "express";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import { changeUserAccess, findUser, listUserEvents, listUsers, registeredShops, type UserRow } from "../db/queries/users.js";
import { userAccessSchema, type AdminUser, type AdminUserList, type UserHistory } from "../../shared/schemas/admin.js";
import type { Role } from "../../shared/roles.js";
import type { AccessCache } from "../auth/effective-user.js";
import { accessSetSentence, deactivatedSentence, providerAgainSentence, reactivatedSentence, sameAccess, type Access } from "../auth/access-sentences.js";

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const providerOf = (r: UserRow): Access => ({ roles: r.roles as Role[], shops: r.shops });
const inForce = (r: UserRow): Access => (r.access_roles && r.access_shops ? { roles: r.access_roles as Role[], shops: r.access_shops } : providerOf(r));

function toAdminUser(r: UserRow): AdminUser {
  const now = inForce(r);
  return {
    sub: r.sub,
    name: r.name,
    email: r.email,
    roles: [...now.roles],
    shops: [...now.shops],
    source: r.access_roles ? "ironledger" : "provider",
    provider: { roles: r.roles as Role[], shops: r.shops },
    accessSetAt: iso(r.access_set_at),
    accessSetBy: r.access_set_by,
    deactivatedAt: iso(r.deactivated_at),
    deactivatedBy: r.deactivated_by,
    firstSeen: r.first_seen.toISOString(),
    lastSeen: r.last_seen.toISOString(),
  };
}

/**
 * /api/admin/users: everyone who has signed in, the access in force for each (stored in Ironledger, else the
 * provider's claims), and the administrator's changes to it. Admin only. A change reaches the user's next
 * request: the access cache forgets them here, and sessions read it on every request (effective-user.ts).
 */
export function adminUserRoutes(db: Db, cache: AccessCache): Router {
  const router = Router();

  const load = async (sub: string) => {
    const row = await findUser(db, sub);
    if (!row) throw new HttpError(404, "user_not_found", "No one with that identity has signed in to Ironledger.");
    return row;
  };
  const answer = async (sub: string) => toAdminUser((await findUser(db, sub))!);

  router.get("/", allow("admin"), async (_req, res) => {
    const [rows, shops] = await Promise.all([listUsers(db), registeredShops(db)]);
    const body: AdminUserList = { users: rows.map(toAdminUser), shops };
    res.json(body);
  });

  router.get("/:sub/history", allow("admin"), async (req, res) => {
    await load(String(req.params.sub));
    const events = await listUserEvents(db, String(req.params.sub));
    const body: UserHistory = { events: events.map((e) => ({ at: e.at.toISOString(), kind: e.kind, actorName: e.actor_name, sentence: e.sentence })) };
    res.json(body);
  });

  router.put("/:sub/access", allow("admin"), async (req, res) => {
    const me = requireUser(req);
    const access = userAccessSchema.parse(req.body);
    const row = await load(String(req.params.sub));
    if (row.sub === me.sub && !access.roles.includes("admin"))
      throw new HttpError(409, "own_admin_role", "You cannot remove your own administrator role. Another administrator can do it.");
    const known = new Set((await registeredShops(db)).map((s) => s.code));
    const unknown = access.shops.filter((s) => !known.has(s));
    if (unknown.length)
      throw new HttpError(400, "unknown_shop", `${unknown.join(", ")} ${unknown.length === 1 ? "is not a registered shop" : "are not registered shops"}. Choose from the shop register.`);
    const before = inForce(row);
    if (row.access_roles && sameAccess(before, access)) return res.json(toAdminUser(row));
    await changeUserAccess(db, row.sub, { kind: "access", roles: access.roles, shops: access.shops }, me, () =>
      accessSetSentence(me.name, row.name, before, access, !row.access_roles),
    );
    cache.forget(row.sub);
    res.json(await answer(row.sub));
  });

  router.delete("/:sub/access", allow("admin"), async (req, res) => {
    const me = requireUser(req);
    const row = await load(String(req.params.sub));
    if (!row.access_roles) return res.json(toAdminUser(row));
    const provider = providerOf(row);
    if (row.sub === me.sub && !provider.roles.includes("admin"))
      throw new HttpError(409, "own_admin_role", "The identity provider does not give you the administrator role, so returning to its roles would remove your own. Another administrator can do it.");
    await changeUserAccess(db, row.sub, { kind: "provider" }, me, () => providerAgainSentence(me.name, row.name, inForce(row), provider));
    cache.forget(row.sub);
    res.json(await answer(row.sub));
  });

  router.post("/:sub/deactivate", allow("admin"), async (req, res) => {
    const me = requireUser(req);
    const row = await load(String(req.params.sub));
    if (row.sub === me.sub) throw new HttpError(409, "own_account", "You cannot deactivate your own account. Another administrator can do it.");
    if (row.deactivated_at) return res.json(toAdminUser(row));
    await changeUserAccess(db, row.sub, { kind: "deactivated" }, me, (n) => deactivatedSentence(me.name, row.name, n));
    cache.forget(row.sub);
    res.json(await answer(row.sub));
  });

  router.post("/:sub/reactivate", allow("admin"), async (req, res) => {
    const me = requireUser(req);
    const row = await load(String(req.params.sub));
    if (!row.deactivated_at) return res.json(toAdminUser(row));
    await changeUserAccess(db, row.sub, { kind: "reactivated" }, me, () => reactivatedSentence(me.name, row.name));
    cache.forget(row.sub);
    res.json(await answer(row.sub));
  });

  return router;
}
