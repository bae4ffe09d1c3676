import { Router, type Request } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import {
  costRatesSchema,
  rateCompareQuerySchema,
  type ComponentRates,
  type CostRates,
  type RateComparisonAnswer,
  type HourBandRates,
  type MonthlyRates,
  type Rate,
  type TemperatureBandRates,
} from "../../shared/schemas/analytics-rates.js";
import { countsByComponent, countsByHourBand, countsByMonth, countsByTemperatureBand, countsForTwoGroups } from "../db/queries/analytics-rates.js";
import { costsByShopAndComponent } from "../db/queries/analytics-costs.js";
import { compareRates } from "../analytics/rate-ratio.js";
import { costTable } from "../analytics/cost-rates.js";
import { rateComparisonSentence } from "../analytics/comparison-words.js";
import { poissonRate, type RateEstimate } from "../analytics/poisson.js";
import { uChart } from "../analytics/control-chart.js";
import { hourBands, temperatureBands } from "../../shared/bands.js";
import { components } from "../../shared/catalog.js";
import { analyticsRoles } from "../../shared/roles.js";
import { AnswerCache } from "../services/answer-cache.js";

const rate = (r: RateEstimate | null): Rate | null =>
  r ? { rate: r.rate, lower: r.lower, upper: r.upper, per: r.per, level: r.level } : null;

/** Band rows in the bands' own order, with empty bands kept so charts show gaps honestly. */
function inBandOrder<T extends { band: string }>(ids: readonly string[], rows: T[], empty: (band: string) => T): T[] {
  const by = new Map(rows.map((r) => [r.band, r]));
  return [...ids.map((id) => by.get(id) ?? empty(id)), ...rows.filter((r) => !ids.includes(r.band))];
}

