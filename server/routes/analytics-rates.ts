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
import { countsByComponent, countsByHourBand, countsByMonthCell, countsByTemperatureBand, countsForTwoGroups } from "../db/queries/analytics-rates.js";
import { shopMonthCoverage } from "../db/queries/month-coverage.js";
import { COMPLETE_COVERAGE, incompleteMonthsWords, monthCompleteness } from "../analytics/month-completeness.js";
import { expectedByMonth } from "../analytics/expected-by-month.js";
import { costsByShopAndComponent } from "../db/queries/analytics-costs.js";
import { compareRates } from "../analytics/rate-ratio.js";
import { costTable } from "../analytics/cost-rates.js";
import { rateComparisonSentence } from "../analytics/comparison-words.js";
import { poissonRate, type RateEstimate } from "../analytics/poisson.js";
import { flaggedMonthWords, standardisedChart, uChart } from "../analytics/control-chart.js";
import { hourBands, temperatureBandLabel, temperatureBandsIn } from "../../shared/bands.js";
import { components } from "../../shared/catalog.js";
import { rateRoles } from "../../shared/roles.js";
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
  router.use(allow(...rateRoles));
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
    // the bands of the requested unit, coldest first ("unknown", days without weather, last)
    const rows = inBandOrder(temperatureBandsIn(f.unit).map((b) => b.id), await countsByTemperatureBand(db, requireScope(req), f), (band) => ({ band, failures: 0, machineDays: 0, engineHours: 0 }));
    return {
      unit: f.unit,
      method: "Failures counted on the day the repair order opened, by the home shop's daily minimum temperature; exposure is machine-days in service at that shop (and their estimated engine hours); exact Poisson 95 % limits.",
      caution: "The first cold snap of a season flushes out failures that had built up, so the coldest band can sit below the next one.",
      rows: rows.map((r) => ({
        band: r.band,
        label: r.band === "unknown" ? "no weather" : temperatureBandLabel(r.band, f.unit),
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
    const scope = requireScope(req);
    const [cells, coverageRows] = await Promise.all([countsByMonthCell(db, scope, f), shopMonthCoverage(db, scope, f.shops)]);
    const completeness = new Map(monthCompleteness(coverageRows).map((m) => [m.month, m]));
    const isComplete = (month: string) => completeness.get(month)?.complete ?? false;
    const months = expectedByMonth(cells, isComplete).filter((m) => m.engineHours > 0);
    const complete = months.filter((m) => isComplete(m.month));
    const standardised = standardisedChart(months.map((m) => ({ observed: m.failures, expected: m.expected })));
    // the plain u-chart's centre and limits come from the complete months only, as do its alarms
    const plain = uChart(complete.map((m) => ({ failures: m.failures, exposure: m.engineHours })));
    const plainOf = new Map(complete.map((m, i) => [m.month, plain.points[i]]));
    const shown = months.filter((m) => completeness.has(m.month));
    const left = shown.filter((m) => !isComplete(m.month)).map((m) => completeness.get(m.month)!);
    const flagged: MonthlyRates["flagged"] = [];
    const rows = months.map((m, i) => {
      const ok = isComplete(m.month);
      const s = standardised[i];
      const p = plainOf.get(m.month);
      const words = ok ? flaggedMonthWords(m.month, s) : null;
      if (words) flagged.push({ month: m.month, direction: s.outOfControl!, words });
      return {
        month: m.month,
        failures: m.failures,
        engineHours: m.engineHours,
        perThousandHours: rate(poissonRate(m.failures, m.engineHours)),
        coverage: completeness.get(m.month)?.coverage ?? null,
        complete: ok,
        expected: m.expected,
        ratio: s.ratio,
        ratioLower: ok ? s.lower : null,
        ratioUpper: ok ? s.upper : null,
        controlLower: p?.lower ?? null,
        controlUpper: p?.upper ?? null,
        outOfControl: ok && s.outOfControl !== null,
        outOfControlPlain: p?.outOfControl ?? false,
      };
    });
    return {
      centre: plain.centre,
      reference: complete.length ? { from: complete[0].month, to: complete[complete.length - 1].month, months: complete.length } : null,
      completeCoverage: COMPLETE_COVERAGE,
      incompleteNote: incompleteMonthsWords(left),
      flagged,
      rows,
      method:
        `Observed ÷ expected failures by month. Each month's expected failures are its engine hours in each hour band × temperature band at the failure rates those cells had over the complete months shown (indirect standardisation, as the cluster scan does), so an ageing fleet or a cold month raises the expectation rather than the alarm; the complete months together read 1. Limits are the 0.135 % and 99.865 % quantiles of a Poisson count with the month's expectation (exact probability limits, the tail areas of 3-sigma limits). A month counts as complete when hour readings cover at least ${Math.round(COMPLETE_COVERAGE * 100)} % of its machine-days in service (its rate is then at most about 5 % high); incomplete months are drawn hollow, without limits, and raise no alarm.`,
      plainMethod: "u-chart over the complete months: centre = their failures ÷ their engine hours; limits = centre ± 3·√(centre ÷ month's hours) (NIST/SEMATECH e-Handbook 6.3.3.2).",
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
