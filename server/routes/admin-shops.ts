import { Router, type Request } from "express";
import type { z } from "zod";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { getAdminShop, insertShop, listAdminShops, updateShop } from "../db/queries/admin-shops.js";
import { HttpError, notFound } from "../errors.js";
import type pg from "pg";
import { currentProfiles } from "../../etl/index.js";
import { shopCodeSchema, shopEditSchema, shopEntrySchema, type AdminShopList } from "../../shared/schemas/shops-admin.js";

/** The request body checked by the register's rules; refused in words (400 validation_failed), every problem named. */
function parseShop<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const body: unknown = req.body;
  if (typeof body !== "object" || body === null || Array.isArray(body)) {
    throw new HttpError(400, "validation_failed", "The shop was not saved: send its fields as a JSON object (code, name, region, town, lat, lon, climateZone, timeZone, weatherStation, exportProfile).");
  }
  const r = schema.safeParse(body);
  if (!r.success) throw new HttpError(400, "validation_failed", `The shop was not saved: ${r.error.issues.map((i) => i.message).join("; ")}.`, r.error.issues);
  return r.data;
}

/**
 * The shop register for administrators, as `npm run etl -- shops register` keeps it (the same rules):
 * GET /api/admin/shops lists every shop with its machines and repair lines counted and the export profiles a
 * shop may name; POST adds a shop (409 when the code is taken); PUT /:code rewrites a shop's fields, never its code.
 */
export function adminShopRoutes(db: Db, pool: pg.Pool): Router {
  const router = Router();
  // a shop's default profile names one of the profiles stored in the warehouse (admins add and edit them)
  const stored = async () => (await currentProfiles(pool)).map((v) => v.profile);

  router.get("/", allow("admin"), async (req, res) => {
    const body: AdminShopList = {
      shops: await listAdminShops(db, requireScope(req)),
      profiles: (await stored()).map((p) => ({ id: p.id, kind: p.kind })),
    };
    res.json(body);
  });

  router.post("/", allow("admin"), async (req, res) => {
    const ids = (await stored()).map((p) => p.id);
    const shop = parseShop(shopEntrySchema(() => ids), req);
    if (!(await insertShop(db, shop))) {
      throw new HttpError(409, "shop_exists", `A shop with the code ${shop.code} is registered already (a load may have added it bare). Edit that shop instead: one code names one shop.`);
    }
    res.status(201).json(await getAdminShop(db, requireScope(req), shop.code));
  });

  router.put("/:code", allow("admin"), async (req, res) => {
    const codeParam = String(req.params.code);
    const code = shopCodeSchema.safeParse(codeParam);
    if (!code.success) throw notFound(`A shop with the code "${codeParam.slice(0, 40)}"`);
    const ids = (await stored()).map((p) => p.id);
    const shop = parseShop(shopEditSchema(() => ids), req);
    const sent = (req.body as { code?: unknown }).code;
    if (sent !== undefined && sent !== null && String(sent).trim().toUpperCase() !== code.data) {
      throw new HttpError(400, "validation_failed", `The shop was not saved: its code (${code.data}) cannot change, because every export names the shop by it. Register a new shop for a new code.`);
    }
    if (!(await updateShop(db, code.data, shop))) throw notFound(`A shop with the code ${code.data}`);
    res.json(await getAdminShop(db, requireScope(req), code.data));
  });

  return router;
}