export function analyticsRateRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...analyticsRoles));
  // Each answer reads every failure line the filters select: keep it per request until the next load.
  const answers = new AnswerCache(db, 200);

  router.get("/hour-bands", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => hourBandRates(req));
  });
  const hourBandRates = async (req: Request): Promise<HourBandRates> => {
    const f = analyticsFiltersSchema.parse(req.query);
    const rows = inBandOrder(hourBands.map((b) => b.id), await countsByHourBand(db, requireScope(req), f), (band) => ({ band, failures: 0, machineDays: 0, engineHours: 0 }));
    return {
      method: "Failures (first visit for a fault; comebacks excluded) per 1,000 engine hours of exposure in the band; exact Poisson (Garwood) 95 % limits.",
      rows: rows.map((r) => ({ band: r.band, failures: r.failures, engineHours: r.engineHours, perThousandHours: rate(poissonRate(r.failures, r.engineHours)) })),
    };
  };

  router.get("/temperature-bands", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => temperatureBandRates(req));
  });
  const temperatureBandRates = async (req: Request): Promise<TemperatureBandRates> => {
    const f = analyticsFiltersSchema.parse(req.query);
    const rows = inBandOrder(temperatureBands.map((b) => b.id), await countsByTemperatureBand(db, requireScope(req), f), (band) => ({ band, failures: 0, machineDays: 0, engineHours: 0 }));
    return {
      method: "Failures counted on the day the repair order opened, by the home shop's daily minimum temperature; exposure is machine-days in service at that shop (and their estimated engine hours); exact Poisson 95 % limits.",
      caution: "The first cold snap of a season flushes out failures that had built up, so the coldest band can sit below the next one.",
      rows: rows.map((r) => ({
        band: r.band,
        failures: r.failures,
        machineDays: r.machineDays,
        engineHours: r.engineHours,
        perThousandMachineDays: rate(poissonRate(r.failures, r.machineDays)),
        perThousandHours: rate(poissonRate(r.failures, r.engineHours)),
      })),
    };
  };

  router.get("/components", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => componentRates(req));
  });
  const componentRates = async (req: Request): Promise<ComponentRates> => {
    const f = analyticsFiltersSchema.parse(req.query);
    const { engineHours, rows } = await countsByComponent(db, requireScope(req), f);
    const total = rows.reduce((s, r) => s + r.failures, 0);
    let cum = 0;
    return {
      engineHours,
      rows: rows.map((r) => {
        cum += r.failures;
        const def = components.find((c) => c.code === r.component);
        return {
          component: r.component,
          name: def?.name ?? r.component,
          system: def?.system ?? "",
          failures: r.failures,
          share: total ? r.failures / total : 0,
          cumulativeShare: total ? cum / total : 0,
          perThousandHours: rate(poissonRate(r.failures, engineHours)),
        };
      }),
    };
  };

  router.get("/monthly", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => monthlyRates(req));
  });
  const monthlyRates = async (req: Request): Promise<MonthlyRates> => {
    const f = analyticsFiltersSchema.parse(req.query);
    const rows = (await countsByMonth(db, requireScope(req), f)).filter((r) => r.engineHours > 0);
    const chart = uChart(rows.map((r) => ({ failures: r.failures, exposure: r.engineHours })));
    return {
      method: "u-chart: centre = all failures ÷ all engine hours; limits = centre ± 3·√(centre ÷ month's hours) (NIST/SEMATECH e-Handbook 6.3.3.2).",
      centre: chart.centre,
      rows: rows.map((r, i) => ({
        month: r.band.slice(0, 7),
        failures: r.failures,
        engineHours: r.engineHours,
        perThousandHours: rate(poissonRate(r.failures, r.engineHours)),
        controlLower: chart.points[i].lower,
        controlUpper: chart.points[i].upper,
        outOfControl: chart.points[i].outOfControl,
      })),
    };
  };
  router.get("/compare", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => comparison(req));
  });
  const comparison = async (req: Request): Promise<RateComparisonAnswer> => {
    const q = rateCompareQuerySchema.parse(req.query);
    const f = analyticsFiltersSchema.parse(req.query);
    const filters = q.component ? { ...f, components: [q.component] } : f;
    const counts = await countsForTwoGroups(db, requireScope(req), filters, q.compareBy, q.a, q.b || undefined);
    const noun = { lot: "lot", engineFamily: "engine family", shop: "shop" }[q.compareBy];
    const plural = { lot: "lots", engineFamily: "engine families", shop: "shops" }[q.compareBy];
    const labelA = `${noun} ${q.a}`;
    const labelB = q.b ? `${noun} ${q.b}` : `all other ${plural}`;
    const c = compareRates(counts.a.failures, counts.a.engineHours, counts.b.failures, counts.b.engineHours);
    const group = (label: string, g: { failures: number; engineHours: number }) => ({ label, ...g, perThousandHours: rate(poissonRate(g.failures, g.engineHours)) });
    return {
      compareBy: q.compareBy,
      component: q.component ?? null,
      a: group(labelA, counts.a),
      b: group(labelB, counts.b),
      comparison: c && { ratio: c.ratio, lower: c.lower, upper: c.upper, level: c.level, pValue: c.pValue, expectedA: c.expectedA },
      sentence: rateComparisonSentence(labelA, labelB, c),
      method: "Failures (first visit for a fault; comebacks excluded) per 1,000 engine hours in each group (a lot is the heater-plug lot fitted at the time, a shop the machine's home shop on the day); rate ratio A ÷ B with the exact conditional test (given the total, A's count is binomial with p = hours A ÷ all hours under equal rates): two-sided p-value and Clopper–Pearson 95 % interval as R's poisson.test gives them.",
    };
  };

  router.get("/costs", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => costRates(req));
  });
  const costRates = async (req: Request): Promise<CostRates> => {
    const f = analyticsFiltersSchema.parse(req.query);
    const { rows, hoursByShop } = await costsByShopAndComponent(db, requireScope(req), f);
    const t = costTable(rows, hoursByShop);
    const name = (code: string) => components.find((c) => c.code === code)?.name ?? code;
    return costRatesSchema.parse({
      currency: "the exports' currency",
      method: "Parts + labour cost of every failure line (comeback visits included), by the machine's home shop on the day the order opened, per 1,000 engine hours of that shop's fleet; a component's cost over all shops per 1,000 engine hours of the whole fleet. Missing costs count as 0; the lot, temperature-band and hour-band filters do not apply to costs.",
      shops: t.shops,
      components: t.components.map((c) => ({ ...c, name: name(c.component) })),
      rows: t.rows.map((r) => ({ ...r, name: name(r.component) })),
      engineHours: t.engineHours,
      cost: t.cost,
      perThousandHours: t.perThousandHours,
    });
  };
  return router;
}
