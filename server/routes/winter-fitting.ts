import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { winterReadinessRoles, type FittingList } from "../../shared/schemas/fitting-list.js";
import { loadFittingList } from "../services/winter/fitting-list-service.js";
import { fittingListCsv } from "../services/winter/fitting-list-csv.js";
import { renderFittingListPdf } from "../services/winter/fitting-list-pdf.js";

/** The PDF's number and date locale: the reader's first language when the runtime knows it, else en-US. */
function pdfLocale(accepted: string | false): string {
  if (!accepted || accepted === "*") return "en-US";
  try {
    return Intl.NumberFormat.supportedLocalesOf([accepted])[0] ?? "en-US";
  } catch {
    return "en-US";
  }
}

/**
 * /api/winter/fitting: machines at cold shops without a block heater, in fitting order, for the caller's shops.
 * GET / (JSON), GET /list.csv and GET /list.pdf (the printable list with the block-heater cautions).
 */
export function winterFittingRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...winterReadinessRoles));
  router.get("/", async (req, res) => {
    const body: FittingList = await loadFittingList(db, requireScope(req));
    res.json(body);
  });
  router.get("/list.csv", async (req, res) => {
    const list = await loadFittingList(db, requireScope(req));
    res.attachment(`block-heater-fitting-${list.asOf}.csv`).type("text/csv; charset=utf-8").send(fittingListCsv(list.rows));
  });
  router.get("/list.pdf", async (req, res) => {
    const list = await loadFittingList(db, requireScope(req));
    const pdf = await renderFittingListPdf(list, pdfLocale(req.acceptsLanguages()[0] ?? false));
    res.attachment(`block-heater-fitting-${list.asOf}.pdf`).type("application/pdf").send(pdf);
  });
  return router;
}
